import cron from 'node-cron';
import { logger } from '../../server/src/logger.ts';
import { enqueueJob } from './queue.ts';
import { housekeepingKey } from './tasks/housekeeping.ts';

/** Cron schedules of the worker process. Each schedule only enqueues: the queue makes it once-only across workers. */
export function startSchedules(): { stop(): void } {
  const enqueueHousekeeping = () =>
    enqueueJob({ kind: 'housekeeping', idempotencyKey: housekeepingKey(new Date()) }).catch((err: unknown) =>
      logger.warn({ err }, 'could not enqueue housekeeping'),
    );
  const tasks = [cron.schedule('30 3 * * *', enqueueHousekeeping, { timezone: 'UTC', name: 'housekeeping' })];
  void enqueueHousekeeping();
  return { stop: () => tasks.forEach((t) => void t.stop()) };
}
