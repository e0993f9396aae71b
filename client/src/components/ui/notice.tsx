import type { ReactNode } from 'react';
import { cx } from './cx';

/**
 * A calm confirmation that something worked, or a piece of information.
 * The caller places it inside a live region when it should be announced.
 */
export function Notice({
  title,
  children,
  className,
}: {
  title?: string;
  children?: ReactNode;
  className?: string;
}) {
  return (
    <div className={cx('flex items-start gap-3 rounded-card border-2 border-line bg-accent-tint px-4 py-3', className)}>
      <svg viewBox="0 0 20 20" width="20" height="20" aria-hidden="true" focusable="false" className="mt-0.5 shrink-0">
        <circle cx="10" cy="10" r="8.5" fill="none" stroke="currentColor" strokeWidth="1.75" />
        <path d="M6 10.5l2.6 2.6L14 7.5" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
      <div className="min-w-0 space-y-1">
        {title ? <p className="font-bold">{title}</p> : null}
        {children}
      </div>
    </div>
  );
}
