// The night-shift worker process: one per machine (or several), sharing the jobs table of one database.
import { loadConfig } from '../../server/src/config.ts';
import { openDatabase } from '../../server/src/db/index.ts';
import { logger } from '../../server/src/logger.ts';
import { startSchedules } from './schedule.ts';
import { tasks } from './tasks/index.ts';
import { NightShiftWorker } from './worker.ts';

const config = loadConfig();
const sequelize = openDatabase(config.db, { pool: 4 });
await sequelize.authenticate();
const worker = new NightShiftWorker({ sequelize, tasks });
await worker.start();
const schedules = startSchedules();

async function stop(signal: string): Promise<void> {
  logger.info({ signal }, 'worker stopping');
  schedules.stop();
  await worker.stop();
  await sequelize.close();
  process.exit(0);
}
process.once('SIGINT', () => void stop('SIGINT'));
process.once('SIGTERM', () => void stop('SIGTERM'));
