import { mkdir, readdir, readFile, rename, stat, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { QueryTypes, type Sequelize } from 'sequelize';
import type { AppConfig } from '../../../server/src/config.ts';
import { logger } from '../../../server/src/logger.ts';
import { createMailer, type Mailer } from '../../../server/src/mail/mailer.ts';
import { Collection, Embedding, Run, User } from '../../../server/src/models/index.ts';
import { storeEmbedding } from '../../../server/src/services/features.ts';
import { ingestFile, intakeLimits } from '../../../server/src/services/ingest.ts';
import { ocrPendingItems, ocrWorkers } from '../../../server/src/services/ocr.ts';
import { EmbedFeeder, inLanes } from '../../../server/src/services/ingest/pipeline.ts';
import { featureToBuffer } from '../../../server/src/ml/index.ts';
import { emptyCounts, emptyReport, STAGES, type RunCounts, type RunReport, type Stage } from '../../../server/src/services/runs.ts';
import { Storage } from '../../../server/src/services/storage.ts';
import { retrainCollection, suggestForCollection } from '../../../server/src/services/suggest.ts';
import type { WeightMapSettings } from '../../../server/src/services/weight-maps.ts';
import type { EmbeddingPool } from '../embed-pool.ts';
import type { TaskHandler } from '../worker.ts';

export interface NightShiftDeps {
  config: AppConfig;
  /** the embedding pool, started on first use and kept for the worker's life */
  pool: () => Promise<EmbeddingPool>;
  mailer?: Mailer;
  /** overrides of the weight map's training settings (tuning, tests); the defaults are the measured ones */
  regressorSettings?: Partial<WeightMapSettings>;
}

class Cancelled extends Error {}

/** Folders inside a drop folder where processed files are moved aside (never deleted). */
export const DROP_DONE = 'processed';
export const DROP_REJECTED = 'rejected';

/** Drop-folder files ingested at once (each decode runs on one of libuv's threads). */
export function ingestLanes(env: NodeJS.ProcessEnv = process.env): number {
  const raw = env.CARTOUCHE_INGEST_LANES;
  if (raw === undefined || raw === '') return 2;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 16) throw new Error(`CARTOUCHE_INGEST_LANES must be a whole number from 1 to 16, got "${raw}"`);
  return n;
}

/**
 * The site-wide switch for the text stage: `CARTOUCHE_NIGHTSHIFT_OCR=off` turns text reading off for every
 * collection; unset (or `on`) leaves it to each collection's setting ("read text in scans at night").
 */
export function siteReadsText(env: NodeJS.ProcessEnv = process.env): boolean {
  const raw = env.CARTOUCHE_NIGHTSHIFT_OCR;
  if (raw === undefined || raw === '' || raw === 'on') return true;
  if (raw === 'off') return false;
  throw new Error(`CARTOUCHE_NIGHTSHIFT_OCR must be "off" (no text reading anywhere) or "on"/unset (each collection's setting decides), got "${raw}"`);
}

/** What every stage of a run works with. */
interface RunContext {
  sequelize: Sequelize;
  storage: Storage;
  deps: NightShiftDeps;
  mailer: Mailer;
  collection: Collection;
  runId: number;
  report: RunReport;
  counts: RunCounts;
  shouldStop: () => Promise<boolean>;
  stage: (stage: Stage) => StageRunner;
}

type StageHandler = (ctx: RunContext, s: StageRunner) => Promise<void>;

/**
 * The stages, in the order of STAGES (services/runs.ts). A new stage is a name added to STAGES and a handler
 * here; the type makes both go together. Every handler must be idempotent: a run taken over after its worker
 * died calls it again from the start.
 */
const STAGE_HANDLERS: Record<Stage, StageHandler> = {
  ingest: ingestStage,
  embed: embedStage,
  retrain: retrainStage,
  suggest: suggestStage,
  text: textStage,
  digest: digestStage,
};

/**
 * One night-shift run: ingest (drop folder, with embedding overlapping it) → embed (whatever is still without a
 * feature) → retrain (the weight map, then the subject models) → suggest → text (OCR, the slow part, once the
 * suggestions are out) → digest. Each stage is idempotent and
 * records when it is done, so a run taken over after its worker died (lease expired) skips the stages that
 * finished and redoes at most the batch that was in flight — with no duplicate item or suggestion, because
 * items are keyed by content hash, features by (owner, embedder), weight maps by their inputs' fingerprint and
 * suggestions by (item, subject).
 */
export function nightShiftTask(deps: NightShiftDeps): TaskHandler {
  // a misspelt switch is refused when the worker starts, not found at night
  siteReadsText();
  ocrWorkers();
  const storage = new Storage(deps.config.storageDir);
  const mailer = deps.mailer ?? createMailer(deps.config);

  return async (job, { sequelize }) => {
    const runId = Number(job.payload.runId);
    const run = await Run.findByPk(runId);
    if (!run) throw new Error(`run ${runId} does not exist`);
    if (run.status === 'cancelled' || run.status === 'succeeded') return { runId, skipped: run.status };
    const collection = await Collection.findByPk(run.collectionId);
    if (!collection) throw new Error(`collection ${run.collectionId} does not exist`);
    const stored = (run.report as unknown as Partial<RunReport> | null) ?? {};
    // a run recorded before a stage existed has no entry for it: that stage is still to do
    const report: RunReport = { ...emptyReport(), ...stored, stages: { ...emptyReport().stages, ...(stored.stages ?? {}) } };
    const counts: RunCounts = { ...emptyCounts(), ...(run.counts as RunCounts) };
    await run.update({ status: 'running', startedAt: run.startedAt ?? new Date() });

    let lastSave = 0;
    const save = async (force = false) => {
      if (!force && Date.now() - lastSave < 1000) return;
      lastSave = Date.now();
      await Run.update({ report: report as unknown as Record<string, unknown>, counts }, { where: { id: runId } });
    };
    // asked often (per file, per batch): the answer is kept for half a second
    let stopAsked = 0;
    let stopAnswer: Promise<boolean> = Promise.resolve(false);
    const shouldStop = () => {
      if (Date.now() - stopAsked > 500) {
        stopAsked = Date.now();
        stopAnswer = Run.findByPk(runId, { attributes: ['status'] }).then((r) => r?.status === 'cancelled');
      }
      return stopAnswer;
    };
    const stageRunner = (stage: Stage): StageRunner => ({
      begin: async (total: number | null) => {
        const r = report.stages[stage];
        // a stage already running (overlapping the one before, or taken over) keeps its count
        Object.assign(r, { state: 'running', total, done: r.state === 'running' ? r.done : 0, startedAt: r.startedAt ?? new Date().toISOString() });
        await save(true);
      },
      progress: async (done: number, total?: number) => {
        report.stages[stage].done = done;
        if (total !== undefined) report.stages[stage].total = total;
        await save();
      },
      end: async (state: 'done' | 'skipped' = 'done', note?: string) => {
        Object.assign(report.stages[stage], { state, finishedAt: new Date().toISOString(), ...(note ? { note } : {}) });
        await save(true);
      },
    });
    const ctx: RunContext = { sequelize, storage, deps, mailer, collection, runId, report, counts, shouldStop, stage: stageRunner };

    try {
      for (const stage of STAGES) {
        if (report.stages[stage].state === 'done' || report.stages[stage].state === 'skipped') continue;
        if (await shouldStop()) throw new Cancelled();
        await STAGE_HANDLERS[stage](ctx, stageRunner(stage));
        if (await shouldStop()) throw new Cancelled();
      }
      await Run.update({ status: 'succeeded', finishedAt: new Date(), report: report as unknown as Record<string, unknown>, counts }, { where: { id: runId, status: 'running' } });
      return { runId, counts };
    } catch (err) {
      if (err instanceof Cancelled) {
        await save(true);
        return { runId, cancelled: true };
      }
      report.errors.push({ at: new Date().toISOString(), message: (err as Error).message });
      const final = job.attempts >= job.maxAttempts;
      await Run.update(
        { report: report as unknown as Record<string, unknown>, counts, ...(final ? { status: 'failed', finishedAt: new Date(), error: (err as Error).message } : {}) },
        { where: { id: runId } },
      );
      if (final) await sendFailureAlert(mailer, deps.config, collection, runId, (err as Error).message).catch((e: unknown) => logger.warn({ err: e }, 'failure alert not sent'));
      throw err;
    }
  };
}

interface StageRunner {
  begin(total: number | null): Promise<void>;
  progress(done: number, total?: number): Promise<void>;
  end(state?: 'done' | 'skipped', note?: string): Promise<void>;
}

/** Stores a finished batch of item features in one statement (a rerun replaces, never duplicates). */
async function storeItemFeatures(embedderId: string, batch: ReadonlyArray<{ id: number; feature: Float32Array }>): Promise<void> {
  if (batch.length === 0) return;
  await Embedding.bulkCreate(
    batch.map(({ id, feature }) => ({ ownerType: 'item' as const, ownerId: id, embedderId, dimension: feature.length, vector: featureToBuffer(feature) })),
    { updateOnDuplicate: ['dimension', 'vector', 'updatedAt'] },
  );
}

/**
 * Ingests the drop folder, a few files at once, and embeds each new scan as soon as it is in: the small
 * embedding input made from the one decode at intake goes straight to the pool, which works while the next
 * files are decoded. One bad file is refused with its reason and moved aside; the others go on. A failed
 * hand-over to the pool does not stop intake: those items stay without a feature and the embed stage takes
 * them up again.
 */
async function ingestStage(ctx: RunContext, s: StageRunner): Promise<void> {
  const { sequelize, storage, collection, report, counts, shouldStop } = ctx;
  const folder = collection.dropFolder;
  if (!folder) return s.end('skipped', 'no drop folder set');
  let names: string[];
  try {
    names = (await readdir(folder, { withFileTypes: true })).filter((e) => e.isFile() && !e.name.startsWith('.')).map((e) => e.name).sort();
  } catch (err) {
    return s.end('skipped', `drop folder not readable: ${(err as Error).message}`);
  }
  await s.begin(names.length);
  const pool = await ctx.deps.pool();
  const embed = ctx.stage('embed');
  await embed.begin(null);
  let embedded = report.stages.embed.done;
  const feeder = new EmbedFeeder<{ id: number; input: Buffer }>(
    pool,
    async (job) => job.input,
    async (batch) => {
      await storeItemFeatures(pool.embedder.id, batch.map(({ job, feature }) => ({ id: job.id, feature })));
      embedded += batch.length;
      counts.embedded += batch.length;
      await embed.progress(embedded);
    },
    { shouldStop },
  );
  const deps = { sequelize, storage, limits: intakeLimits() };
  let done = 0;
  try {
    await inLanes(
      names,
      ingestLanes(),
      async (name) => {
        const path = join(folder, name);
        const outcome = await ingestFile(deps, { collectionId: collection.id, fileName: name, source: { path }, origin: 'drop-folder', embedInput: true });
        if (outcome.outcome === 'rejected') {
          counts.rejected++;
          report.rejected.push({ fileName: name, reason: outcome.reason });
          await moveAside(folder, DROP_REJECTED, name, outcome.reason);
        } else {
          if (outcome.outcome === 'ingested') {
            counts.ingested++;
            if (outcome.embedInput) await feeder.push({ id: outcome.itemId, input: outcome.embedInput });
          } else counts.duplicates++;
          await moveAside(folder, DROP_DONE, name);
        }
        await s.progress(++done);
      },
      shouldStop,
    );
  } finally {
    await feeder.finish().catch((err: unknown) => {
      report.errors.push({ at: new Date().toISOString(), message: `embedding during intake: ${(err as Error).message}; the embed stage takes those scans up again` });
    });
  }
  if (await shouldStop()) return;
  await s.end();
}

/** Moves a drop-folder file into a sub-folder, never over an existing file; a rejected file gets a note beside it. */
async function moveAside(folder: string, sub: string, name: string, reason?: string): Promise<void> {
  const dir = join(folder, sub);
  await mkdir(dir, { recursive: true });
  let target = join(dir, name);
  for (let n = 2; await exists(target); n++) target = join(dir, `${n}-${name}`);
  await rename(join(folder, name), target);
  if (reason) await writeFile(`${target}.reason.txt`, `${reason}\n`);
}

async function exists(p: string): Promise<boolean> {
  return stat(p).then(
    () => true,
    () => false,
  );
}

/**
 * Embeds whatever of the collection still has no feature from the current embedder: examples (drawn, uploaded
 * or promoted), scans that came in by upload, and scans a previous attempt ingested but did not embed. Scans
 * are read from their review-size image (already upright, and small enough to decode fast).
 */
async function embedStage(ctx: RunContext, s: StageRunner): Promise<void> {
  const { sequelize, storage, collection, counts, shouldStop } = ctx;
  const pool = await ctx.deps.pool();
  const todo = await sequelize.query<{ id: number; file_key: string | null; view_key: string | null }>(
    `SELECT i.id, i.file_key, i.view_key FROM items i
      WHERE i.collection_id = :collectionId AND i.file_key IS NOT NULL
        AND NOT EXISTS (SELECT 1 FROM embeddings e WHERE e.owner_type = 'item' AND e.owner_id = i.id AND e.embedder_id = :embedderId)
      ORDER BY i.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId: collection.id, embedderId: pool.embedder.id } },
  );
  const examples = await sequelize.query<{ id: number; file_key: string }>(
    `SELECT x.id, x.file_key FROM examples x JOIN subjects s ON s.id = x.subject_id
      WHERE s.collection_id = :collectionId
        AND NOT EXISTS (SELECT 1 FROM embeddings e WHERE e.owner_type = 'example' AND e.owner_id = x.id AND e.embedder_id = :embedderId)
      ORDER BY x.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId: collection.id, embedderId: pool.embedder.id } },
  );
  const before = ctx.report.stages.embed.state === 'running' ? ctx.report.stages.embed.done : 0;
  await s.begin(before + todo.length + examples.length);
  let done = before;
  for (let i = 0; i < examples.length; i += 8) {
    const slice = examples.slice(i, i + 8);
    const features = await pool.embedExamples(await Promise.all(slice.map((x) => readFile(storage.pathOf(x.file_key)))));
    for (const [j, x] of slice.entries()) await storeEmbedding({ type: 'example', id: x.id }, pool.embedder.id, features[j]!);
    done += slice.length;
    await s.progress(done);
  }
  await pool.embedAll(
    todo,
    (row) => readFile(storage.pathOf(row.view_key ?? row.file_key!)),
    async (batch) => {
      await storeItemFeatures(pool.embedder.id, batch.map(({ job, feature }) => ({ id: job.id, feature })));
      done += batch.length;
      counts.embedded += batch.length;
      await s.progress(done);
    },
    { shouldStop },
  );
  if (await shouldStop()) return;
  await s.end();
}

/** The weight map first (only when the decisions about its training subjects changed), then the subject models. */
async function retrainStage(ctx: RunContext, s: StageRunner): Promise<void> {
  const pool = await ctx.deps.pool();
  await s.begin(null);
  const r = await retrainCollection(ctx.sequelize, pool.embedder, ctx.collection.id, { onProgress: (d, t) => s.progress(d, t), shouldStop: ctx.shouldStop, regressorSettings: ctx.deps.regressorSettings });
  ctx.counts.retrained += r.retrained;
  if (r.weightMap.status === 'trained') ctx.counts.weightMapsTrained += 1;
  for (const f of r.failed) ctx.report.errors.push({ at: new Date().toISOString(), message: `subject ${f.subjectId}: ${f.reason}` });
  if (await ctx.shouldStop()) return;
  const map =
    r.weightMap.status === 'trained'
      ? `weight map version ${r.weightMap.version} trained, ${r.weightMap.chosenVersion === r.weightMap.version ? 'chosen' : 'not chosen'}`
      : r.weightMap.status === 'unchanged'
        ? `weight map unchanged${r.weightMap.chosenVersion ? ` (version ${r.weightMap.chosenVersion} in use)` : ''}`
        : r.weightMap.status === 'withdrawn'
          ? 'weight map withdrawn: too few training subjects now'
          : 'no weight map yet: too few subjects with enough confirmed items';
  await s.end('done', `${r.retrained} model(s) rebuilt; ${map}`);
}

/** Every active model's ranked list over the items nobody has decided on yet (rerun: the same suggestions). */
async function suggestStage(ctx: RunContext, s: StageRunner): Promise<void> {
  const pool = await ctx.deps.pool();
  await s.begin(null);
  const r = await suggestForCollection(ctx.sequelize, pool.embedder, ctx.collection.id, { runId: ctx.runId, onProgress: (d, t) => s.progress(d, t), shouldStop: ctx.shouldStop });
  ctx.counts.suggested = r.proposed;
  if (await ctx.shouldStop()) return;
  await s.end(r.subjects === 0 ? 'skipped' : 'done', r.subjects === 0 ? 'no active subject model yet' : undefined);
}

/**
 * Text in the images (OCR, English): read once per item and engine, offered to editors at the desk (as a
 * suggestion, never a description), searched in the catalogue and checked against the alt text. It runs after
 * suggest because it is the slow part (bench:review), on a few tesseract.js workers (`CARTOUCHE_OCR_WORKERS`):
 * the embedding threads are idle by then. Each collection's setting decides; `CARTOUCHE_NIGHTSHIFT_OCR=off` turns
 * it off for the whole site. The setting is read again here, so a change during the run applies to it.
 */
async function textStage(ctx: RunContext, s: StageRunner): Promise<void> {
  if (!siteReadsText()) {
    await s.end('skipped', 'text reading is turned off for the whole site (CARTOUCHE_NIGHTSHIFT_OCR=off)');
    return;
  }
  const fresh = await Collection.findByPk(ctx.collection.id, { attributes: ['id', 'readText'] });
  if (!fresh?.readText) {
    await s.end('skipped', 'text reading is off in this collection’s settings');
    return;
  }
  await s.begin(null);
  const r = await ocrPendingItems({ sequelize: ctx.sequelize, storage: ctx.storage }, ctx.collection.id, { workers: ocrWorkers(), shouldStop: ctx.shouldStop, onProgress: (d, t) => s.progress(d, t) });
  ctx.counts.textRead = (ctx.counts.textRead ?? 0) + r.read;
  for (const f of r.failed) ctx.report.errors.push({ at: new Date().toISOString(), message: `text of ${f.identifier}: ${f.reason}` });
  if (await ctx.shouldStop()) return;
  await s.end(r.read === 0 && r.failed.length === 0 ? 'skipped' : 'done', r.read === 0 && r.failed.length === 0 ? 'every scan’s text was already read' : `${r.read} read, ${r.mostlyText} mostly text${r.failed.length ? `, ${r.failed.length} could not be read` : ''}`);
}

async function digestStage(ctx: RunContext, s: StageRunner): Promise<void> {
  await s.begin(null);
  const sent = await sendDigest(ctx.sequelize, ctx.mailer, ctx.deps.config, ctx.collection, ctx.counts);
  await s.end('done', `sent to ${sent} editor(s)`);
}

async function waitingCount(sequelize: Sequelize, collectionId: number): Promise<number> {
  const [row] = await sequelize.query<{ n: number }>(
    `SELECT COUNT(DISTINCT i.id) AS n FROM items i JOIN suggestions s ON s.item_id = i.id AND s.state = 'proposed' WHERE i.collection_id = :collectionId AND i.state <> 'approved'`,
    { type: QueryTypes.SELECT, replacements: { collectionId } },
  );
  return Number(row?.n ?? 0);
}

/** After a run: what waits for editors, with a link to the review desk. */
async function sendDigest(sequelize: Sequelize, mailer: Mailer, config: AppConfig, collection: Collection, counts: RunCounts): Promise<number> {
  const editors = await User.findAll({ where: { role: 'editor', active: true } });
  if (editors.length === 0) return 0;
  const waiting = await waitingCount(sequelize, collection.id);
  const text = [
    `The night shift has been through ${collection.name}.`,
    '',
    `New scans: ${counts.ingested} (duplicates skipped: ${counts.duplicates}, refused: ${counts.rejected})`,
    `Scans embedded: ${counts.embedded}`,
    `Subjects suggested: ${counts.suggested}`,
    `Subject models rebuilt from your decisions: ${counts.retrained}`,
    `Scans searched for text: ${counts.textRead ?? 0}`,
    '',
    `Items waiting for review: ${waiting}`,
    `Review desk: ${config.publicUrl}/review?collection=${encodeURIComponent(collection.slug)}`,
    '',
    'Suggested subjects and text found in scans are not descriptions until a person approves them.',
  ].join('\n');
  for (const e of editors) await mailer.send({ to: e.email, subject: `${collection.name}: ${waiting} item(s) waiting for review`, text });
  return editors.length;
}

async function sendFailureAlert(mailer: Mailer, config: AppConfig, collection: Collection, runId: number, message: string): Promise<void> {
  const people = await User.findAll({ where: { role: ['archivist', 'admin'], active: true } });
  for (const p of people) {
    await mailer.send({
      to: p.email,
      subject: `Night shift failed for ${collection.name}`,
      text: `Run ${runId} for ${collection.name} stopped after its last retry:\n\n${message}\n\nWhat it finished is kept; the next run goes on from there.\nRuns: ${config.publicUrl}/intake?collection=${encodeURIComponent(collection.slug)}\n`,
    });
  }
}
