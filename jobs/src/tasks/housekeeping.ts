import { Op, QueryTypes } from 'sequelize';
import { WorkerHeartbeat } from '../../../server/src/models/index.ts';
import type { TaskHandler } from '../worker.ts';

const DAY = 86_400_000;

/**
 * Daily housekeeping: forgets heartbeats of workers that stopped (or went silent) more than a week ago and
 * deletes expired sign-in sessions. Idempotent: running it twice removes nothing more.
 */
export const housekeeping: TaskHandler = async (_job, { sequelize }) => {
  const cutoff = new Date(Date.now() - 7 * DAY);
  const heartbeats = await WorkerHeartbeat.destroy({ where: { heartbeatAt: { [Op.lt]: cutoff } } });
  const sessions = await sequelize.query('DELETE FROM sessions WHERE expires IS NOT NULL AND expires < UTC_TIMESTAMP()', {
    type: QueryTypes.BULKDELETE,
  });
  return { heartbeatsRemoved: heartbeats, sessionsRemoved: Number(sessions) };
};

/** The idempotency key that makes one housekeeping job per UTC day, however many workers schedule it. */
export function housekeepingKey(day: Date): string {
  return `housekeeping:${day.toISOString().slice(0, 10)}`;
}
