import cron, { type ScheduledTask } from 'node-cron';
import { Op } from 'sequelize';
import { logger } from '../../server/src/logger.ts';
import { Collection } from '../../server/src/models/index.ts';
import { enqueueJob } from './queue.ts';
import { housekeepingKey } from './tasks/housekeeping.ts';
import { enqueueDueWeeklyLedgers } from './tasks/weekly-ledger.ts';

/** The minute a schedule fired, as part of an idempotency key (every worker's tick of one minute agrees). */
export function slotKey(collectionId: number, at: Date): string {
  return `schedule:${collectionId}:${at.toISOString().slice(0, 16)}`;
}

/**
 * Cron schedules of the worker process: daily housekeeping, and each collection's night shift (its own cron
 * expression and time zone, default 02:00). Schedules only enqueue; the queue makes each once-only across
 * workers. Collections' schedules are re-read every few minutes, so a change in the app takes effect
 * without a restart.
 */
export function startSchedules(opts: { refreshMs?: number } = {}): { stop(): void; refresh(): Promise<void> } {
  const fixed: ScheduledTask[] = [];
  const enqueueHousekeeping = () =>
    enqueueJob({ kind: 'housekeeping', idempotencyKey: housekeepingKey(new Date()) }).catch((err: unknown) => logger.warn({ err }, 'could not enqueue housekeeping'));
  fixed.push(cron.schedule('30 3 * * *', enqueueHousekeeping, { timezone: 'UTC', name: 'housekeeping' }));
  void enqueueHousekeeping();
  // the weekly coverage ledger: each collection's weekday and hour are read in its own time zone every quarter hour
  const enqueueWeekly = () => enqueueDueWeeklyLedgers().catch((err: unknown) => logger.warn({ err }, 'could not enqueue the weekly ledgers'));
  fixed.push(cron.schedule('*/15 * * * *', enqueueWeekly, { timezone: 'UTC', name: 'weekly-ledger' }));
  void enqueueWeekly();

  let perCollection = new Map<string, ScheduledTask>();
  const refresh = async () => {
    const collections = await Collection.findAll({ where: { archivedAt: { [Op.is]: null }, scheduleEnabled: true } });
    const next = new Map<string, ScheduledTask>();
    for (const c of collections) {
      const key = `${c.id}|${c.scheduleCron}|${c.scheduleTimezone}`;
      const existing = perCollection.get(key);
      if (existing) {
        next.set(key, existing);
        continue;
      }
      if (!cron.validate(c.scheduleCron)) {
        logger.warn({ collectionId: c.id, cron: c.scheduleCron }, 'invalid night-shift schedule: not scheduled');
        continue;
      }
      const fire = () => {
        const now = new Date();
        enqueueJob({ kind: 'nightshift-schedule', payload: { collectionId: c.id }, idempotencyKey: slotKey(c.id, now) }).catch((err: unknown) =>
          logger.warn({ err, collectionId: c.id }, 'could not enqueue the scheduled run'),
        );
      };
      next.set(key, cron.schedule(c.scheduleCron, fire, { timezone: c.scheduleTimezone, name: `nightshift-${c.id}` }));
    }
    for (const [key, task] of perCollection) if (!next.has(key)) void task.stop();
    perCollection = next;
  };
  void refresh().catch((err: unknown) => logger.warn({ err }, 'could not read the collections’ schedules'));
  const timer = setInterval(() => void refresh().catch((err: unknown) => logger.warn({ err }, 'schedule refresh failed')), opts.refreshMs ?? 5 * 60_000);
  timer.unref();
  return {
    refresh,
    stop: () => {
      clearInterval(timer);
      for (const t of [...fixed, ...perCollection.values()]) void t.stop();
    },
  };
}
