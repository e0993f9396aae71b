import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { createSequelize } from '../../server/src/db/sequelize.ts';
import { WorkerHeartbeat } from '../../server/src/models/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';

let sequelize: Sequelize;
let config: AppConfig;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

async function heartbeat(workerId: string, ageMs: number, stopped = false) {
  const at = new Date(Date.now() - ageMs);
  await WorkerHeartbeat.create({ workerId, hostname: 'test', pid: 1, startedAt: at, heartbeatAt: at, stoppedAt: stopped ? at : null, currentJobId: null });
}

describe('GET /api/health', () => {
  it('reports the database and no worker when none has ever beaten', async () => {
    const res = await request(createApp({ config, sequelize })).get('/api/health').expect(200);
    expect(res.headers['cache-control']).toBe('no-store');
    expect(res.body.database.ok).toBe(true);
    expect(typeof res.body.database.latencyMs).toBe('number');
    expect(res.body.worker).toEqual({ state: 'absent', lastHeartbeatAt: null, count: 0 });
    expect(res.body.status).toBe('degraded');
    expect(res.body.version).toMatch(/^\d+\.\d+\.\d+/);
  });

  it('reports running workers from fresh heartbeats only', async () => {
    await heartbeat('w1', 1_000);
    await heartbeat('w2', 5_000);
    await heartbeat('w3', config.workerStaleAfterMs + 60_000);
    const res = await request(createApp({ config, sequelize })).get('/api/health').expect(200);
    expect(res.body.status).toBe('ok');
    expect(res.body.worker.state).toBe('running');
    expect(res.body.worker.count).toBe(2);
    expect(Date.now() - Date.parse(res.body.worker.lastHeartbeatAt)).toBeLessThan(10_000);
  });

  it('calls a silent worker stale and a stopped one absent', async () => {
    await heartbeat('silent', config.workerStaleAfterMs + 1_000);
    await heartbeat('gone', 500, true);
    const res = await request(createApp({ config, sequelize })).get('/api/health').expect(200);
    expect(res.body.worker.state).toBe('stale');
    expect(res.body.worker.count).toBe(0);
    expect(res.body.status).toBe('degraded');
  });

  it('answers 503 with the reason when the database is unreachable', async () => {
    const broken = createSequelize({ ...config.db, port: 1 });
    try {
      const res = await request(createApp({ config, sequelize: broken })).get('/api/health').expect(503);
      expect(res.body.database.ok).toBe(false);
      expect(res.body.database.error).toMatch(/connect|ECONNREFUSED/i);
    } finally {
      await broken.close();
    }
  });
});
