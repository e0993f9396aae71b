// The night-shift worker process: one per machine (or several), sharing the jobs table of one database.
import { loadConfig } from '../../server/src/config.ts';
import { openDatabase } from '../../server/src/db/index.ts';
import { logger } from '../../server/src/logger.ts';
import { EmbeddingPool } from './embed-pool.ts';
import { startSchedules } from './schedule.ts';
import { createTasks } from './tasks/index.ts';
import { NightShiftWorker } from './worker.ts';

const config = loadConfig();
const sequelize = openDatabase(config.db, { pool: 4 });
await sequelize.authenticate();
let pool: Promise<EmbeddingPool> | null = null;
const tasks = createTasks({
  config,
  // started on the first run that needs it, then kept: starting the threads and the backbone takes a few seconds
  pool: () => (pool ??= EmbeddingPool.start()),
});
const envMs = (name: string) => (process.env[name] ? Number(process.env[name]) : undefined);
const worker = new NightShiftWorker({
  sequelize,
  tasks,
  leaseMs: envMs('CARTOUCHE_JOB_LEASE_MS'),
  heartbeatMs: envMs('CARTOUCHE_WORKER_HEARTBEAT_MS'),
  pollMs: envMs('CARTOUCHE_WORKER_POLL_MS'),
});
await worker.start();
const schedules = startSchedules();

async function stop(signal: string): Promise<void> {
  logger.info({ signal }, 'worker stopping');
  schedules.stop();
  await worker.stop();
  if (pool) (await pool).dispose();
  await sequelize.close();
  process.exit(0);
}
process.once('SIGINT', () => void stop('SIGINT'));
process.once('SIGTERM', () => void stop('SIGTERM'));
