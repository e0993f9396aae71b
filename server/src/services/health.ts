import { Op, type Sequelize } from 'sequelize';
import type { EmbedderSelection, EmbedderStatus } from '../ml/index.ts';
import { WorkerHeartbeat } from '../models/index.ts';
import type { EmbedderHealth } from '../../../common/api/health.ts';

export type { EmbedderHealth };

/** Shapes the embedder part of the report from the settings and the process embedder's state. */
export function embedderHealth(selection: EmbedderSelection, current: { state: EmbedderHealth['state']; status?: EmbedderStatus; error?: string }): EmbedderHealth {
  const s = current.status;
  return {
    requested: selection.configFile ? 'configured model' : selection.runtime,
    state: current.state,
    id: s?.id ?? null,
    runtime: s?.runtime ?? null,
    fallbackReason: s?.fallbackReason ?? null,
    agreement: s?.verification ? { relativeL2: s.verification.relativeL2, maxAbs: s.verification.maxAbs, lowestCosine: s.verification.lowestCosine } : null,
    ...(current.error ? { error: current.error } : {}),
  };
}

export interface HealthReport {
  status: 'ok' | 'degraded';
  version: string;
  database: { ok: boolean; latencyMs: number | null; error?: string };
  worker: { state: 'running' | 'stale' | 'absent'; lastHeartbeatAt: string | null; count: number };
  embedder: EmbedderHealth;
}

/** Checks the database with a round trip, reads the night-shift workers' heartbeats, and reports the embedder. */
export async function getHealth(sequelize: Sequelize, opts: { version: string; workerStaleAfterMs: number; embedder: EmbedderHealth; now?: Date }): Promise<HealthReport> {
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
      embedder: opts.embedder,
    };
  }
  const latencyMs = Math.round((performance.now() - started) * 10) / 10;
  const live = await WorkerHeartbeat.findAll({ where: { stoppedAt: { [Op.is]: null } }, order: [['heartbeatAt', 'DESC']] });
  const fresh = live.filter((w) => now.getTime() - w.heartbeatAt.getTime() <= opts.workerStaleAfterMs);
  const last = live[0]?.heartbeatAt ?? null;
  const state = fresh.length > 0 ? 'running' : live.length > 0 ? 'stale' : 'absent';
  return {
    // a fallback to TF.js is slower, not broken; an embedder that cannot start is
    status: state === 'running' && opts.embedder.state !== 'failed' ? 'ok' : 'degraded',
    version: opts.version,
    database: { ok: true, latencyMs },
    worker: { state, lastHeartbeatAt: last ? last.toISOString() : null, count: fresh.length },
    embedder: opts.embedder,
  };
}
