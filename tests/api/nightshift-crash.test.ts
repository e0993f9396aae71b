import { spawn, type ChildProcess } from 'node:child_process';
import sharp from 'sharp';
import { QueryTypes, type Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { projectRoot, type AppConfig } from '../../server/src/config.ts';
import { Embedding, Example, Item, Run, Suggestion } from '../../server/src/models/index.ts';
import { embedStoredFile, processEmbedder } from '../../server/src/services/features.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { startRun, type RunReport } from '../../server/src/services/runs.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { synthesizeSubjectModel } from '../../server/src/services/subject-models.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';

let sequelize: Sequelize;
let config: AppConfig;
const children: ChildProcess[] = [];

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  await resetDatabase(sequelize);
});
afterAll(async () => {
  for (const c of children) if (c.exitCode === null) c.kill('SIGKILL');
  await sequelize?.close();
});

/** A real worker process (the one `npm start` runs), with a short lease so a dead worker's job is taken over quickly. */
function startWorker(): ChildProcess {
  // node itself with tsx's loader: one process, so SIGKILL really kills the worker (the tsx launcher would leave its child running)
  const child = spawn(process.execPath, ['--import', 'tsx', 'jobs/src/index.ts'], {
    cwd: projectRoot,
    env: { ...process.env, NODE_ENV: 'test', CARTOUCHE_DB_NAME: config.db.name, CARTOUCHE_STORAGE_DIR: config.storageDir, CARTOUCHE_EMBED_THREADS: '1', CARTOUCHE_JOB_LEASE_MS: '4000', CARTOUCHE_WORKER_HEARTBEAT_MS: '1000', CARTOUCHE_WORKER_POLL_MS: '200', CARTOUCHE_LOG_LEVEL: 'silent' },
    stdio: 'ignore',
  });
  children.push(child);
  return child;
}

async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, ms: number): Promise<T> {
  const deadline = Date.now() + ms;
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

describe('the night shift survives a killed worker', () => {
  it('a run whose worker is killed with SIGKILL mid-embedding is finished by the next worker, with nothing duplicated', async () => {
    const c = await makeCollection();
    // this test is about embedding after a crash: reading text (nightshift.test.ts) is turned off by the setting
    await c.update({ readText: false });
    const storage = new Storage(config.storageDir);
    const deps = { sequelize, storage, limits: intakeLimits({}) };
    const N = 120;
    for (let i = 0; i < N; i++) {
      const png = await sharp({ create: { width: 256, height: 192, channels: 3, background: '#808080', noise: { type: 'gaussian', mean: 90 + (i % 60), sigma: 40 } } }).png().toBuffer();
      const out = await ingestFile(deps, { collectionId: c.id, fileName: `scan-${i}.png`, source: { buffer: png }, origin: 'upload' });
      expect(out.outcome).toBe('ingested');
    }
    const subject = await makeSubject(c, { prefLabel: 'noise' });
    const embedder = await processEmbedder();
    const exKey = await storage.put(await sharp({ create: { width: 256, height: 192, channels: 3, background: '#808080', noise: { type: 'gaussian', mean: 120, sigma: 40 } } }).png().toBuffer());
    const ex = await Example.create({ subjectId: subject.id, medium: 'photo', origin: 'uploaded', fileKey: exKey, itemId: null, createdBy: null });
    await embedStoredFile(embedder, storage, { type: 'example', id: ex.id }, exKey);
    await synthesizeSubjectModel(sequelize, embedder, subject.id, { mode: 'from-examples' }, null);

    const run = await startRun(sequelize, c.id, 'manual', null);
    const first = startWorker();
    // wait until the first worker is part-way through embedding, then kill it without warning
    await until('embedding to start', async () => (await Embedding.count({ where: { ownerType: 'item' } })) >= 10, 120_000);
    first.kill('SIGKILL');
    await new Promise((r) => first.once('exit', r));
    const partial = await Embedding.count({ where: { ownerType: 'item' } });
    expect(partial).toBeLessThan(N);
    // the killed worker is gone: nothing moves until another worker comes
    await new Promise((r) => setTimeout(r, 2500));
    expect(await Embedding.count({ where: { ownerType: 'item' } })).toBe(partial);
    expect((await Run.findByPk(run.id))?.status).toBe('running');

    startWorker();
    const done = await until('the run to succeed', async () => {
      const r = await Run.findByPk(run.id);
      return r && (r.status === 'succeeded' || r.status === 'failed') ? r : null;
    }, 180_000);
    expect(done.status).toBe('succeeded');
    const report = done.report as unknown as RunReport;
    expect(report.stages.embed.state).toBe('done');
    // every item has exactly one feature, no item was made twice
    expect(await Item.count({ where: { collectionId: c.id } })).toBe(N);
    const perItem = await sequelize.query<{ n: number }>(
      "SELECT COUNT(*) AS n FROM embeddings WHERE owner_type = 'item' GROUP BY owner_id HAVING COUNT(*) <> 1",
      { type: QueryTypes.SELECT },
    );
    expect(perItem).toEqual([]);
    expect(await Embedding.count({ where: { ownerType: 'item' } })).toBe(N);
    // and exactly the suggestions it should have: the ranked list of the model, once per item
    const proposed = await Suggestion.count({ where: { subjectId: subject.id, state: 'proposed' } });
    expect(proposed).toBe((done.counts as { suggested: number }).suggested);
    expect(proposed).toBeGreaterThan(0);
    const dup = await sequelize.query('SELECT item_id FROM suggestions GROUP BY item_id, subject_id HAVING COUNT(*) > 1', { type: QueryTypes.SELECT });
    expect(dup).toEqual([]);
  }, 300_000);
});
