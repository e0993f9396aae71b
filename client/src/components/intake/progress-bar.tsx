import { cx } from '../ui/cx';

export interface ProgressBarProps {
  /** accessible name, e.g. "Sending east-pier.jpg" */
  label: string;
  /** a share between 0 and 1; null while the amount is unknown (the server is working) */
  value: number | null;
  /** the value in words for assistive technology, e.g. "45 %, 1.2 MB of 2.6 MB" */
  valueText: string;
  className?: string;
}

/**
 * A thin horizontal progress bar. The words beside it carry the meaning; the bar repeats them for the eye.
 * The track has a 3:1 boundary (line on paper), the fill is the accent. An unknown amount shows as a full,
 * hatched bar rather than an animation, so it reads the same with reduced motion.
 */
export function ProgressBar({ label, value, valueText, className }: ProgressBarProps) {
  const share = value === null ? 1 : Math.min(1, Math.max(0, value));
  return (
    <div
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={value === null ? undefined : Math.round(share * 100)}
      aria-valuetext={valueText}
      className={cx('meter-track h-2.5 w-full overflow-hidden rounded-full border border-line bg-sunk', className)}
    >
      <div
        className={cx('meter-fill h-full rounded-full bg-accent', value === null && 'opacity-60')}
        style={{
          width: `${share * 100}%`,
          minWidth: share > 0 ? '0.375rem' : undefined,
          backgroundImage:
            value === null
              ? 'repeating-linear-gradient(135deg, transparent 0 6px, var(--color-raised) 6px 9px)'
              : undefined,
        }}
      />
    </div>
  );
}
