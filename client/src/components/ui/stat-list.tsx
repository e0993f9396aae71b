import type { ReactNode } from 'react';
import { cx } from './cx';

export interface Stat {
  label: string;
  value: ReactNode;
  /** A qualifier shown under the value, e.g. "plus 4 forms". */
  note?: ReactNode;
}

/** Labelled figures as a description list. */
export function StatList({ stats, className }: { stats: Stat[]; className?: string }) {
  return (
    <dl className={cx('grid grid-cols-2 gap-x-4 gap-y-4', className)}>
      {stats.map((stat) => (
        <div key={stat.label} className="min-w-0">
          <dt className="text-sm text-muted">{stat.label}</dt>
          <dd className="text-xl font-bold tabular-nums leading-tight">{stat.value}</dd>
          {stat.note ? <dd className="text-sm text-muted">{stat.note}</dd> : null}
        </div>
      ))}
    </dl>
  );
}
