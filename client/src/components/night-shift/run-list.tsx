import { Link } from 'react-router';
import type { Run } from '../../api/runs';
import { formatDateTime } from '../../lib/format';
import { cx } from '../ui/cx';
import { RunStatusBadge } from './run-status';
import { countWords, formatDuration, triggerWords } from './words';

export function whenWords(run: Run): string {
  if (run.startedAt) return `Started ${formatDateTime(run.startedAt) ?? run.startedAt}`;
  return `Asked for ${formatDateTime(run.createdAt) ?? run.createdAt}, ${run.status === 'queued' ? 'not started yet' : 'never started'}`;
}

export function durationWords(run: Run): string | null {
  if (run.durationMs === null) return null;
  return run.finishedAt ? `took ${formatDuration(run.durationMs)}` : `${formatDuration(run.durationMs)} so far`;
}

/** The runs of a collection, newest first; each links to its detail. */
export function RunList({ runs, selectedId, hrefOf }: { runs: Run[]; selectedId: number | null; hrefOf: (run: Run) => string }) {
  return (
    <ol className="space-y-3">
      {runs.map((run) => {
        const selected = run.id === selectedId;
        const duration = durationWords(run);
        return (
          <li
            key={run.id}
            className={cx(
              'rounded-card border bg-raised p-4',
              selected ? 'border-2 border-ink border-l-[6px] p-[calc(1rem-1px)]' : 'border-rule',
            )}
          >
            <div className="flex flex-wrap items-start justify-between gap-x-3 gap-y-2">
              <Link
                to={hrefOf(run)}
                replace
                preventScrollReset
                aria-current={selected ? 'true' : undefined}
                className="inline-flex min-h-11 items-center text-lg font-bold"
              >
                Run {run.id}
              </Link>
              <RunStatusBadge status={run.status} className="mt-2" />
            </div>
            <p className="text-sm">
              {triggerWords[run.trigger]} · {whenWords(run)}
              {duration ? ` · ${duration}` : ''}
            </p>
            {run.startedAt === null ? null : <p className="mt-1 text-sm text-muted">{countWords(run.counts).join(' · ')}</p>}
            {selected ? <p className="mt-1 text-sm font-bold">Shown in detail</p> : null}
          </li>
        );
      })}
    </ol>
  );
}
