import type { ReactNode } from 'react';
import { cx } from './cx';

export interface ProblemNoticeProps {
  /** Short summary, e.g. the problem details title. */
  title: string;
  /** What happened, e.g. the problem details detail. */
  detail?: string;
  /** Further lines, e.g. field errors, shown as a list. */
  items?: string[];
  /** A small reference line, e.g. "Status 503". */
  reference?: string;
  /** Heading level of the title within the page outline. */
  headingLevel?: 1 | 2 | 3;
  /** Announce immediately to assistive technology (use for the page's main content only). */
  announce?: boolean;
  action?: ReactNode;
  className?: string;
  /** For linking the notice to the fields it concerns (aria-describedby). */
  id?: string;
}

/** A calm, unmistakable notice that something did not work, with what to do next. */
export function ProblemNotice({
  title,
  detail,
  items,
  reference,
  headingLevel = 2,
  announce = false,
  action,
  className,
  id,
}: ProblemNoticeProps) {
  const Heading = (['h1', 'h2', 'h3'] as const)[headingLevel - 1] ?? 'h2';
  return (
    <div
      id={id}
      role={announce ? 'alert' : undefined}
      className={cx('rounded-card border-2 border-ink border-l-[6px] bg-raised p-5 sm:p-6', className)}
    >
      <p className="text-sm font-bold uppercase tracking-wider text-muted">Problem</p>
      <Heading className={cx('mt-1 font-bold', headingLevel === 1 ? 'text-2xl sm:text-3xl' : 'text-xl')}>{title}</Heading>
      {detail ? <p className="mt-2 max-w-prose">{detail}</p> : null}
      {items && items.length > 0 ? (
        <ul className="mt-2 list-disc space-y-1 pl-6">
          {items.map((item) => (
            <li key={item}>{item}</li>
          ))}
        </ul>
      ) : null}
      {reference ? <p className="mt-2 text-sm text-muted">{reference}</p> : null}
      {action ? <div className="mt-4 flex flex-wrap gap-3">{action}</div> : null}
    </div>
  );
}
