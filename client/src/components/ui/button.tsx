import type { ButtonHTMLAttributes, Ref } from 'react';
import { cx } from './cx';

type Variant = 'primary' | 'secondary';

export interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: Variant;
  ref?: Ref<HTMLButtonElement>;
}

const variants: Record<Variant, string> = {
  primary:
    'border-accent bg-accent text-on-accent hover:border-accent-strong hover:bg-accent-strong disabled:hover:bg-accent',
  secondary: 'border-line bg-raised text-ink hover:border-ink hover:bg-sunk disabled:hover:bg-raised',
};

/** A button at least 44 × 44 px, with the shared focus ring. */
export function Button({ variant = 'secondary', type = 'button', className, ...rest }: ButtonProps) {
  return (
    <button
      type={type}
      className={cx(
        'inline-flex min-h-11 min-w-11 items-center justify-center gap-2 rounded-control border-2 px-4 py-2',
        'font-bold leading-tight transition-colors duration-150',
        'disabled:cursor-not-allowed disabled:opacity-70 aria-disabled:cursor-progress',
        variants[variant],
        className,
      )}
      {...rest}
    />
  );
}
