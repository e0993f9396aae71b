import { useId, type InputHTMLAttributes, type ReactNode, type Ref, type SelectHTMLAttributes, type TextareaHTMLAttributes } from 'react';
import { cx } from './cx';

/** Shared look of text inputs and selects: 44 px tall, a 3:1 boundary, the shared focus ring. */
export const controlClass = cx(
  'block min-h-11 w-full rounded-control border-2 border-line bg-raised px-3 py-2 text-base text-ink',
  'hover:border-ink aria-invalid:border-ink aria-invalid:border-l-[6px]',
  'disabled:cursor-not-allowed disabled:bg-sunk',
);

interface FieldFrameProps {
  id: string;
  label: ReactNode;
  hint?: ReactNode;
  hintId: string;
  error?: string | undefined;
  errorId: string;
  children: ReactNode;
  className?: string | undefined;
}

function FieldFrame({ id, label, hint, hintId, error, errorId, children, className }: FieldFrameProps) {
  return (
    <div className={cx('space-y-1.5', className)}>
      <label htmlFor={id} className="block font-bold">
        {label}
      </label>
      {hint ? (
        <p id={hintId} className="text-sm text-muted">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={errorId} className="flex items-start gap-1.5 font-bold">
          <ErrorGlyph />
          <span>
            <span className="sr-only">Error: </span>
            {error}
          </span>
        </p>
      ) : null}
      {children}
    </div>
  );
}

/** A small crossed circle: repeats "error" for the eye; the words carry it. */
export function ErrorGlyph() {
  return (
    <svg viewBox="0 0 16 16" width="16" height="16" aria-hidden="true" focusable="false" className="mt-1 shrink-0">
      <circle cx="8" cy="8" r="6.5" fill="currentColor" />
      <path d="M5.5 5.5l5 5M10.5 5.5l-5 5" stroke="var(--color-raised)" strokeWidth="1.75" strokeLinecap="round" />
    </svg>
  );
}

function describedBy(...ids: Array<string | false | undefined | null>): string | undefined {
  const joined = ids.filter(Boolean).join(' ');
  return joined === '' ? undefined : joined;
}

/** What every field shares: a label, an optional hint and an optional error, both read with the control. */
interface FieldShellProps {
  label: ReactNode;
  hint?: ReactNode;
  /** The field's own error, shown above the control and linked to it. */
  error?: string | undefined;
  /** Ids of further descriptions, e.g. a form-level error that concerns this field. */
  describedByIds?: string | undefined;
  fieldClassName?: string;
}

/** Ids and ARIA wiring for one field: the frame's props and the attributes its control needs. */
function useFieldShell({ label, hint, error, describedByIds, fieldClassName }: FieldShellProps, invalid?: unknown) {
  const id = useId();
  const hintId = `${id}-hint`;
  const errorId = `${id}-error`;
  return {
    frame: { id, label, hint, hintId, error, errorId, className: fieldClassName },
    control: {
      id,
      'aria-invalid': error || invalid ? (true as const) : undefined,
      'aria-describedby': describedBy(error ? errorId : null, hint ? hintId : null, describedByIds),
    },
  };
}

export interface TextFieldProps extends Omit<InputHTMLAttributes<HTMLInputElement>, 'id'>, FieldShellProps {
  ref?: Ref<HTMLInputElement>;
}

/** A labelled input with an optional hint and error, both read with the field. */
export function TextField({ label, hint, error, describedByIds, fieldClassName, className, ref, 'aria-invalid': ariaInvalid, ...input }: TextFieldProps) {
  const { frame, control } = useFieldShell({ label, hint, error, describedByIds, fieldClassName }, ariaInvalid);
  return (
    <FieldFrame {...frame}>
      <input ref={ref} {...control} className={cx(controlClass, className)} {...input} />
    </FieldFrame>
  );
}

export interface TextAreaFieldProps extends Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, 'id'>, FieldShellProps {
  ref?: Ref<HTMLTextAreaElement>;
}

/** A labelled multi-line text box (descriptions, notes), wired like TextField. */
export function TextAreaField({ label, hint, error, describedByIds, fieldClassName, className, ref, 'aria-invalid': ariaInvalid, ...textarea }: TextAreaFieldProps) {
  const { frame, control } = useFieldShell({ label, hint, error, describedByIds, fieldClassName }, ariaInvalid);
  return (
    <FieldFrame {...frame}>
      <textarea ref={ref} rows={4} {...control} className={cx(controlClass, 'min-h-24 leading-relaxed', className)} {...textarea} />
    </FieldFrame>
  );
}

export interface SelectFieldProps extends Omit<SelectHTMLAttributes<HTMLSelectElement>, 'id'>, FieldShellProps {
  ref?: Ref<HTMLSelectElement>;
}

/** A labelled native select. */
export function SelectField({ label, hint, error, describedByIds, fieldClassName, className, children, ref, 'aria-invalid': ariaInvalid, ...select }: SelectFieldProps) {
  const { frame, control } = useFieldShell({ label, hint, error, describedByIds, fieldClassName }, ariaInvalid);
  return (
    <FieldFrame {...frame}>
      <select ref={ref} {...control} className={cx(controlClass, 'pr-8', className)} {...select}>
        {children}
      </select>
    </FieldFrame>
  );
}
