import type { RunStage } from '../../api/runs';
import { formatCount, formatShare, share } from '../../lib/format';
import { cx } from '../ui/cx';
import { StageStateBadge } from './run-status';
import { etaWords, stageLabels } from './words';

/** "4 of 6" / "4 so far" / "" — how far a stage got, in words. */
export function amountWords(stage: RunStage): string {
  if (stage.total !== null) return `${formatCount(stage.done)} of ${formatCount(stage.total)}`;
  return stage.done > 0 ? `${formatCount(stage.done)} so far` : '';
}

/**
 * One stage of a run: its state in words and shape, a bar for done of total with the same in text, the time
 * left while it runs, and any note the worker left.
 */
export function StageProgress({ stage, index }: { stage: RunStage; index: number }) {
  const label = stageLabels[stage.name];
  const amount = amountWords(stage);
  const known = stage.total !== null && stage.total > 0;
  const finished = stage.state === 'done' || stage.state === 'skipped';
  const value = known ? share(stage.done, stage.total ?? 0) : finished ? 1 : 0;
  const valueText = known ? `${formatShare(value)}, ${amount}` : finished ? 'finished' : stage.state === 'running' ? 'under way, amount not known yet' : 'not started';
  return (
    <li className="border-t border-rule py-4 first:border-t-0" aria-label={`Stage ${index + 1}: ${label}`}>
      <div className="flex flex-wrap items-start justify-between gap-x-3 gap-y-1">
        <p className="font-bold">
          <span className="text-muted">{index + 1}. </span>
          {label}
        </p>
        <StageStateBadge state={stage.state} />
      </div>
      {stage.state === 'pending' ? null : (
        <div className="mt-2 flex items-center gap-3">
          <div
            role="progressbar"
            aria-label={label}
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={known || finished ? Math.round(value * 100) : undefined}
            aria-valuetext={valueText}
            className="meter-track h-2.5 min-w-0 flex-1 overflow-hidden rounded-full border border-line bg-sunk"
          >
            <div
              className={cx('meter-fill h-full rounded-full bg-accent', stage.state === 'skipped' && 'opacity-60')}
              style={{ width: `${value * 100}%`, minWidth: value > 0 ? '0.375rem' : undefined }}
            />
          </div>
          <span aria-hidden="true" className="min-w-16 shrink-0 text-right text-sm tabular-nums">
            {amount !== '' ? amount : stage.state === 'skipped' ? 'nothing to do' : finished ? 'finished' : '…'}
          </span>
        </div>
      )}
      {stage.state === 'running' ? (
        <p className="mt-1 text-sm">{stage.eta !== null ? etaWords(stage.eta) : 'Time left not known yet.'}</p>
      ) : null}
      {stage.note ? <p className="mt-1 text-sm text-muted">Note: {stage.note}</p> : null}
    </li>
  );
}
