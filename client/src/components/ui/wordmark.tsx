import { cx } from './cx';

/**
 * Cartouche's wordmark: a rounded frame with a tie bar at its end, holding two caption lines.
 * Decorative; the product name is always written beside it.
 */
export function WordmarkGlyph({ className }: { className?: string }) {
  return (
    <svg
      viewBox="0 0 44 28"
      width="44"
      height="28"
      aria-hidden="true"
      focusable="false"
      className={cx('shrink-0', className)}
    >
      <rect x="2" y="3" width="32" height="22" rx="11" fill="none" stroke="currentColor" strokeWidth="2.5" />
      <path d="M40 3v22" stroke="currentColor" strokeWidth="2.5" strokeLinecap="round" />
      <path
        d="M11 11.5h14M11 16.5h9"
        stroke="var(--color-accent)"
        strokeWidth="2.5"
        strokeLinecap="round"
      />
    </svg>
  );
}
