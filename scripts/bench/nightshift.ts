// npm run bench:nightshift -- [N=120] [threads=1,2]
// Generates N large scans (3000×2000 JPEG), drops them in a collection's drop folder and runs the night shift
// (ingest → embed → retrain → suggest → digest) through the real worker code against the project's MariaDB,
// once per embedding-thread count. Prints scans/s overall and per stage, and peak RSS. The bench collection,
// its files and its storage are removed afterwards. Needs MariaDB running: `node scripts/bootstrap.mjs db`.
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { EmbeddingPool } from '../../jobs/src/embed-pool.ts';
import { createTasks } from '../../jobs/src/tasks/index.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { loadConfig } from '../../server/src/config.ts';
import { openDatabase } from '../../server/src/db/index.ts';
import { Collection, Example, Run, Subject } from '../../server/src/models/index.ts';
import { embedStoredFile } from '../../server/src/services/features.ts';
import { startRun, type STAGES, type RunReport } from '../../server/src/services/runs.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { synthesizeSubjectModel } from '../../server/src/services/subject-models.ts';
import { buildDemoScenario, renderItemImage } from '../demo/index.ts';

const N = Number(process.argv[2] ?? 120);
const threadCounts = (process.argv[3] ?? '1,2').split(',').map(Number);
const benchDir = join(loadConfig().dataDir, 'bench-nightshift');
const config = { ...loadConfig({ ...process.env, CARTOUCHE_STORAGE_DIR: join(benchDir, 'storage') }), mailDir: join(benchDir, 'mail') };
// no mail server during a bench: the digest goes to a mailer that only counts
const mailer = { sent: 0, async send() { this.sent++; return { messageId: 'bench' }; } };
const sequelize = openDatabase(config.db, { pool: 4 });
const storage = new Storage(config.storageDir);

async function makeScans(dir: string): Promise<void> {
  mkdirSync(dir, { recursive: true });
  const plates = buildDemoScenario().collections[0]!;
  const bases = await Promise.all(plates.items.slice(0, 4).map(async (it) => (await renderItemImage(it, plates.medium, { width: 3000, height: 2000 })).data));
  for (let i = 0; i < N; i++) {
    const jpeg = await sharp(bases[i % bases.length]!).resize(3000, 2000, { fit: 'fill' }).modulate({ brightness: 1 + (i % 97) / 1000, hue: i % 7 }).jpeg({ quality: 88 }).toBuffer();
    writeFileSync(join(dir, `bench-${String(i).padStart(5, '0')}.jpg`), jpeg);
  }
}

async function once(threads: number): Promise<Record<string, string | number>> {
  const drop = join(benchDir, `drop-${threads}`);
  rmSync(drop, { recursive: true, force: true });
  const t0 = performance.now();
  await makeScans(drop);
  const genS = (performance.now() - t0) / 1000;
  const collection = await Collection.create({ slug: `bench-${threads}-${Date.now()}`, name: `Night-shift bench (${threads} thread${threads > 1 ? 's' : ''})`, description: 'Made by npm run bench:nightshift; removed at the end.', medium: 'engraving', houseStyle: '', dropFolder: drop, archivedAt: null, scheduleEnabled: false });
  const pool = await EmbeddingPool.start(threads);
  try {
    // one subject with two examples and a model, so the suggest stage has work
    const subject = await Subject.create({ collectionId: collection.id, broaderId: null, kind: 'subject', prefLabel: 'bench subject', altLabels: [], notation: null, scopeNote: null, altTextPhrase: null, conceptUri: null, status: 'active' });
    const { createEmbedder } = await import('../../server/src/ml/index.ts');
    const embedder = await createEmbedder();
    const plates = buildDemoScenario().collections[0]!;
    for (const it of plates.items.slice(10, 12)) {
      const key = await storage.put((await renderItemImage(it, plates.medium, { width: 600 })).data);
      const ex = await Example.create({ subjectId: subject.id, medium: 'illustration', origin: 'uploaded', fileKey: key, itemId: null, createdBy: null });
      await embedStoredFile(embedder, storage, { type: 'example', id: ex.id }, key);
    }
    await synthesizeSubjectModel(sequelize, embedder, subject.id, { mode: 'from-examples' }, null);
    embedder.dispose();

    let peak = process.memoryUsage().rss;
    const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 100);
    const run = await startRun(sequelize, collection.id, 'manual', null);
    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool, mailer }) });
    const start = performance.now();
    await worker.runOnce();
    const totalS = (performance.now() - start) / 1000;
    clearInterval(sampler);
    const done = await Run.findByPk(run.id);
    const report = done!.report as unknown as RunReport;
    const stageS = (s: (typeof STAGES)[number]) => {
      const st = report.stages[s];
      return st.startedAt && st.finishedAt ? (Date.parse(st.finishedAt) - Date.parse(st.startedAt)) / 1000 : 0;
    };
    const row: Record<string, string | number> = { threads, scans: N, status: done!.status, 'generate s': genS.toFixed(1), 'total s': totalS.toFixed(1), 'scans/s': (N / totalS).toFixed(2) };
    for (const s of ['ingest', 'embed', 'suggest'] as const) row[`${s} scans/s`] = stageS(s) > 0 ? (N / stageS(s)).toFixed(2) : '-';
    row['retrain s'] = stageS('retrain').toFixed(2);
    row['peak RSS MB'] = Math.round(peak / 1e6);
    return row;
  } finally {
    pool.dispose();
    await collection.destroy();
    rmSync(drop, { recursive: true, force: true });
  }
}

try {
  await sequelize.authenticate();
  const rows = [];
  for (const t of threadCounts) rows.push(await once(t));
  console.table(rows);
} finally {
  rmSync(benchDir, { recursive: true, force: true });
  await sequelize.close();
}
