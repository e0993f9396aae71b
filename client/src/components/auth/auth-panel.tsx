import type { ReactNode } from 'react';
import { Card } from '../ui/card';

/** The frame of the screens before and around signing in: one heading, one sheet, nothing else to do. */
export function AuthPanel({ title, intro, children }: { title: string; intro?: ReactNode; children: ReactNode }) {
  return (
    <>
      <title>{`${title} · Cartouche`}</title>
      <div className="mx-auto w-full max-w-xl space-y-6">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">{title}</h1>
          {intro ? <div className="max-w-prose text-lg text-muted">{intro}</div> : null}
        </div>
        <Card className="space-y-6">{children}</Card>
      </div>
    </>
  );
}
