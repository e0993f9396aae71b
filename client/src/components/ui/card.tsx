import type { HTMLAttributes, ReactNode } from 'react';
import { cx } from './cx';

export interface CardProps extends HTMLAttributes<HTMLElement> {
  as?: 'article' | 'section' | 'div' | 'li';
  children: ReactNode;
}

/** A raised paper sheet. The border is decoration; content inside carries its own structure. */
export function Card({ as: Element = 'div', className, children, ...rest }: CardProps) {
  return (
    <Element
      className={cx('rounded-card border border-rule bg-raised p-5 shadow-[0_1px_0_var(--color-rule)] sm:p-6', className)}
      {...rest}
    >
      {children}
    </Element>
  );
}
