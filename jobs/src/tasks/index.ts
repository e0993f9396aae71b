import { RUN_JOB } from '../../../server/src/services/runs.ts';
import type { TaskHandler } from '../worker.ts';
import { exportTasks } from './export-build.ts';
import { housekeeping } from './housekeeping.ts';
import { nightShiftTask, type NightShiftDeps } from './nightshift.ts';
import { scheduledRun } from './scheduled-run.ts';

/** Every job kind the night shift knows, by name. */
export function createTasks(deps: NightShiftDeps): Record<string, TaskHandler> {
  return {
    housekeeping,
    [RUN_JOB]: nightShiftTask(deps),
    'nightshift-schedule': scheduledRun,
    ...exportTasks(deps),
  };
}
