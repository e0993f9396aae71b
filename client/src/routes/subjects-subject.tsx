import { useId } from 'react';
import { Link, useParams } from 'react-router';
import { useCollections } from '../api/collections';
import { problemOf, problemReference } from '../api/http';
import { hasPermission, useSession } from '../api/session';
import { useSubject, useSubjects, useUpdateSubject } from '../api/subjects';
import { ExamplesPanel } from '../components/studio/examples-panel';
import { ModelPanel } from '../components/studio/model-panel';
import { PreviewPanel } from '../components/studio/preview-panel';
import { SubjectForm } from '../components/studio/subject-form';
import { SubjectHistory } from '../components/studio/subject-history';
import { kindShort, statusWords } from '../components/studio/words';
import { Card } from '../components/ui/card';
import { ProblemNotice } from '../components/ui/problem-notice';

/** One subject: its record, its examples (uploaded or drawn), what it would catch, and its model. */
export function SubjectRoute() {
  const { subjectId } = useParams();
  const id = Number(subjectId);
  const valid = Number.isInteger(id) && id > 0;
  const { user } = useSession();
  const canWrite = hasPermission(user, 'subjects:write');
  const canPromote = canWrite && hasPermission(user, 'review:write');
  const detail = useSubject(valid ? id : null);
  const subject = detail.data?.subject;
  const siblings = useSubjects(subject?.collectionId ?? null);
  const collections = useCollections();
  const update = useUpdateSubject();
  const ids = { record: useId(), examples: useId(), preview: useId(), model: useId(), history: useId() };

  if (!valid) return <ProblemNotice announce title="No such subject" detail="The address does not name a subject." />;
  if (detail.isError) {
    const p = problemOf(detail.error);
    return (
      <div className="space-y-4">
        <ProblemNotice announce title={p.title} detail={p.detail} reference={problemReference(p)} />
        <Link to="/subjects">Back to the subjects</Link>
      </div>
    );
  }
  if (!subject || !detail.data) return <p role="status">Loading the subject…</p>;

  const collection = collections.data?.collections.find((c) => c.id === subject.collectionId);
  const broader = siblings.data?.find((s) => s.id === subject.broaderId);

  return (
    <>
      <title>{`${subject.prefLabel} · Subjects · Cartouche`}</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <p>
            <Link to={`/subjects?collection=${subject.collectionId}`}>{collection ? `Vocabulary of ${collection.name}` : 'Back to the vocabulary'}</Link>
          </p>
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">{subject.prefLabel}</h1>
          <p className="text-lg text-muted">
            A {kindShort[subject.kind]}
            {broader ? `, narrower than “${broader.prefLabel}”` : ''}. {statusWords[subject.status].label}: {statusWords[subject.status].hint}.
          </p>
          <p className="text-sm text-muted [overflow-wrap:anywhere]">
            Concept URI: <code>{subject.conceptUri}</code>
          </p>
        </div>

        <Card as="section" aria-labelledby={ids.examples} className="space-y-4">
          <h2 id={ids.examples} className="text-2xl font-bold">
            Examples
          </h2>
          <ExamplesPanel subjectId={subject.id} label={subject.prefLabel} examples={detail.data.examples} canWrite={canWrite} />
        </Card>

        <Card as="section" aria-labelledby={ids.preview} className="space-y-4">
          <h2 id={ids.preview} className="text-2xl font-bold">
            What it would catch
          </h2>
          <PreviewPanel subjectId={subject.id} label={subject.prefLabel} exampleCount={detail.data.examples.length} canPromote={canPromote} />
        </Card>

        <Card as="section" aria-labelledby={ids.model} className="space-y-4">
          <h2 id={ids.model} className="text-2xl font-bold">
            Model
          </h2>
          <ModelPanel
            subjectId={subject.id}
            collectionId={subject.collectionId}
            label={subject.prefLabel}
            broaderId={subject.broaderId}
            subjects={siblings.data ?? []}
            canWrite={canWrite}
            exampleCount={detail.data.examples.length}
          />
        </Card>

        <Card as="section" aria-labelledby={ids.record} className="space-y-4">
          <h2 id={ids.record} className="text-2xl font-bold">
            Record
          </h2>
          {canWrite ? (
            <SubjectForm
              key={`${subject.id}-${subject.version}`}
              subject={subject}
              subjects={siblings.data ?? []}
              submitLabel="Save the record"
              save={(values) => update.mutateAsync({ subjectId: subject.id, subject: { ...values, version: subject.version } })}
              onReload={() => void detail.refetch()}
            />
          ) : (
            <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
              <dt className="font-bold">Alternative labels</dt>
              <dd>{subject.altLabels.join(', ') || 'none'}</dd>
              <dt className="font-bold">Notation</dt>
              <dd>{subject.notation ?? 'none'}</dd>
              <dt className="font-bold">Scope note</dt>
              <dd>{subject.scopeNote ?? 'none'}</dd>
              <dt className="font-bold">Alt-text phrase</dt>
              <dd>{subject.altTextPhrase ?? 'none'}</dd>
            </dl>
          )}
        </Card>

        <Card as="section" aria-labelledby={ids.history} className="space-y-4">
          <h2 id={ids.history} className="text-2xl font-bold">
            History
          </h2>
          <SubjectHistory subjectId={subject.id} />
        </Card>
      </div>
    </>
  );
}
