import { ProblemNotice } from './problem-notice';

interface FormErrorsProps {
  /** links the notice to the fields it concerns (their aria-describedby) */
  id: string;
  /** what the server refused, if anything: shown as a notice and announced */
  problem: { title: string; detail?: string } | null;
  /** further lines of the refusal that belong to no field */
  items?: string[];
  headingLevel?: 1 | 2 | 3;
  /** without a refusal to show: words to announce once, e.g. the field errors found before sending */
  alert?: string | undefined;
}

/** The top of a form: the server's refusal, or an announcement of the field errors shown beside the fields. */
export function FormErrors({ id, problem, items, headingLevel = 2, alert }: FormErrorsProps) {
  if (problem) {
    return (
      <ProblemNotice
        id={id}
        announce
        headingLevel={headingLevel}
        title={problem.title}
        detail={problem.detail}
        items={items && items.length > 0 ? items : undefined}
      />
    );
  }
  if (alert) {
    return (
      <p role="alert" className="sr-only">
        {alert}
      </p>
    );
  }
  return null;
}
