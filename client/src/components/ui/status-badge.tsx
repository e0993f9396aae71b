import type { ReactNode } from 'react';
import { cx } from './cx';

/** How a state reads. Meaning is always in the words; the shape and fill only repeat it. */
export type StatusTone = 'good' | 'attention' | 'down' | 'unknown';

const frames: Record<StatusTone, string> = {
  good: 'border-line bg-raised text-ink',
  attention: 'border-ink border-dashed bg-sunk text-ink',
  down: 'border-ink bg-ink text-paper',
  unknown: 'border-line border-dotted bg-paper text-ink',
};

function Glyph({ tone }: { tone: StatusTone }) {
  const common = { width: 14, height: 14, viewBox: '0 0 14 14', 'aria-hidden': true, focusable: false } as const;
  switch (tone) {
    case 'good':
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="5.5" fill="currentColor" />
        </svg>
      );
    case 'attention':
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="5" fill="none" stroke="currentColor" strokeWidth="1.75" />
          <path d="M7 2a5 5 0 0 1 0 10z" fill="currentColor" />
        </svg>
      );
    case 'down':
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="5" fill="none" stroke="currentColor" strokeWidth="1.75" />
          <path d="M4.6 4.6l4.8 4.8M9.4 4.6l-4.8 4.8" stroke="currentColor" strokeWidth="1.75" strokeLinecap="round" />
        </svg>
      );
    case 'unknown':
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="5" fill="none" stroke="currentColor" strokeWidth="1.75" strokeDasharray="2 2" />
        </svg>
      );
  }
}

export interface StatusBadgeProps {
  tone: StatusTone;
  children: ReactNode;
  className?: string;
}

export function StatusBadge({ tone, children, className }: StatusBadgeProps) {
  return (
    <span
      className={cx(
        'inline-flex items-center gap-1.5 rounded-full border-2 px-2.5 py-0.5 text-sm font-bold leading-snug',
        frames[tone],
        className,
      )}
    >
      <Glyph tone={tone} />
      <span>{children}</span>
    </span>
  );
}
