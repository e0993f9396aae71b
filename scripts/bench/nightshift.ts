// npm run bench:nightshift -- [N=120] [threads=1,2]
// Generates N large scans (3000×2000 JPEG), drops them in a collection's drop folder and runs the night shift
// (ingest with embedding overlapping it → embed catch-up → retrain → suggest → digest) through the real worker
// code against MariaDB (the database CARTOUCHE_DB_NAME names), once per embedding-thread count. Prints, per
// thread count: seconds per stage (ingest and embed overlap, so their sum exceeds the total), scans/s end to
// end, CPU seconds used by the process (all threads) against wall time, MariaDB's CPU per scan, peak RSS, and the machine's load
// average before and after (the machine may be shared). The embedder is the configured one
// (CARTOUCHE_EMBEDDER / CARTOUCHE_EMBEDDER_CONFIG); its id is printed. The bench collection, its files and its
// storage are removed afterwards. Needs MariaDB running: `node scripts/bootstrap.mjs db`.
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { loadavg } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { EmbeddingPool } from '../../jobs/src/embed-pool.ts';
import { createTasks } from '../../jobs/src/tasks/index.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { loadConfig } from '../../server/src/config.ts';
import { openDatabase } from '../../server/src/db/index.ts';
import { Collection, Example, Run, Subject } from '../../server/src/models/index.ts';
import { embedStoredFile, processEmbedder } from '../../server/src/services/features.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { DEFAULT_SIZES, makeDerivatives } from '../../server/src/services/ingest/derivatives.ts';
import { startRun, type STAGES, type RunReport } from '../../server/src/services/runs.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { synthesizeSubjectModel } from '../../server/src/services/subject-models.ts';
import { buildDemoScenario, renderItemImage } from '../demo/index.ts';

const N = Number(process.argv[2] ?? 120);
const threadCounts = (process.argv[3] ?? '1,2').split(',').map(Number);
// one folder per bench process, so two benches on one machine never share files
const benchDir = join(loadConfig().dataDir, `bench-nightshift-${process.pid}`);
const config = { ...loadConfig({ ...process.env, CARTOUCHE_STORAGE_DIR: join(benchDir, 'storage') }), mailDir: join(benchDir, 'mail') };
// no mail server during a bench: the digest goes to a mailer that only counts
const mailer = { sent: 0, async send() { this.sent++; return { messageId: 'bench' }; } };
const sequelize = openDatabase(config.db, { pool: 4 });
const storage = new Storage(config.storageDir);

/** CPU seconds the MariaDB server has used so far (its process found by name under /proc), or null when not found. */
function mariadbCpuS(): number | null {
  for (const pid of readdirSync('/proc').filter((d) => /^\d+$/.test(d))) {
    try {
      const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
      if (!/\((mariadbd|mysqld)\)/.test(stat)) continue;
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      return (Number(fields[11]) + Number(fields[12])) / 100; // utime + stime, in clock ticks of 1/100 s
    } catch {
      // a process that ended while it was read
    }
  }
  return null;
}

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
    // the configured embedder, the same one the pool runs
    const embedder = await processEmbedder();
    const plates = buildDemoScenario().collections[0]!;
    for (const it of plates.items.slice(10, 12)) {
      const key = await storage.put((await renderItemImage(it, plates.medium, { width: 600 })).data);
      const ex = await Example.create({ subjectId: subject.id, medium: 'illustration', origin: 'uploaded', fileKey: key, itemId: null, createdBy: null });
      await embedStoredFile(embedder, storage, { type: 'example', id: ex.id }, key);
    }
    await synthesizeSubjectModel(sequelize, embedder, subject.id, { mode: 'from-examples' }, null);

    let peak = process.memoryUsage().rss;
    const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 100);
    const run = await startRun(sequelize, collection.id, 'manual', null);
    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool, mailer }) });
    const loadBefore = loadavg()[0]!;
    const cpu0 = process.cpuUsage();
    const db0 = mariadbCpuS();
    const start = performance.now();
    await worker.runOnce();
    const totalS = (performance.now() - start) / 1000;
    const cpu = process.cpuUsage(cpu0);
    const db1 = mariadbCpuS();
    clearInterval(sampler);
    const done = await Run.findByPk(run.id);
    const report = done!.report as unknown as RunReport;
    const stageS = (s: (typeof STAGES)[number]) => {
      const st = report.stages[s];
      return st.startedAt && st.finishedAt ? (Date.parse(st.finishedAt) - Date.parse(st.startedAt)) / 1000 : 0;
    };
    const counts = done!.counts as Record<string, number>;
    const row: Record<string, string | number> = { embedder: pool.embedder.id, threads, scans: N, status: done!.status, embedded: counts.embedded ?? 0 };
    for (const s of ['ingest', 'embed', 'retrain', 'suggest', 'digest'] as const) row[`${s} s`] = stageS(s).toFixed(2);
    row['total s'] = totalS.toFixed(1);
    row['scans/s'] = (N / totalS).toFixed(2);
    row['CPU s (all threads)'] = ((cpu.user + cpu.system) / 1e6).toFixed(1);
    // what one scan costs this process whatever the machine's load (MariaDB's own CPU is not counted)
    row['CPU ms/scan'] = Math.round((cpu.user + cpu.system) / 1e3 / N);
    row['MariaDB CPU ms/scan'] = db0 === null || db1 === null ? 'n/a' : Math.round(((db1 - db0) * 1000) / N);
    row['peak RSS MB'] = Math.round(peak / 1e6);
    row['load before/after'] = `${loadBefore.toFixed(2)}/${loadavg()[0]!.toFixed(2)}`;
    row['generate s'] = genS.toFixed(1);
    return row;
  } finally {
    pool.dispose();
    await collection.destroy();
    rmSync(drop, { recursive: true, force: true });
  }
}

/**
 * Where one scan's time goes, one step at a time on one thread (no overlap, so the figures add up): the
 * intake decode and derivatives, the whole intake of a file with its database writes, and the embedder on
 * the small input intake hands over — against the review image and the original scan it used to read.
 */
async function breakdown(samples: number): Promise<Array<Record<string, string | number>>> {
  const dir = join(benchDir, 'breakdown');
  rmSync(dir, { recursive: true, force: true });
  const files: string[] = [];
  mkdirSync(dir, { recursive: true });
  const plates = buildDemoScenario().collections[0]!;
  const base = (await renderItemImage(plates.items[0]!, plates.medium, { width: 3000, height: 2000 })).data;
  for (let i = 0; i < samples; i++) {
    const path = join(dir, `b-${i}.jpg`);
    writeFileSync(path, await sharp(base).modulate({ brightness: 1 + i / 1000 }).jpeg({ quality: 88 }).toBuffer());
    files.push(path);
  }
  const collection = await Collection.create({ slug: `bench-breakdown-${Date.now()}`, name: 'Night-shift bench (breakdown)', description: 'Made by npm run bench:nightshift; removed at the end.', medium: 'engraving', houseStyle: '', dropFolder: null, archivedAt: null, scheduleEnabled: false });
  const pool = await EmbeddingPool.start(1);
  const rows: Array<Record<string, string | number>> = [];
  const step = async (name: string, work: (i: number) => Promise<unknown>) => {
    await work(0); // warm
    const cpu0 = process.cpuUsage();
    const t0 = performance.now();
    for (let i = 1; i < samples; i++) await work(i);
    const wall = (performance.now() - t0) / (samples - 1);
    const c = process.cpuUsage(cpu0);
    rows.push({ step: name, 'wall ms/scan': wall.toFixed(1), 'CPU ms/scan (this process)': ((c.user + c.system) / 1e3 / (samples - 1)).toFixed(1) });
  };
  try {
    const bytes = await Promise.all(files.map((f) => readFile(f)));
    const deps = { sequelize, storage, limits: intakeLimits() };
    // each step decodes bytes it has not decoded before (libvips keeps recent operations in a cache)
    await step('intake decode, drop folder: thumbnail and embedding input only (shrink on load)', (i) => makeDerivatives(bytes[i]!, 1e8, DEFAULT_SIZES, { embedInput: true, view: false }));
    await step('intake decode, upload: review image, thumbnail, embedding input', (i) => makeDerivatives(bytes[i]!, 1e8, DEFAULT_SIZES, { embedInput: true }));
    await step('intake: whole file from the drop folder (read, hash, sniff, decode, store, database)', (i) => ingestFile(deps, { collectionId: collection.id, fileName: `b-${i}.jpg`, source: { path: files[i]! }, origin: 'drop-folder', embedInput: true }));
    await step('intake: whole file, review image made at once (as an upload)', (i) => ingestFile(deps, { collectionId: collection.id, fileName: `c-${i}.jpg`, source: { buffer: Buffer.concat([bytes[i]!, Buffer.from([0xff, 0xd9])]) } /* other bytes than the step before: no duplicate */, origin: 'upload', embedInput: true }));
    const derived = await Promise.all(bytes.map((b) => makeDerivatives(b, 1e8, DEFAULT_SIZES, { embedInput: true })));
    const embed = (b: Buffer) => pool.embedAll([b], async (x) => x, async () => {});
    await step(`embed (${pool.embedder.id}, 1 thread): the small input from intake`, (i) => embed(derived[i]!.embedInput!));
    await step('embed: the review image', (i) => embed(derived[i]!.view!));
    await step('embed: the original scan (what the embed stage reads for a scan without a small input)', (i) => embed(bytes[i]!));
  } finally {
    pool.dispose();
    await collection.destroy();
    rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}

try {
  await sequelize.authenticate();
  const rows = [];
  for (const t of threadCounts) rows.push(await once(t));
  const steps = await breakdown(Math.min(21, Math.max(6, N)));
  console.log('Where the time of one scan goes (steps one after another; CPU of embedding threads is counted in this process):');
  console.table(steps);
  console.log(`${N} scans of 3000×2000 px (JPEG q88); ingest lanes ${process.env.CARTOUCHE_INGEST_LANES ?? 2}; uptime load averages at the end: ${loadavg().map((l) => l.toFixed(2)).join(' ')}`);
  console.table(rows);
} finally {
  rmSync(benchDir, { recursive: true, force: true });
  (await processEmbedder().catch(() => null))?.dispose();
  await sequelize.close();
}
