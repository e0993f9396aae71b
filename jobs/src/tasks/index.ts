import type { TaskHandler } from '../worker.ts';
import { housekeeping } from './housekeeping.ts';

/** Every job kind the night shift knows, by name. */
export const tasks: Record<string, TaskHandler> = {
  housekeeping,
};
