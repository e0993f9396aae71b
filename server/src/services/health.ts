import { Op, type Sequelize } from 'sequelize';
import { WorkerHeartbeat } from '../models/index.ts';

export interface HealthReport {
  status: 'ok' | 'degraded';
  version: string;
  database: { ok: boolean; latencyMs: number | null; error?: string };
  worker: { state: 'running' | 'stale' | 'absent'; lastHeartbeatAt: string | null; count: number };
}

/** Checks the database with a round trip and reads the night-shift workers' heartbeats. */
export async function getHealth(sequelize: Sequelize, opts: { version: string; workerStaleAfterMs: number; now?: Date }): Promise<HealthReport> {
  const now = opts.now ?? new Date();
  const started = performance.now();
  try {
    await sequelize.query('SELECT 1');
  } catch (err) {
    return {
      status: 'degraded',
      version: opts.version,
      database: { ok: false, latencyMs: null, error: err instanceof Error ? err.message : String(err) },
      worker: { state: 'absent', lastHeartbeatAt: null, count: 0 },
    };
  }
  const latencyMs = Math.round((performance.now() - started) * 10) / 10;
  const live = await WorkerHeartbeat.findAll({ where: { stoppedAt: { [Op.is]: null } }, order: [['heartbeatAt', 'DESC']] });
  const fresh = live.filter((w) => now.getTime() - w.heartbeatAt.getTime() <= opts.workerStaleAfterMs);
  const last = live[0]?.heartbeatAt ?? null;
  const state = fresh.length > 0 ? 'running' : live.length > 0 ? 'stale' : 'absent';
  return {
    status: state === 'running' ? 'ok' : 'degraded',
    version: opts.version,
    database: { ok: true, latencyMs },
    worker: { state, lastHeartbeatAt: last ? last.toISOString() : null, count: fresh.length },
  };
}
