import type { ReactNode } from 'react';
import { cx } from './cx';

/** How a state reads. Meaning is always in the words; the shape and fill only repeat it. */
export type StatusTone = 'good' | 'attention' | 'down' | 'unknown' | 'waiting' | 'done' | 'stopped' | 'passed';

const frames: Record<StatusTone, string> = {
  good: 'border-line bg-raised text-ink',
  attention: 'border-ink border-dashed bg-sunk text-ink',
  down: 'border-ink bg-ink text-paper',
  unknown: 'border-line border-dotted bg-paper text-ink',
  waiting: 'border-line border-dotted bg-paper text-ink',
  done: 'border-line bg-raised text-ink',
  stopped: 'border-line bg-sunk text-ink',
  passed: 'border-line border-dotted bg-raised text-ink',
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
    case 'waiting':
      // a clock face
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="5.25" fill="none" stroke="currentColor" strokeWidth="1.5" />
          <path d="M7 4v3.2l2 1.3" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
        </svg>
      );
    case 'done':
      // a tick in a filled circle
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="6" fill="currentColor" />
          <path d="M4.3 7.2l1.9 1.9 3.6-3.8" fill="none" stroke="var(--color-raised)" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" />
        </svg>
      );
    case 'stopped':
      // a square: stopped on request
      return (
        <svg {...common}>
          <rect x="2.5" y="2.5" width="9" height="9" rx="1.5" fill="currentColor" />
        </svg>
      );
    case 'passed':
      // an arrow past a bar: nothing to do
      return (
        <svg {...common}>
          <path d="M2 7h8M7.5 4l3 3-3 3" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" />
          <path d="M12.5 2.5v9" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
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
        'inline-flex shrink-0 items-center gap-1.5 rounded-full border-2 px-2.5 py-0.5 text-sm font-bold leading-snug',
        frames[tone],
        className,
      )}
    >
      <Glyph tone={tone} />
      <span>{children}</span>
    </span>
  );
}
