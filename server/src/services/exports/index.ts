import { randomBytes } from 'node:crypto';
import { once } from 'node:events';
import { createWriteStream } from 'node:fs';
import { mkdir, rename, rm, stat } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { Op, type Sequelize } from 'sequelize';
import { HttpProblem } from '../../http/problem.ts';
import { Collection, ExportFile, Job, User } from '../../models/index.ts';
import type { ExportKind, ExportView } from '../../../../common/api/exports.ts';
import { sha256OfFile } from '../ingest/store-file.ts';
import { intakeLimits } from '../ingest.ts';
import type { Storage } from '../storage.ts';
import type { AppConfig } from '../../config.ts';
import { writeItemsCsv } from './csv.ts';
import { writeManifest } from './iiif.ts';
import { writeLedger } from './ledger.ts';
import { writeXmpZip } from './xmp.ts';

export type { ExportView };

/** The job kind that builds an export. */
export const EXPORT_JOB = 'export-build';

export const KIND_INFO: Record<ExportKind, { label: string; extension: string; mimeType: string }> = {
  ledger_xlsx: { label: 'Coverage ledger', extension: 'xlsx', mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' },
  items_csv: { label: 'Items (CSV)', extension: 'csv', mimeType: 'text/csv; charset=utf-8' },
  xmp_zip: { label: 'XMP sidecars', extension: 'zip', mimeType: 'application/zip' },
  iiif_manifest: { label: 'IIIF manifest', extension: 'json', mimeType: 'application/ld+json' },
};

export function exportView(e: ExportFile, job?: Job | null, requester?: User | null): ExportView {
  const p = job?.progress as { done?: number; total?: number | null } | null | undefined;
  return {
    id: e.id,
    collectionId: e.collectionId,
    kind: e.kind,
    label: KIND_INFO[e.kind].label,
    periodFrom: e.periodFrom,
    periodTo: e.periodTo,
    status: e.status,
    trigger: e.trigger,
    rowCount: e.rowCount,
    byteSize: e.byteSize === null ? null : Number(e.byteSize),
    fileName: e.fileName,
    progress: e.status === 'running' && p && typeof p.done === 'number' ? { done: p.done, total: typeof p.total === 'number' ? p.total : null } : null,
    requestedBy: requester ? { id: requester.id, name: requester.displayName } : null,
    error: e.error,
    createdAt: e.createdAt.toISOString(),
    finishedAt: e.finishedAt ? e.finishedAt.toISOString() : null,
    mailedAt: e.mailedAt ? e.mailedAt.toISOString() : null,
    downloadUrl: e.status === 'ready' ? `/api/exports/${e.id}/file` : null,
  };
}

export async function listExports(collectionId: number, limit = 30): Promise<ExportView[]> {
  const exports = await ExportFile.findAll({ where: { collectionId }, order: [['createdAt', 'DESC'], ['id', 'DESC']], limit });
  const jobIds = exports.map((e) => e.jobId).filter((id): id is number => id !== null);
  const userIds = exports.map((e) => e.requestedBy).filter((id): id is number => id !== null);
  const jobs = new Map((jobIds.length ? await Job.findAll({ where: { id: { [Op.in]: jobIds } } }) : []).map((j) => [Number(j.id), j]));
  const users = new Map((userIds.length ? await User.findAll({ where: { id: { [Op.in]: userIds } } }) : []).map((u) => [u.id, u]));
  return exports.map((e) => exportView(e, e.jobId === null ? null : jobs.get(Number(e.jobId)), e.requestedBy === null ? null : users.get(e.requestedBy)));
}

export async function getExportView(id: number): Promise<ExportView> {
  const e = await ExportFile.findByPk(id);
  if (!e) throw new HttpProblem(404, 'Not found', `There is no export ${id}.`);
  const job = e.jobId === null ? null : await Job.findByPk(e.jobId);
  const user = e.requestedBy === null ? null : await User.findByPk(e.requestedBy);
  return exportView(e, job, user);
}

/**
 * Records a requested export and the job that builds it, in one transaction: either both exist or neither.
 * The worker picks the job up; the export's status follows it (queued → running → ready | failed).
 */
export async function requestExport(
  sequelize: Sequelize,
  input: { collectionId: number; kind: ExportKind; periodFrom: string | null; periodTo: string | null; requestedBy: number | null; trigger?: 'manual' | 'weekly'; idempotencyKey?: string },
): Promise<ExportFile> {
  const collection = await Collection.findByPk(input.collectionId);
  if (!collection) throw new HttpProblem(404, 'Not found', `There is no collection ${input.collectionId}.`);
  if (input.periodFrom && input.periodTo && input.periodFrom > input.periodTo) {
    throw new HttpProblem(400, 'Invalid request', 'The period ends before it starts.', { errors: [{ path: 'periodTo', message: 'Give a last day on or after the first day.' }] });
  }
  return sequelize.transaction(async (transaction) => {
    if (input.idempotencyKey) {
      const existing = await Job.findOne({ where: { idempotencyKey: input.idempotencyKey }, transaction });
      const done = existing ? await ExportFile.findOne({ where: { jobId: existing.id }, transaction }) : null;
      if (done) return done;
    }
    const exp = await ExportFile.create(
      {
        collectionId: input.collectionId,
        kind: input.kind,
        periodFrom: input.periodFrom,
        periodTo: input.periodTo,
        status: 'queued',
        fileKey: null,
        rowCount: null,
        requestedBy: input.requestedBy,
        trigger: input.trigger ?? 'manual',
        error: null,
        finishedAt: null,
      },
      { transaction },
    );
    const job = await Job.create(
      {
        kind: EXPORT_JOB,
        payload: { exportId: exp.id },
        idempotencyKey: input.idempotencyKey ?? `export:${exp.id}`,
        runId: null,
        runAfter: new Date(),
        maxAttempts: 3,
        leaseUntil: null,
        lockedBy: null,
        progress: null,
        result: null,
        lastError: null,
      },
      { transaction },
    );
    await exp.update({ jobId: Number(job.id) }, { transaction });
    return exp;
  });
}

/** `ledger-harbour-plates-2026-11-23-to-2026-11-29.xlsx` */
export function exportFileName(kind: ExportKind, slug: string, period: { from: string | null; to: string | null }): string {
  const stem = { ledger_xlsx: 'ledger', items_csv: 'items', xmp_zip: 'xmp-sidecars', iiif_manifest: 'iiif-manifest' }[kind];
  const span = period.from || period.to ? `-${period.from ?? 'start'}-to-${period.to ?? 'now'}` : '';
  return `${stem}-${slug}${span}.${KIND_INFO[kind].extension}`;
}

/** Moves a finished file into content-addressed storage (hashed as a stream; never read whole). */
export async function storeFile(storage: Storage, path: string): Promise<{ key: string; size: number }> {
  const key = await sha256OfFile(path);
  const size = (await stat(path)).size;
  if (await storage.has(key)) {
    await rm(path, { force: true });
    return { key, size };
  }
  const target = storage.pathOf(key);
  await mkdir(dirname(target), { recursive: true });
  await rename(path, target);
  return { key, size };
}

export interface BuildDeps {
  config: Pick<AppConfig, 'publicUrl' | 'storageDir' | 'version'>;
  storage: Storage;
}

/**
 * Builds an export (the body of the export job). Idempotent: a ready export is left as it is; a retry after
 * a crash starts the file again from the beginning (a half-written temporary file is never stored). A failure
 * leaves the export `queued` with its reason while the job will be tried again (`finalAttempt: false`), and
 * `failed` after the last attempt.
 */
export async function buildExport(
  sequelize: Sequelize,
  deps: BuildDeps,
  exportId: number,
  reportProgress: (p: { done: number; total: number | null }) => Promise<void>,
  opts: { finalAttempt?: boolean } = {},
): Promise<ExportFile> {
  const exp = await ExportFile.findByPk(exportId);
  if (!exp) throw new Error(`export ${exportId} does not exist`);
  if (exp.status === 'ready') return exp;
  const collection = exp.collectionId === null ? null : await Collection.findByPk(exp.collectionId);
  if (!collection) throw new Error(`the collection of export ${exportId} no longer exists`);
  await exp.update({ status: 'running', error: null });
  const period = { from: exp.periodFrom, to: exp.periodTo };
  const tmpDir = join(deps.storage.root, 'tmp');
  await mkdir(tmpDir, { recursive: true });
  const tmp = join(tmpDir, `export-${exp.id}-${randomBytes(6).toString('hex')}.part`);
  // progress is written at most every 5 000 rows: a row per page would be a write per thousand rows
  let lastReported = -Infinity;
  const onProgress = async (done: number) => {
    if (done - lastReported < 5000) return;
    lastReported = done;
    await reportProgress({ done, total: null });
  };
  try {
    let rows: number;
    if (exp.kind === 'ledger_xlsx') rows = (await writeLedger(sequelize, { collection, period, filename: tmp, onProgress })).rows;
    else if (exp.kind === 'items_csv') rows = (await writeItemsCsv(sequelize, { collection, period, filename: tmp, onProgress })).rows;
    else if (exp.kind === 'xmp_zip') rows = (await writeXmpZip(sequelize, { collection, period, filename: tmp, toolkit: `Cartouche ${deps.config.version}`, onProgress })).rows;
    else {
      const out = createWriteStream(tmp);
      const ingestDeps = { sequelize, storage: deps.storage, limits: intakeLimits() };
      rows = (
        await writeManifest(sequelize, ingestDeps, {
          collection,
          publicUrl: deps.config.publicUrl,
          write: async (chunk) => {
            if (!out.write(chunk)) await once(out, 'drain');
          },
        })
      ).canvases;
      out.end();
      await once(out, 'close');
    }
    const { key, size } = await storeFile(deps.storage, tmp);
    await exp.update({
      status: 'ready',
      fileKey: key,
      byteSize: size,
      rowCount: rows,
      fileName: exportFileName(exp.kind, collection.slug, period),
      finishedAt: new Date(),
    });
    return exp;
  } catch (err) {
    await rm(tmp, { force: true });
    // while the job has attempts left the export waits for the next one (with the reason kept); then it has failed
    const message = err instanceof Error ? err.message.slice(0, 2000) : String(err);
    await exp.update({ status: opts.finalAttempt === false ? 'queued' : 'failed', error: message });
    throw err;
  }
}
