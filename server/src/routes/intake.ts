import { randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { mkdir, open, readdir, rm, stat } from 'node:fs/promises';
import { join } from 'node:path';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type { Request, RequestHandler, Response } from 'express';
import multer, { MulterError, type StorageEngine } from 'multer';
import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { logger } from '../logger.ts';
import { Item } from '../models/index.ts';
import { ACCEPTED_FORMATS, FORMAT_INFO, createIngestDeps, ensureDerivatives, ingestFile, intakeLimits, openCollection, tooLargeReason, type IngestOutcome } from '../services/ingest.ts';
import { derivativeType } from '../services/ingest/derivatives.ts';
import { baseName } from '../services/ingest/identifier.ts';
import { COLUMN_ALIASES, FIELD_LABELS, applyImport, getImport, previewImport } from '../services/metadata-import.ts';

/** One file's answer in an upload: the service's outcome, or `failed` when something other than the file went wrong. */
export type UploadOutcome = IngestOutcome | { outcome: 'failed'; fileName: string; reason: string };

const collectionParam = z.object({ id: z.coerce.number().int().positive() });
const importParam = z.object({ id: z.coerce.number().int().positive(), importId: z.coerce.number().int().positive() });
const itemParam = z.object({ id: z.coerce.number().int().positive() });

interface SpooledFile extends Express.Multer.File {
  /** more bytes arrived than one scan may have; only the first maxFileBytes were kept */
  tooLarge: boolean;
}

/**
 * A multer storage engine that streams each file to its own file in the spool folder and counts its bytes.
 * A file over the limit is read to its end but not kept, so it is refused alone and the files after it in the
 * same request still arrive (multer's own fileSize limit would abort the whole request).
 */
class SpoolStorage implements StorageEngine {
  constructor(
    private readonly dir: string,
    private readonly maxBytes: number,
  ) {}

  _handleFile(_req: Request, file: Express.Multer.File, cb: (error?: unknown, info?: Partial<SpooledFile>) => void): void {
    const path = join(this.dir, `${randomBytes(16).toString('hex')}.part`);
    let size = 0;
    let tooLarge = false;
    const max = this.maxBytes;
    const counter = new Transform({
      transform(chunk: Buffer, _enc, done) {
        size += chunk.length;
        if (size > max) tooLarge = true;
        done(null, tooLarge ? undefined : chunk);
      },
    });
    mkdir(this.dir, { recursive: true })
      .then(() => pipeline(file.stream, counter, createWriteStream(path, { flags: 'wx' })))
      .then(() => cb(null, { path, size, tooLarge }))
      .catch(async (err: unknown) => {
        await rm(path, { force: true });
        cb(err);
      });
  }

  _removeFile(_req: Request, file: Express.Multer.File, cb: (error: Error | null) => void): void {
    rm(file.path, { force: true }).then(() => cb(null), cb);
  }
}

/** Runs a multer middleware as a promise, turning its errors into problem details that say what to do. */
function receive(mw: RequestHandler, req: Request, res: Response, what: { field: string; max: number; noun: string }): Promise<void> {
  return new Promise((resolve, reject) => {
    mw(req, res, (err?: unknown) => {
      if (!err) return resolve();
      if (err instanceof MulterError) {
        if (err.code === 'LIMIT_FILE_COUNT') {
          return reject(new HttpProblem(413, 'Too many files', `One upload takes at most ${what.max} ${what.noun}; nothing was kept. Send them in smaller groups.`, { type: '/problems/too-many-files' }));
        }
        if (err.code === 'LIMIT_FILE_SIZE') {
          return reject(new HttpProblem(413, 'File too large', `The ${what.noun.replace(/s$/, '')} is larger than ${(what.max / 1_000_000).toLocaleString('en-GB')} MB; nothing was kept.`, { type: '/problems/payload-too-large' }));
        }
        if (err.code === 'LIMIT_UNEXPECTED_FILE') {
          return reject(new HttpProblem(400, 'Invalid request', `Send the ${what.noun} in the form field "${what.field}" (found a file in "${err.field ?? '?'}").`, { type: '/problems/invalid-request' }));
        }
        return reject(new HttpProblem(400, 'Invalid request', `The upload was refused: ${err.message}.`, { type: '/problems/invalid-request' }));
      }
      // busboy: a malformed or cut-off multipart body
      reject(new HttpProblem(400, 'Upload incomplete', `The upload could not be read (${(err as Error).message}); nothing was kept. Try again.`, { type: '/problems/upload-incomplete' }));
    });
  });
}

/** Spool files a crashed process left behind (a request never takes a day): removed when the routes are set up. */
async function sweepSpool(dir: string, olderThanMs = 24 * 3_600_000): Promise<void> {
  const names = await readdir(dir).catch(() => [] as string[]);
  for (const name of names.filter((n) => n.endsWith('.part'))) {
    const path = join(dir, name);
    const info = await stat(path).catch(() => null);
    if (info && Date.now() - info.mtimeMs > olderThanMs) await rm(path, { force: true });
  }
}

export function registerIntakeRoutes(api: GuardedRouter, ctx: AppContext): void {
  const limits = intakeLimits();
  const deps = createIngestDeps(ctx, limits);
  const spoolDir = join(ctx.config.dataDir, 'intake-spool');
  void sweepSpool(spoolDir).catch((err: unknown) => logger.warn({ err, spoolDir }, 'intake: could not sweep the spool folder'));
  const importer = needs('items:import');
  const reader = needs('collections:read');

  const scans = multer({
    storage: new SpoolStorage(spoolDir, limits.maxFileBytes),
    limits: { files: limits.maxFiles, fields: 20, parts: limits.maxFiles + 20 },
    defParamCharset: 'utf8',
  }).array('files', limits.maxFiles);
  const sheet = multer({ storage: multer.memoryStorage(), limits: { files: 1, fileSize: limits.maxSheetBytes, fields: 10 }, defParamCharset: 'utf8' }).single('sheet');

  api.route('get', '/intake/settings', importer, (_req, res) => {
    res.json({
      formats: ACCEPTED_FORMATS.map((f) => ({ format: f, label: FORMAT_INFO[f].label, mimeType: FORMAT_INFO[f].mimeType, extensions: FORMAT_INFO[f].extensions })),
      maxFileBytes: limits.maxFileBytes,
      maxFiles: limits.maxFiles,
      maxPixels: limits.maxPixels,
      sheet: {
        maxBytes: limits.maxSheetBytes,
        maxRows: limits.maxSheetRows,
        columns: (Object.keys(FIELD_LABELS) as Array<keyof typeof FIELD_LABELS>).map((field) => ({ field, label: FIELD_LABELS[field], aliases: COLUMN_ALIASES[field] })),
      },
    });
  });

  api.route('post', '/collections/:id/items/upload', importer, async (req, res) => {
    const { id } = parse(collectionParam, req.params, 'path');
    await openCollection(id);
    const user = currentUser(req);
    await receive(scans, req, res, { field: 'files', max: limits.maxFiles, noun: 'files' });
    const files = (Array.isArray(req.files) ? req.files : []) as SpooledFile[];
    const outcomes: UploadOutcome[] = [];
    try {
      // one at a time: each scan is decoded whole, and the derivatives of one are in memory at once
      for (const file of files) outcomes.push(await ingestSpooled(file, id, user.id));
    } finally {
      // the spool is emptied before the answer goes out, so nothing of this request outlives it
      await Promise.all(files.map((f) => rm(f.path, { force: true })));
    }
    if (files.length === 0) {
      throw new HttpProblem(400, 'No files', 'Send one or more scans as multipart/form-data in the form field "files".', { type: '/problems/invalid-request' });
    }
    const count = (o: UploadOutcome['outcome']) => outcomes.filter((x) => x.outcome === o).length;
    res.json({ outcomes, counts: { ingested: count('ingested'), duplicate: count('duplicate'), rejected: count('rejected'), failed: count('failed') } });
  });

  async function ingestSpooled(file: SpooledFile, collectionId: number, actorId: number): Promise<UploadOutcome> {
    const fileName = baseName(file.originalname);
    if (file.tooLarge) return { outcome: 'rejected', fileName, code: 'too-large', reason: tooLargeReason(file.size, limits.maxFileBytes) };
    try {
      return await ingestFile(deps, { collectionId, fileName, source: { path: file.path }, actorId, origin: 'upload' });
    } catch (err) {
      logger.error({ err, collectionId, fileName }, 'intake: a file could not be stored');
      const reason = err instanceof HttpProblem ? err.message : 'Cartouche could not store this file because of a problem on the server (it has been logged). Send it again.';
      return { outcome: 'failed', fileName, reason };
    }
  }

  for (const [suffix, which] of [['thumbnail', 'thumb'], ['view', 'view']] as const) {
    api.route('get', `/items/:id/${suffix}`, reader, async (req, res) => {
      const { id } = parse(itemParam, req.params, 'path');
      const item = await Item.findByPk(id, { attributes: ['id', 'identifier', 'fileKey', 'thumbKey', 'viewKey'] });
      if (!item) throw new HttpProblem(404, 'Not found', `There is no item ${id}.`);
      const keys = item.thumbKey && item.viewKey ? { thumbKey: item.thumbKey, viewKey: item.viewKey } : await ensureDerivatives(deps, item);
      const key = which === 'thumb' ? keys.thumbKey : keys.viewKey;
      const path = deps.storage.pathOf(key);
      const etag = `"${key}"`;
      // a derivative is made from the item's original bytes, which never change: it can be cached for good
      res.set({ 'Cache-Control': 'private, max-age=31536000, immutable', ETag: etag });
      if (req.headers['if-none-match'] === etag) return void res.status(304).end();
      const handle = await open(path, 'r');
      const head = Buffer.alloc(12);
      try {
        await handle.read(head, 0, 12, 0);
      } finally {
        await handle.close();
      }
      res.type(derivativeType(head));
      await new Promise<void>((resolve, reject) => res.sendFile(path, { etag: false, lastModified: false, cacheControl: false, dotfiles: 'allow' }, (err) => (err ? reject(err) : resolve())));
    });
  }

  api.route('post', '/collections/:id/imports', importer, async (req, res) => {
    const { id } = parse(collectionParam, req.params, 'path');
    await openCollection(id);
    await receive(sheet, req, res, { field: 'sheet', max: limits.maxSheetBytes, noun: 'sheet' });
    const file = req.file;
    if (!file) throw new HttpProblem(400, 'No sheet', 'Send the catalogue sheet (CSV or XLSX) as multipart/form-data in the form field "sheet".', { type: '/problems/invalid-request' });
    const preview = await previewImport({ collectionId: id, fileName: file.originalname, data: file.buffer, actorId: currentUser(req).id, maxRows: limits.maxSheetRows });
    res.status(201).json({ import: preview });
  });

  api.route('get', '/collections/:id/imports/:importId', importer, async (req, res) => {
    const { id, importId } = parse(importParam, req.params, 'path');
    res.json({ import: await getImport(id, importId) });
  });

  api.route('post', '/collections/:id/imports/:importId/apply', importer, async (req, res) => {
    const { id, importId } = parse(importParam, req.params, 'path');
    res.json({ import: await applyImport(ctx.sequelize, id, importId, currentUser(req).id, req.ip ?? null) });
  });
}
