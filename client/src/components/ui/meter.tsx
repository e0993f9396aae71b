import { useId } from 'react';
import { cx } from './cx';

export interface MeterProps {
  /** Visible and accessible name of the measurement. */
  label: string;
  /** A share between 0 and 1. */
  value: number;
  /** The value in words for people, e.g. "42 %". Shown beside the bar. */
  valueText: string;
  /** A longer reading for assistive technology, e.g. "42 %, 126 of 300 items". Defaults to valueText. */
  spokenText?: string;
  /** A short line under the bar, e.g. "126 of 300 items". */
  caption?: string;
  /** Ids of elements that name what is measured (e.g. a card heading), read after the label. */
  contextIds?: string;
  className?: string;
}

/**
 * A horizontal meter: the value is always given in text; the bar repeats it for the eye.
 * The track has a 3:1 boundary and the fill a 3:1 contrast against the track.
 */
export function Meter({ label, value, valueText, spokenText, caption, contextIds, className }: MeterProps) {
  const labelId = useId();
  const share = Math.min(1, Math.max(0, Number.isFinite(value) ? value : 0));
  const percent = share * 100;

  return (
    <div className={cx('space-y-1.5', className)}>
      <div className="flex items-baseline justify-between gap-3">
        <span id={labelId} className="font-bold">
          {label}
        </span>
        <span aria-hidden="true" className="text-2xl font-bold tabular-nums">
          {valueText}
        </span>
      </div>
      <div
        role="meter"
        aria-labelledby={contextIds ? `${labelId} ${contextIds}` : labelId}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Math.round(percent * 10) / 10}
        aria-valuetext={spokenText ?? valueText}
        className="meter-track h-3.5 w-full overflow-hidden rounded-full border border-line bg-sunk"
      >
        <div
          className="meter-fill h-full rounded-full bg-accent"
          style={{ width: `${percent}%`, minWidth: share > 0 ? '0.375rem' : undefined }}
        />
      </div>
      {caption ? (
        <p aria-hidden="true" className="text-sm text-muted">
          {caption}
        </p>
      ) : null}
    </div>
  );
}
