import { Op } from 'sequelize';
import { logger } from '../../../server/src/logger.ts';
import { Collection, Job } from '../../../server/src/models/index.ts';
import { WEEKLY_JOB, isDue, ledgerMailSettings, weeklyKey } from '../../../server/src/services/exports/weekly.ts';
import { enqueueJob } from '../queue.ts';

/**
 * One tick of the weekly-ledger schedule (every worker runs it every quarter hour): for each collection
 * whose mail is due now in its own time zone, enqueue the week's ledger job. The idempotency key names the
 * collection and the ISO week, so however many workers tick, each collection's managers get one mail a week.
 */
/** Returns how many jobs it enqueued that were not there yet. */
export async function enqueueDueWeeklyLedgers(now = new Date()): Promise<number> {
  let enqueued = 0;
  const collections = await Collection.findAll({ where: { archivedAt: { [Op.is]: null } } });
  for (const c of collections) {
    const settings = await ledgerMailSettings(c);
    if (!isDue(now, settings)) continue;
    const idempotencyKey = weeklyKey(c.id, now, settings.timeZone);
    if (await Job.count({ where: { idempotencyKey } })) continue; // this week's is already there
    await enqueueJob({ kind: WEEKLY_JOB, payload: { collectionId: c.id, at: now.toISOString() }, idempotencyKey, maxAttempts: 4 });
    enqueued++;
  }
  if (enqueued) logger.info({ enqueued }, 'weekly ledgers enqueued');
  return enqueued;
}
