import { useId, type ReactNode } from 'react';
import { Button } from './button';

/** The inline panel in which a new record (a collection, a subject) is made: its heading, its form, Cancel. */
export function CreatePanel({ title, onCancel, children }: { title: string; onCancel: () => void; children: ReactNode }) {
  const heading = useId();
  return (
    <section aria-labelledby={heading} className="space-y-3 rounded-card border-2 border-line bg-paper p-4">
      <h3 id={heading} className="text-xl font-bold">
        {title}
      </h3>
      {children}
      <Button onClick={onCancel}>Cancel</Button>
    </section>
  );
}
