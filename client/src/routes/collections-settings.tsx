import { useQueryClient } from '@tanstack/react-query';
import { useEffect, useId, useRef, useState } from 'react';
import { Link, useParams } from 'react-router';
import { useArchiveCollection, useCollection, useUpdateCollection, type CollectionDetail } from '../api/collections';
import { http, problemOf, problemReference } from '../api/http';
import { queryKeys } from '../api/query-keys';
import type { Schedule } from '../api/runs';
import { hasPermission, useSession } from '../api/session';
import { useSubjects } from '../api/subjects';
import { CollectionForm } from '../components/collections/collection-form';
import { FeedingSubjects } from '../components/collections/feeding-subjects';
import { ScheduleFacts, ScheduleForm } from '../components/night-shift/schedule-settings';
import { Button } from '../components/ui/button';
import { Card } from '../components/ui/card';
import { Checkbox } from '../components/ui/checkbox';
import { Notice } from '../components/ui/notice';
import { ProblemNotice } from '../components/ui/problem-notice';
import { formatDateTime } from '../lib/format';

const settingsOf = (c: CollectionDetail) => JSON.stringify([c.name, c.slug, c.description, c.medium, c.altTextLanguage, c.altTextMaxLength, c.houseStyle, c.feedingSubjectIds, c.readText]);

/** What reading text does and costs, in the settings form and in the read-only view. */
const READ_TEXT_HELP =
  'The night shift looks for printed or engraved words in each new scan (English), after it has made its suggestions. Words it finds make the item findable in the catalogue, are checked against the alt text and mark pages that are mostly text (WCAG 2.2 SC 1.4.5). They are offered to editors as a suggestion, not as a description. It costs about half a second of processor time per scan, once.';

/** The collection's switch for reading text in its scans at night. */
function ReadTextSetting({ value, onChange }: { value: boolean; onChange(next: boolean): void }) {
  const helpId = useId();
  return (
    <fieldset className="space-y-3 rounded-card border-2 border-rule p-4">
      <legend className="px-1 text-xl font-bold">Text in the scans</legend>
      <Checkbox label="Read text in scans at night" checked={value} onChange={(e) => onChange(e.currentTarget.checked)} aria-describedby={helpId} />
      <p id={helpId} className="max-w-prose text-sm text-muted">
        {READ_TEXT_HELP}
      </p>
    </fieldset>
  );
}

function SettingsForm({ detail, onReload }: { detail: CollectionDetail; onReload(): void }) {
  const update = useUpdateCollection();
  const subjects = useSubjects(detail.id);
  const collection = useCollection(detail.id);
  const queryClient = useQueryClient();
  const [feeding, setFeeding] = useState<Set<number>>(() => new Set(detail.feedingSubjectIds));
  const [readText, setReadText] = useState(detail.readText);
  const [saved, setSaved] = useState('');
  // the copy this form was opened from; saving the schedule below changes the stored time but not these settings
  const baseline = useRef(detail);
  useEffect(() => {
    const scheduleKey = JSON.stringify(queryKeys.runs.schedule(detail.id));
    return queryClient.getQueryCache().subscribe((event) => {
      if (event.type !== 'updated' || JSON.stringify(event.query.queryKey) !== scheduleKey) return;
      void http.get<{ collection: CollectionDetail }>(`/api/collections/${detail.id}`).then(({ collection: fresh }) => {
        if (settingsOf(fresh) === settingsOf(baseline.current)) baseline.current = fresh;
      });
    });
  }, [queryClient, detail.id]);
  return (
    <>
      <div role="status" className={saved ? '' : 'sr-only'}>
        {saved ? <Notice title={saved} /> : null}
      </div>
      <CollectionForm
        initial={{ name: detail.name, slug: detail.slug, description: detail.description, medium: detail.medium, altTextLanguage: detail.altTextLanguage, altTextMaxLength: detail.altTextMaxLength, houseStyle: detail.houseStyle }}
        submitLabel="Save the settings"
        onStale={() => void collection.refetch().then(onReload)}
        save={async (values) => {
          setSaved('');
          const c = await update.mutateAsync({ collectionId: detail.id, input: { ...values, readText, feedingSubjectIds: [...feeding], updatedAt: baseline.current.updatedAt } });
          baseline.current = c;
          setSaved(`Saved at ${formatDateTime(c.updatedAt)}.`);
        }}
      >
        <FeedingSubjects subjects={subjects.data ?? []} value={feeding} onChange={setFeeding} />
        <ReadTextSetting value={readText} onChange={setReadText} />
      </CollectionForm>
    </>
  );
}

/** One collection's settings: its own, its alt-text guidance and feeding subjects, its night shift, archiving. */
export function CollectionSettingsRoute() {
  const { collectionId } = useParams();
  const id = Number(collectionId);
  const valid = Number.isInteger(id) && id > 0;
  const { user } = useSession();
  const canWrite = hasPermission(user, 'collections:write');
  const detail = useCollection(valid ? id : null);
  const archive = useArchiveCollection();
  const [generation, setGeneration] = useState(0);
  const ids = { settings: useId(), schedule: useId(), archive: useId() };

  if (!valid) return <ProblemNotice announce title="No such collection" detail="The address does not name a collection." />;
  if (detail.isError) {
    const p = problemOf(detail.error);
    return <ProblemNotice announce title={p.title} detail={p.detail} reference={problemReference(p)} />;
  }
  const c = detail.data;
  if (!c) return <p role="status">Loading the collection…</p>;
  const schedule: Schedule = { scheduleCron: c.scheduleCron, scheduleTimezone: c.scheduleTimezone, scheduleEnabled: c.scheduleEnabled, dropFolder: c.dropFolder };
  const archiveProblem = archive.isError ? problemOf(archive.error) : null;

  return (
    <>
      <title>{`${c.name} · Collections · Cartouche`}</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <p>
            <Link to="/collections">All collections</Link>
          </p>
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">{c.name}</h1>
          <p className="text-lg text-muted">
            {c.archivedAt ? `Archived ${formatDateTime(c.archivedAt)}. ` : ''}
            <Link to={`/subjects?collection=${c.id}`}>Its vocabulary</Link>
          </p>
        </div>

        <Card as="section" aria-labelledby={ids.settings} className="space-y-4">
          <h2 id={ids.settings} className="text-2xl font-bold">
            Settings
          </h2>
          {canWrite ? (
            <SettingsForm key={`${c.id}-${generation}`} detail={c} onReload={() => setGeneration((g) => g + 1)} />
          ) : (
            <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
              <dt className="font-bold">Medium</dt>
              <dd>{c.medium}</dd>
              <dt className="font-bold">Alt text</dt>
              <dd>
                In “{c.altTextLanguage}”, up to about {c.altTextMaxLength} characters
              </dd>
              <dt className="font-bold">House style</dt>
              <dd className="whitespace-pre-line">{c.houseStyle || 'none'}</dd>
              <dt className="font-bold">Text in the scans</dt>
              <dd className="max-w-prose">
                {c.readText ? 'Read at night.' : 'Not read at night.'} <span className="text-sm text-muted">{READ_TEXT_HELP}</span>
              </dd>
            </dl>
          )}
        </Card>

        <Card as="section" aria-labelledby={ids.schedule} className="space-y-4">
          <h2 id={ids.schedule} className="text-2xl font-bold">
            Night shift
          </h2>
          <p className="max-w-prose text-muted">When the night shift runs for {c.name} and where it finds new scans (the same settings as on the Night shift screen).</p>
          {canWrite ? <ScheduleForm key={c.id} collectionId={c.id} schedule={schedule} /> : <ScheduleFacts schedule={schedule} />}
        </Card>

        {canWrite ? (
          <Card as="section" aria-labelledby={ids.archive} className="space-y-3">
            <h2 id={ids.archive} className="text-2xl font-bold">
              {c.archivedAt ? 'Restore' : 'Archive'}
            </h2>
            <p className="max-w-prose">
              {c.archivedAt
                ? 'Restoring brings the collection back into every list; its schedule applies again.'
                : 'Archiving takes the collection out of every list and stops its night shift. Nothing is deleted: items, subjects, decisions and exports stay, and it can be restored here.'}
            </p>
            {archiveProblem ? <ProblemNotice announce headingLevel={3} title={archiveProblem.title} detail={archiveProblem.detail} reference={problemReference(archiveProblem)} /> : null}
            <Button onClick={() => archive.mutate({ collectionId: c.id, archive: c.archivedAt === null })} aria-disabled={archive.isPending ? true : undefined}>
              {c.archivedAt ? 'Restore the collection' : 'Archive the collection'}
            </Button>
          </Card>
        ) : null}
      </div>
    </>
  );
}
