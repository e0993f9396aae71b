import { mkdir, readdir, readFile, rename, stat, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { QueryTypes, type Sequelize } from 'sequelize';
import type { AppConfig } from '../../../server/src/config.ts';
import { logger } from '../../../server/src/logger.ts';
import { createMailer, type Mailer } from '../../../server/src/mail/mailer.ts';
import { Collection, Run, User } from '../../../server/src/models/index.ts';
import { storeEmbedding } from '../../../server/src/services/features.ts';
import { ingestFile, intakeLimits } from '../../../server/src/services/ingest.ts';
import { emptyCounts, emptyReport, STAGES, type RunCounts, type RunReport, type Stage } from '../../../server/src/services/runs.ts';
import { Storage } from '../../../server/src/services/storage.ts';
import { retrainCollection, suggestForCollection } from '../../../server/src/services/suggest.ts';
import type { EmbeddingPool } from '../embed-pool.ts';
import type { TaskHandler } from '../worker.ts';

export interface NightShiftDeps {
  config: AppConfig;
  /** the embedding pool, started on first use and kept for the worker's life */
  pool: () => Promise<EmbeddingPool>;
  mailer?: Mailer;
}

class Cancelled extends Error {}

/** Folders inside a drop folder where processed files are moved aside (never deleted). */
export const DROP_DONE = 'processed';
export const DROP_REJECTED = 'rejected';

/**
 * One night-shift run: ingest (drop folder) → embed → suggest → retrain → digest. Each stage is idempotent
 * and records when it is done, so a run taken over after its worker died (lease expired) skips the stages
 * that finished and redoes at most the batch that was in flight — with no duplicate item or suggestion,
 * because items are keyed by content hash and suggestions by (item, subject).
 */
export function nightShiftTask(deps: NightShiftDeps): TaskHandler {
  const storage = new Storage(deps.config.storageDir);
  const mailer = deps.mailer ?? createMailer(deps.config);

  return async (job, { sequelize }) => {
    const runId = Number(job.payload.runId);
    const run = await Run.findByPk(runId);
    if (!run) throw new Error(`run ${runId} does not exist`);
    if (run.status === 'cancelled' || run.status === 'succeeded') return { runId, skipped: run.status };
    const collection = await Collection.findByPk(run.collectionId);
    if (!collection) throw new Error(`collection ${run.collectionId} does not exist`);
    const report: RunReport = { ...emptyReport(), ...((run.report as unknown as RunReport | null) ?? {}) };
    const counts: RunCounts = { ...emptyCounts(), ...(run.counts as RunCounts) };
    await run.update({ status: 'running', startedAt: run.startedAt ?? new Date() });

    let lastSave = 0;
    const save = async (force = false) => {
      if (!force && Date.now() - lastSave < 1000) return;
      lastSave = Date.now();
      await Run.update({ report: report as unknown as Record<string, unknown>, counts }, { where: { id: runId } });
    };
    const shouldStop = async () => (await Run.findByPk(runId, { attributes: ['status'] }))?.status === 'cancelled';
    const stageRunner = (stage: Stage): StageRunner => ({
      begin: async (total: number | null) => {
        Object.assign(report.stages[stage], { state: 'running', total, done: 0, startedAt: report.stages[stage].startedAt ?? new Date().toISOString() });
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

    try {
      for (const stage of STAGES) {
        if (report.stages[stage].state === 'done' || report.stages[stage].state === 'skipped') continue;
        if (await shouldStop()) throw new Cancelled();
        const s = stageRunner(stage);
        if (stage === 'ingest') await ingestStage(sequelize, storage, collection, report, counts, s, shouldStop);
        if (stage === 'embed') await embedStage(sequelize, storage, deps, collection, counts, s, shouldStop);
        if (stage === 'suggest') {
          const pool = await deps.pool();
          await s.begin(null);
          const r = await suggestForCollection(sequelize, pool.embedder, collection.id, { runId, onProgress: (d, t) => s.progress(d, t), shouldStop });
          counts.suggested = r.proposed;
          await s.end(r.subjects === 0 ? 'skipped' : 'done', r.subjects === 0 ? 'no active subject model yet' : undefined);
        }
        if (stage === 'retrain') {
          const pool = await deps.pool();
          await s.begin(null);
          const r = await retrainCollection(sequelize, pool.embedder, collection.id, { onProgress: (d, t) => s.progress(d, t), shouldStop });
          counts.retrained = r.retrained;
          for (const f of r.failed) report.errors.push({ at: new Date().toISOString(), message: `subject ${f.subjectId}: ${f.reason}` });
          await s.end();
        }
        if (stage === 'digest') {
          await s.begin(null);
          const sent = await sendDigest(sequelize, mailer, deps.config, collection, counts);
          await s.end('done', `sent to ${sent} editor(s)`);
        }
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

async function ingestStage(sequelize: Sequelize, storage: Storage, collection: Collection, report: RunReport, counts: RunCounts, s: StageRunner, shouldStop: () => Promise<boolean>): Promise<void> {
  const folder = collection.dropFolder;
  if (!folder) return s.end('skipped', 'no drop folder set');
  let names: string[];
  try {
    names = (await readdir(folder, { withFileTypes: true })).filter((e) => e.isFile() && !e.name.startsWith('.')).map((e) => e.name).sort();
  } catch (err) {
    return s.end('skipped', `drop folder not readable: ${(err as Error).message}`);
  }
  await s.begin(names.length);
  const deps = { sequelize, storage, limits: intakeLimits() };
  for (const [i, name] of names.entries()) {
    if (await shouldStop()) return;
    const path = join(folder, name);
    const outcome = await ingestFile(deps, { collectionId: collection.id, fileName: name, source: { path }, origin: 'drop-folder' });
    if (outcome.outcome === 'rejected') {
      counts.rejected++;
      report.rejected.push({ fileName: name, reason: outcome.reason });
      await moveAside(folder, DROP_REJECTED, name, outcome.reason);
    } else {
      if (outcome.outcome === 'ingested') counts.ingested++;
      else counts.duplicates++;
      await moveAside(folder, DROP_DONE, name);
    }
    await s.progress(i + 1);
  }
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

async function embedStage(sequelize: Sequelize, storage: Storage, deps: NightShiftDeps, collection: Collection, counts: RunCounts, s: StageRunner, shouldStop: () => Promise<boolean>): Promise<void> {
  const pool = await deps.pool();
  const todo = await sequelize.query<{ id: number; file_key: string | null; view_key: string | null }>(
    `SELECT i.id, i.file_key, i.view_key FROM items i
      WHERE i.collection_id = :collectionId AND i.file_key IS NOT NULL
        AND NOT EXISTS (SELECT 1 FROM embeddings e WHERE e.owner_type = 'item' AND e.owner_id = i.id AND e.embedder_id = :embedderId)
      ORDER BY i.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId: collection.id, embedderId: pool.embedder.id } },
  );
  // examples (drawn, uploaded or promoted) that have no feature from this embedder yet
  const examples = await sequelize.query<{ id: number; file_key: string }>(
    `SELECT x.id, x.file_key FROM examples x JOIN subjects s ON s.id = x.subject_id
      WHERE s.collection_id = :collectionId
        AND NOT EXISTS (SELECT 1 FROM embeddings e WHERE e.owner_type = 'example' AND e.owner_id = x.id AND e.embedder_id = :embedderId)
      ORDER BY x.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId: collection.id, embedderId: pool.embedder.id } },
  );
  await s.begin(todo.length + examples.length);
  let done = 0;
  for (let i = 0; i < examples.length; i += 8) {
    const slice = examples.slice(i, i + 8);
    const features = await pool.embedExamples(await Promise.all(slice.map((x) => readFile(storage.pathOf(x.file_key)))));
    for (const [j, x] of slice.entries()) await storeEmbedding({ type: 'example', id: x.id }, pool.embedder.id, features[j]!);
    done += slice.length;
    await s.progress(done);
  }
  await pool.embedAll(
    todo,
    // the review-size derivative is already oriented and small: decoding it is far cheaper than the scan
    (row) => readFile(storage.pathOf(row.view_key ?? row.file_key!)),
    async (batch) => {
      for (const { job, feature } of batch) await storeEmbedding({ type: 'item', id: job.id }, pool.embedder.id, feature);
      done += batch.length;
      counts.embedded += batch.length;
      await s.progress(done);
    },
    { shouldStop },
  );
  await s.end();
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
    '',
    `Items waiting for review: ${waiting}`,
    `Review desk: ${config.publicUrl}/review?collection=${encodeURIComponent(collection.slug)}`,
    '',
    'Suggested subjects are not descriptions until a person approves them.',
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
