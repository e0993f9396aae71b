import { useId, useState } from 'react';
import { Link, useNavigate } from 'react-router';
import { useCollections } from '../api/collections';
import { problemOf, problemReference } from '../api/http';
import { hasPermission, useSession } from '../api/session';
import { useCreateSubject, useSubjects } from '../api/subjects';
import { CollectionPicker, useCollectionParam } from '../components/collections/collection-picker';
import { SubjectForm } from '../components/studio/subject-form';
import { VocabularyExchange } from '../components/studio/vocabulary-exchange';
import { VocabularyTree } from '../components/studio/vocabulary-tree';
import { Button } from '../components/ui/button';
import { Card } from '../components/ui/card';
import { CreatePanel } from '../components/ui/create-panel';
import { ProblemNotice } from '../components/ui/problem-notice';

/** The subject studio's first screen: a collection's vocabulary as a tree, a new subject, and vocabulary exchange. */
export function SubjectsRoute() {
  const { user } = useSession();
  const canWrite = hasPermission(user, 'subjects:write');
  const canSettings = hasPermission(user, 'collections:write');
  const collections = useCollections();
  const list = collections.data?.collections ?? [];
  const { chosen, choose } = useCollectionParam(list);
  const subjects = useSubjects(chosen?.id ?? null);
  const create = useCreateSubject();
  const navigate = useNavigate();
  const [adding, setAdding] = useState(false);
  const treeHeading = useId();
  const exchangeHeading = useId();

  return (
    <>
      <title>Subjects · Cartouche</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Subjects</h1>
          <p className="max-w-prose text-lg text-muted">
            Each collection has its own vocabulary: subjects (what an image shows) and forms (what kind of object it is), broader and narrower. Give a subject a few drawings or pictures and see at once
            which scans it would catch.
          </p>
          {canSettings ? (
            <p>
              <Link to="/collections">Collections and their settings</Link>
            </p>
          ) : null}
        </div>

        {collections.isError && list.length === 0 ? (
          <ProblemNotice announce title={problemOf(collections.error).title} detail={problemOf(collections.error).detail} reference={problemReference(problemOf(collections.error))} />
        ) : collections.isPending ? (
          <p role="status" className="text-muted">
            Loading collections…
          </p>
        ) : chosen === null ? (
          <Card className="max-w-prose">
            <h2 className="text-xl font-bold">No collection yet</h2>
            <p className="mt-2">Subjects belong to a collection. {canSettings ? <Link to="/collections">Create the first collection</Link> : 'An archivist creates collections.'}</p>
          </Card>
        ) : (
          <>
            <CollectionPicker collections={list} value={chosen.id} onChange={choose} hint="The vocabulary below belongs to this collection." />

            <Card as="section" aria-labelledby={treeHeading} className="space-y-5">
              <div className="flex flex-wrap items-start justify-between gap-4">
                <div className="space-y-1">
                  <h2 id={treeHeading} className="text-2xl font-bold">
                    Vocabulary of {chosen.name}
                  </h2>
                  <p className="max-w-prose text-muted">
                    {canWrite ? 'Drag a subject by its handle onto another to make it narrower, or use “Move under…”. Open a subject to give it examples.' : 'Open a subject to see its examples and what it catches.'}
                  </p>
                </div>
                {canWrite && !adding ? (
                  <Button variant="primary" onClick={() => setAdding(true)}>
                    New subject
                  </Button>
                ) : null}
              </div>

              {adding ? (
                <CreatePanel title="New subject" onCancel={() => setAdding(false)}>
                  <p className="max-w-prose text-sm text-muted">Name it now; labels, notes and examples go on its own page, where it opens next.</p>
                  <SubjectForm
                    brief
                    subjects={subjects.data ?? []}
                    submitLabel="Create the subject"
                    save={async (values) => {
                      const s = await create.mutateAsync({ collectionId: chosen.id, subject: values });
                      await navigate(`/subjects/${s.id}`);
                    }}
                  />
                </CreatePanel>
              ) : null}

              {subjects.isError ? (
                <ProblemNotice headingLevel={3} title={problemOf(subjects.error).title} detail={problemOf(subjects.error).detail} reference={problemReference(problemOf(subjects.error))} />
              ) : subjects.data === undefined ? (
                <p className="text-muted">Loading the vocabulary…</p>
              ) : subjects.data.length === 0 ? (
                <p>{chosen.name} has no subject yet.</p>
              ) : (
                <VocabularyTree subjects={subjects.data} canWrite={canWrite} hrefOf={(s) => `/subjects/${s.id}`} />
              )}
            </Card>

            <Card as="section" aria-labelledby={exchangeHeading} className="space-y-4">
              <h2 id={exchangeHeading} className="text-2xl font-bold">
                Exchange the vocabulary
              </h2>
              <VocabularyExchange collectionId={chosen.id} collectionName={chosen.name} canWrite={canWrite} />
            </Card>
          </>
        )}
      </div>
    </>
  );
}
