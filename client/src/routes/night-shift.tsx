import { useId, useState } from 'react';
import { useSearchParams } from 'react-router';
import { useCollections } from '../api/collections';
import { problemOf, problemReference } from '../api/http';
import { isActive, useRun, useRuns, useSchedule, useStartRun } from '../api/runs';
import { hasPermission, useSession } from '../api/session';
import { RunDetail } from '../components/night-shift/run-detail';
import { RunList } from '../components/night-shift/run-list';
import { ScheduleFacts, ScheduleForm } from '../components/night-shift/schedule-settings';
import { useRunAnnouncements } from '../components/night-shift/use-run-announcements';
import { Button } from '../components/ui/button';
import { Card } from '../components/ui/card';
import { CollectionPicker, useCollectionParam } from '../components/collections/collection-picker';
import { ProblemNotice } from '../components/ui/problem-notice';

/** The night shift of a collection: when it runs, running it now, and what each run did. */
export function NightShiftRoute() {
  const { user } = useSession();
  const canStart = hasPermission(user, 'runs:start');
  const canWrite = hasPermission(user, 'collections:write');
  const collections = useCollections();
  const [params, setParams] = useSearchParams();
  const settingsHeading = useId();
  const runsHeading = useId();
  const detailHeading = useId();
  const [started, setStarted] = useState('');

  const list = collections.data?.collections ?? [];
  const { chosen, choose } = useCollectionParam(list);
  const collectionId = chosen?.id ?? null;

  const wantedRun = Number(params.get('run'));
  const runs = useRuns(collectionId, Number.isInteger(wantedRun) && wantedRun > 0 ? wantedRun : null);
  const runList = runs.data ?? [];
  const listed = runList.find((r) => r.id === wantedRun) ?? runList[0];
  const selected = useRun(listed?.id ?? null, listed);
  const shown = selected.data ?? listed;
  const announcement = useRunAnnouncements(shown);

  const schedule = useSchedule(collectionId);
  const start = useStartRun();
  const refused = start.isError ? problemOf(start.error) : null;
  // "a run is already under way" stops being true once no run is: the refusal goes with it
  const startProblem = refused && !(refused.status === 409 && !runList.some(isActive)) ? refused : null;

  const hrefFor = (runId: number) => `?${new URLSearchParams({ collection: String(collectionId ?? ''), run: String(runId) }).toString()}`;

  function runNow() {
    if (collectionId === null || start.isPending) return;
    setStarted('');
    start.mutate(collectionId, {
      onSuccess: (run) => {
        setParams({ collection: String(run.collectionId), run: String(run.id) }, { replace: true, preventScrollReset: true });
        setStarted(`Run ${run.id} is queued. A worker picks it up shortly.`);
      },
    });
  }

  return (
    <>
      <title>Night shift · Cartouche</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Night shift</h1>
          <p className="max-w-prose text-lg text-muted">
            Each night the night shift takes in new scans from the collection’s drop folder, reads them, suggests subjects for them,
            rebuilds the subject models from editors’ decisions and mails a digest to the editors; a suggestion is not a description
            until a person approves it at the review desk.
          </p>
        </div>

        {collections.isError && list.length === 0 ? (
          <ProblemNotice
            announce
            title={problemOf(collections.error).title}
            detail={problemOf(collections.error).detail}
            reference={problemReference(problemOf(collections.error))}
          />
        ) : collections.isPending ? (
          <p role="status" className="text-muted">
            Loading collections…
          </p>
        ) : list.length === 0 || chosen === null ? (
          <Card className="max-w-prose">
            <h2 className="text-xl font-bold">No collection yet</h2>
            <p className="mt-2">The night shift works for one collection at a time. Once a collection exists, it can be chosen here.</p>
          </Card>
        ) : (
          <>
            <CollectionPicker
              collections={list}
              value={chosen.id}
              onChange={choose}
              hint="The settings and runs below belong to this collection."
            />

            <Card as="section" aria-labelledby={settingsHeading} className="space-y-5">
              <div className="space-y-1">
                <h2 id={settingsHeading} className="text-2xl font-bold">
                  Settings
                </h2>
                <p className="max-w-prose text-muted">When the night shift runs for {chosen.name}, and where it finds new scans.</p>
              </div>
              {schedule.isError ? (
                <ProblemNotice
                  headingLevel={3}
                  title={problemOf(schedule.error).title}
                  detail={problemOf(schedule.error).detail}
                  reference={problemReference(problemOf(schedule.error))}
                />
              ) : schedule.data === undefined ? (
                <p className="text-muted">Loading the settings…</p>
              ) : canWrite ? (
                <ScheduleForm key={chosen.id} collectionId={chosen.id} schedule={schedule.data} />
              ) : (
                <ScheduleFacts schedule={schedule.data} />
              )}
            </Card>

            <Card as="section" aria-labelledby={runsHeading} className="space-y-5">
              <div className="flex flex-wrap items-start justify-between gap-4">
                <div className="space-y-1">
                  <h2 id={runsHeading} className="text-2xl font-bold">
                    Runs
                  </h2>
                  <p className="max-w-prose text-muted">
                    {canStart
                      ? 'The latest 30 runs, newest first. Run now starts one at once instead of waiting for the schedule.'
                      : 'The latest 30 runs, newest first.'}
                  </p>
                </div>
                {canStart ? (
                  <Button variant="primary" aria-disabled={start.isPending ? true : undefined} onClick={runNow}>
                    {start.isPending ? 'Starting…' : 'Run now'}
                  </Button>
                ) : null}
              </div>

              {/* present from the start, so changes are announced politely */}
              <p role="status" className="sr-only">
                {started}
              </p>
              <p role="status" className="sr-only">
                {announcement}
              </p>

              {startProblem ? (
                <ProblemNotice
                  headingLevel={3}
                  announce
                  title={startProblem.title}
                  detail={startProblem.detail}
                  reference={problemReference(startProblem)}
                />
              ) : null}

              {runs.isError ? (
                <ProblemNotice
                  headingLevel={3}
                  title={problemOf(runs.error).title}
                  detail={problemOf(runs.error).detail}
                  reference={problemReference(problemOf(runs.error))}
                />
              ) : runs.isPending ? (
                <p className="text-muted">Loading the runs…</p>
              ) : runList.length === 0 ? (
                <p>{chosen.name} has had no run yet.</p>
              ) : (
                <div className="grid gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
                  <section aria-label="All runs">
                    <RunList runs={runList} selectedId={shown?.id ?? null} hrefOf={(run) => hrefFor(run.id)} />
                  </section>
                  {shown ? (
                    <section aria-labelledby={detailHeading} className="min-w-0 lg:border-l lg:border-rule lg:pl-6">
                      <RunDetail run={shown} canStart={canStart} headingId={detailHeading} />
                      {selected.isError ? (
                        <ProblemNotice
                          className="mt-4"
                          headingLevel={3}
                          title={problemOf(selected.error).title}
                          detail={problemOf(selected.error).detail}
                          reference={problemReference(problemOf(selected.error))}
                        />
                      ) : null}
                    </section>
                  ) : null}
                </div>
              )}
            </Card>
          </>
        )}
      </div>
    </>
  );
}
