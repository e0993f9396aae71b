import { execFile } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { promisify } from 'node:util';
import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { createSequelize } from '../../server/src/db/sequelize.ts';
import { ONNX_EMBEDDER_ID, TFJS_EMBEDDER_ID } from '../../server/src/ml/backbone/embedder.ts';
import { WorkerHeartbeat } from '../../server/src/models/index.ts';
import { processEmbedder, stopProcessEmbedder } from '../../server/src/services/features.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';

let sequelize: Sequelize;
let config: AppConfig;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
});
afterAll(async () => {
  await stopProcessEmbedder();
  await sequelize.close();
});
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

describe('GET /api/health: the embedder', () => {
  it('says which embedder is asked for before it is needed, and which runs once it has started', { timeout: 120_000 }, async () => {
    await stopProcessEmbedder();
    const app = createApp({ config: { ...config, embedder: { ...config.embedder, runtime: 'onnx', configFile: null } }, sequelize });
    const idle = await request(app).get('/api/health').expect(200);
    expect(idle.body.embedder).toEqual({ requested: 'onnx', state: 'idle', id: null, runtime: null, fallbackReason: null, agreement: null });
    const embedder = await processEmbedder();
    const ready = await request(app).get('/api/health').expect(200);
    expect(ready.body.embedder.state).toBe('ready');
    expect(ready.body.embedder.id).toBe(embedder.id);
    // this process has onnxruntime-node: the built-in backbone runs on it, checked against TF.js at start
    expect(ready.body.embedder.id).toBe(ONNX_EMBEDDER_ID);
    expect(ready.body.embedder.runtime).toBe('onnx');
    expect(ready.body.embedder.fallbackReason).toBeNull();
    expect(ready.body.embedder.agreement.relativeL2).toBeLessThan(1e-4);
  });

  it('with onnxruntime-node unavailable, the product still embeds (through TF.js) and says why', { timeout: 180_000 }, async () => {
    // a separate process, started with the switch that makes loading onnxruntime-node fail
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-health-'));
    const here = (p: string) => pathToFileURL(fileURLToPath(new URL(p, import.meta.url))).href;
    const script = join(dir, 'fallback.mts');
    const pkg = (name: string) => pathToFileURL(createRequire(import.meta.url).resolve(name)).href;
    writeFileSync(
      script,
      `const { default: request } = await import(${JSON.stringify(pkg('supertest'))});
const { default: sharp } = await import(${JSON.stringify(pkg('sharp'))});
const { createApp } = await import(${JSON.stringify(here('../../server/src/app.ts'))});
const { processEmbedder, stopProcessEmbedder } = await import(${JSON.stringify(here('../../server/src/services/features.ts'))});
const { Embedding } = await import(${JSON.stringify(here('../../server/src/models/index.ts'))});
const { openTestDatabase, resetDatabase } = await import(${JSON.stringify(here('../helpers/db.ts'))});
const { makeCollection, makeSubject } = await import(${JSON.stringify(here('../helpers/fixtures.ts'))});
const { signIn } = await import(${JSON.stringify(here('../helpers/people.ts'))});
const { sequelize, config } = await openTestDatabase();
await resetDatabase(sequelize);
const app = createApp({ config, sequelize });
const archivist = await signIn(app, 'archivist');
const subject = await makeSubject(await makeCollection(), { prefLabel: 'bollard' });
const png = await sharp({ create: { width: 120, height: 90, channels: 3, background: '#4a6072' } }).png().toBuffer();
const added = await archivist.agent.post('/api/subjects/' + subject.id + '/examples').set('x-csrf-token', archivist.csrf).field('medium', 'illustration').attach('files', png, 'bollard.png');
const stored = await Embedding.findAll({ where: { ownerType: 'example' } });
const health = await request(app).get('/api/health');
process.stdout.write(JSON.stringify({ upload: added.status, embedderId: added.body.embedderId, stored: stored.map((e) => e.embedderId), health: health.body.embedder, id: (await processEmbedder()).id }));
await stopProcessEmbedder();
await sequelize.close();
`,
    );
    const tsx = pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href;
    const { stdout } = await promisify(execFile)(process.execPath, ['--import', tsx, script], {
      env: { ...process.env, NODE_ENV: 'test', CARTOUCHE_DISABLE_ONNXRUNTIME: '1', CARTOUCHE_EMBEDDER: 'onnx', CARTOUCHE_LOG_LEVEL: 'silent' },
      maxBuffer: 1 << 20,
      timeout: 170_000,
    });
    const out = JSON.parse(stdout) as { upload: number; embedderId: string; stored: string[]; health: Record<string, unknown>; id: string };
    expect(out.upload).toBe(201);
    expect(out.embedderId).toBe(TFJS_EMBEDDER_ID);
    expect(out.stored).toEqual([TFJS_EMBEDDER_ID]);
    expect(out.health).toMatchObject({ requested: 'onnx', state: 'ready', id: TFJS_EMBEDDER_ID, runtime: 'tfjs', agreement: null });
    expect(out.health.fallbackReason).toMatch(/onnxruntime-node is switched off \(CARTOUCHE_DISABLE_ONNXRUNTIME=1\)/);
  });

  it('reports an embedder that cannot start as failed, and the system as degraded', { timeout: 60_000 }, async () => {
    await stopProcessEmbedder();
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-health-config-'));
    const file = join(dir, 'embedder.json');
    writeFileSync(file, JSON.stringify({ kind: 'onnx', modelPath: join(dir, 'missing.onnx'), inputName: 'x', outputName: 'y', inputSize: 224, id: 'site@1' }));
    const previous = process.env.CARTOUCHE_EMBEDDER_CONFIG;
    process.env.CARTOUCHE_EMBEDDER_CONFIG = file;
    try {
      await heartbeat('w1', 1_000);
      const app = createApp({ config: { ...config, embedder: { ...config.embedder, configFile: file } }, sequelize });
      await expect(processEmbedder()).rejects.toThrow(/missing\.onnx does not exist/);
      const res = await request(app).get('/api/health').expect(200);
      expect(res.body.embedder).toMatchObject({ requested: 'configured model', state: 'failed', id: null });
      expect(res.body.embedder.error).toMatch(/missing\.onnx does not exist/);
      expect(res.body.status).toBe('degraded');
    } finally {
      if (previous === undefined) delete process.env.CARTOUCHE_EMBEDDER_CONFIG;
      else process.env.CARTOUCHE_EMBEDDER_CONFIG = previous;
      await stopProcessEmbedder();
    }
  });
});
