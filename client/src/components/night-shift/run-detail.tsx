import { useEffect, useId, useRef, useState } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { isActive, useCancelRun, type Run } from '../../api/runs';
import { formatCount, formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';
import { ErrorGlyph } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';
import { StatList } from '../ui/stat-list';
import { durationWords, whenWords } from './run-list';
import { RunStatusBadge } from './run-status';
import { StageProgress } from './stage-progress';
import { triggerWords } from './words';

function statusSentence(run: Run): string {
  switch (run.status) {
    case 'queued':
      return 'Waiting for a worker to pick it up.';
    case 'running':
      return 'Under way. This page checks on it every two seconds.';
    case 'succeeded':
      return 'Finished: every stage is done or had nothing to do.';
    case 'failed':
      return 'Stopped by a problem; the stages already done keep their work.';
    case 'cancelled':
      return 'Cancelled on request; the stages already done keep their work.';
  }
}

/** Cancelling, with a question in words first. The stages already done keep what they did. */
function CancelRun({ run, headingId, onCancelled }: { run: Run; headingId: string; onCancelled: () => void }) {
  const cancel = useCancelRun();
  const [asking, setAsking] = useState(false);
  const askRef = useRef<HTMLButtonElement>(null);
  const questionRef = useRef<HTMLDivElement>(null);
  const backToButton = useRef(false);
  const questionId = useId();

  useEffect(() => {
    if (asking) questionRef.current?.focus();
    else if (backToButton.current) {
      backToButton.current = false;
      askRef.current?.focus();
    }
  }, [asking]);

  function keep() {
    backToButton.current = true;
    setAsking(false);
  }

  const failure = cancel.isError ? problemOf(cancel.error) : null;

  return (
    <div className="space-y-3">
      {asking ? (
        <div
          ref={questionRef}
          tabIndex={-1}
          role="group"
          aria-labelledby={questionId}
          className="space-y-3 rounded-card border-2 border-ink bg-sunk p-4"
        >
          <p id={questionId} className="font-bold">
            Cancel run {run.id}? {run.status === 'running' ? 'It stops after the batch it is working on.' : 'It will not start.'} What it has
            already done stays; new scans left in the drop folder wait for the next run.
          </p>
          <div className="flex flex-wrap gap-3">
            <Button
              variant="primary"
              aria-disabled={cancel.isPending ? true : undefined}
              onClick={() => {
                if (cancel.isPending) return;
                cancel.mutate(run.id, {
                  // the run is over, so this control goes: the focus goes to the run's heading
                  onSuccess: () => onCancelled(),
                  onError: () => keep(),
                });
              }}
            >
              {cancel.isPending ? 'Cancelling…' : 'Yes, cancel the run'}
            </Button>
            <Button onClick={keep}>No, let it go on</Button>
          </div>
        </div>
      ) : (
        <Button ref={askRef} aria-describedby={headingId} onClick={() => setAsking(true)}>
          Cancel this run…
        </Button>
      )}
      {failure ? (
        <ProblemNotice headingLevel={3} announce title={failure.title} detail={failure.detail} reference={problemReference(failure)} />
      ) : null}
    </div>
  );
}

/** One run in full: its stages with progress, the files it refused and the problems it met. */
export function RunDetail({ run, canStart, headingId }: { run: Run; canStart: boolean; headingId: string }) {
  const headingRef = useRef<HTMLHeadingElement>(null);
  const duration = durationWords(run);
  const finished = run.finishedAt ? formatDateTime(run.finishedAt) : null;
  return (
    <div className="space-y-6">
      <div className="space-y-2">
        <div className="flex flex-wrap items-center gap-x-3 gap-y-2">
          <h3 ref={headingRef} id={headingId} tabIndex={-1} className="text-2xl font-bold">
            Run {run.id}
          </h3>
          <RunStatusBadge status={run.status} />
        </div>
        <p>{statusSentence(run)}</p>
        <p className="text-sm text-muted">
          {triggerWords[run.trigger]} · {whenWords(run)}
          {finished ? ` · ended ${finished}` : ''}
          {duration ? ` · ${duration}` : ''}
        </p>
      </div>

      {canStart && isActive(run) ? <CancelRun key={run.id} run={run} headingId={headingId} onCancelled={() => headingRef.current?.focus()} /> : null}

      {run.error ? (
        <div className="rounded-card border-2 border-ink border-l-[6px] bg-raised p-4">
          <h4 className="flex items-start gap-1.5 font-bold">
            <ErrorGlyph />
            What stopped the run
          </h4>
          <p className="mt-1 [overflow-wrap:anywhere]">{run.error}</p>
        </div>
      ) : null}

      <section aria-labelledby={`${headingId}-stages`} className="space-y-1">
        <h4 id={`${headingId}-stages`} className="text-lg font-bold">
          Stages
        </h4>
        <ol className="rounded-card border border-rule bg-raised px-4">
          {run.stages.map((stage, index) => (
            <StageProgress key={stage.name} stage={stage} index={index} />
          ))}
        </ol>
      </section>

      <section aria-labelledby={`${headingId}-counts`} className="space-y-3">
        <h4 id={`${headingId}-counts`} className="text-lg font-bold">
          Counts
        </h4>
        {run.startedAt === null ? (
          <p className="text-muted">None yet: the counts begin when the run starts.</p>
        ) : (
        <StatList
          className="sm:grid-cols-3"
          stats={[
            { label: 'Scans taken in', value: formatCount(run.counts.ingested) },
            { label: 'Duplicates passed over', value: formatCount(run.counts.duplicates) },
            { label: 'Files refused', value: formatCount(run.counts.rejected) },
            { label: 'Scans read', value: formatCount(run.counts.embedded) },
            { label: 'Subjects suggested', value: formatCount(run.counts.suggested) },
            { label: 'Subject models rebuilt', value: formatCount(run.counts.retrained) },
          ]}
        />
        )}
      </section>

      <section aria-labelledby={`${headingId}-refused`} className="space-y-2">
        <h4 id={`${headingId}-refused`} className="text-lg font-bold">
          Refused files
        </h4>
        {run.rejected.length === 0 ? (
          <p className="text-muted">None.</p>
        ) : (
          <>
            <p className="text-sm text-muted">
              Each refused file was moved into the drop folder’s “rejected” folder, with a note beside it saying why. Nothing of it was added
              to the collection.
            </p>
            <ul className="space-y-2">
              {run.rejected.map((r) => (
                <li key={r.fileName} className="rounded-control border border-rule bg-raised px-3 py-2">
                  <span className="font-bold [overflow-wrap:anywhere]">{r.fileName}</span>: {r.reason}
                </li>
              ))}
            </ul>
          </>
        )}
      </section>

      <section aria-labelledby={`${headingId}-errors`} className="space-y-2">
        <h4 id={`${headingId}-errors`} className="text-lg font-bold">
          Problems met
        </h4>
        {run.errors.length === 0 ? (
          <p className="text-muted">None.</p>
        ) : (
          <ul className="space-y-2">
            {run.errors.map((e) => (
              <li key={`${e.at}-${e.message}`} className="rounded-control border border-rule bg-raised px-3 py-2">
                <span className="text-sm text-muted">{formatDateTime(e.at) ?? e.at}: </span>
                {e.message}
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
