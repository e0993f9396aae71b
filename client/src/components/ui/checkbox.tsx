import { useId, type InputHTMLAttributes, type ReactNode } from 'react';
import { cx } from './cx';

export interface CheckboxProps extends Omit<InputHTMLAttributes<HTMLInputElement>, 'id' | 'type'> {
  label: ReactNode;
}

/** A native checkbox whose label makes the whole target at least 44 px tall. */
export function Checkbox({ label, className, ...input }: CheckboxProps) {
  const id = useId();
  return (
    <div className={cx('flex', className)}>
      <label htmlFor={id} className="inline-flex min-h-11 cursor-pointer items-center gap-2.5 pr-2">
        <input id={id} type="checkbox" className="size-5 shrink-0 accent-accent" {...input} />
        <span>{label}</span>
      </label>
    </div>
  );
}
