import type { ProblemDetails } from '../api/http';

/**
 * Splits a problem's field errors into those a form shows beside one of its fields and the rest.
 * `fields` maps the server's field path (e.g. "password") to the form's own field name.
 */
export function splitFieldErrors<F extends string>(
  problem: ProblemDetails | null,
  fields: Record<string, F>,
): { byField: Partial<Record<F, string>>; other: string[] } {
  const byField: Partial<Record<F, string>> = {};
  const other: string[] = [];
  for (const entry of problem?.errors ?? []) {
    const key = entry.path ?? entry.pointer?.replace(/^\/+/, '').replace(/\//g, '.');
    const field = key === undefined ? undefined : fields[key];
    if (field !== undefined && byField[field] === undefined) byField[field] = entry.detail;
    else other.push(entry.detail);
  }
  return { byField, other };
}
