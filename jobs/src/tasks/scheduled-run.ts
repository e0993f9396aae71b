import { HttpProblem } from '../../../server/src/http/problem.ts';
import { startRun } from '../../../server/src/services/runs.ts';
import type { TaskHandler } from '../worker.ts';

/**
 * A collection's schedule fired: start its run unless one is already under way. Enqueued with the
 * idempotency key `schedule:<collection>:<minute>`, so however many workers' clocks fire, one run starts.
 */
export const scheduledRun: TaskHandler = async (job, { sequelize }) => {
  const collectionId = Number(job.payload.collectionId);
  try {
    const run = await startRun(sequelize, collectionId, 'schedule', null);
    return { runId: run.id };
  } catch (err) {
    if (err instanceof HttpProblem && err.status === 409) return { skipped: err.message };
    throw err;
  }
};
