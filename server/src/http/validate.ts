import type { z } from 'zod';
import { fromZodError } from './problem.ts';

/** Parses one part of a request with a zod schema; failures become a 400 problem that names each bad field. */
export function parse<S extends z.ZodType>(schema: S, value: unknown, where: 'query' | 'body' | 'path'): z.output<S> {
  const result = schema.safeParse(value);
  if (!result.success) throw fromZodError(result.error, where === 'path' ? 'address' : `request ${where}`);
  return result.data;
}
