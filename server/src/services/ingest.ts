import { readFile, stat } from 'node:fs/promises';
import sharp, { type Metadata } from 'sharp';
import type { Sequelize } from 'sequelize';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import { Collection, Item } from '../models/index.ts';
import { audit } from './audit.ts';
import { DEFAULT_SIZES, makeDerivatives, type DerivativeSizes } from './ingest/derivatives.ts';
import { baseName, cleanIdentifier, identifierFromFileName, uniqueIdentifier } from './ingest/identifier.ts';
import { ACCEPTED_FORMATS, FORMAT_INFO, SNIFF_BYTES, extensionNote, extensionOf, sniffFormat, type AcceptedFormat } from './ingest/sniff.ts';
import { putFile, readHead, sha256OfFile } from './ingest/store-file.ts';
import { Storage } from './storage.ts';

export { ACCEPTED_FORMATS, FORMAT_INFO, type AcceptedFormat };

/** How much intake accepts. Read from the environment by `intakeLimits`; tests pass their own. */
export interface IntakeLimits {
  /** largest accepted scan, in bytes */
  maxFileBytes: number;
  /** most files in one upload request */
  maxFiles: number;
  /** most pixels (width × height) an image may declare; larger ones are refused unopened */
  maxPixels: number;
  /** largest catalogue sheet (CSV or XLSX), in bytes */
  maxSheetBytes: number;
  /** most data rows in one catalogue sheet */
  maxSheetRows: number;
}

function positive(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isFinite(n) || n <= 0) throw new Error(`${name} must be a positive number, got "${raw}"`);
  return n;
}

export function intakeLimits(env: NodeJS.ProcessEnv = process.env): IntakeLimits {
  return {
    maxFileBytes: Math.round(positive(env, 'CARTOUCHE_INTAKE_MAX_FILE_MB', 200) * 1_000_000),
    maxFiles: Math.round(positive(env, 'CARTOUCHE_INTAKE_MAX_FILES', 100)),
    maxPixels: Math.round(positive(env, 'CARTOUCHE_INTAKE_MAX_MEGAPIXELS', 100) * 1_000_000),
    maxSheetBytes: Math.round(positive(env, 'CARTOUCHE_INTAKE_MAX_SHEET_MB', 10) * 1_000_000),
    maxSheetRows: Math.round(positive(env, 'CARTOUCHE_INTAKE_MAX_SHEET_ROWS', 10_000)),
  };
}

export interface IngestDeps {
  sequelize: Sequelize;
  storage: Storage;
  limits: IntakeLimits;
  sizes?: DerivativeSizes;
}

/** The dependencies the API and the worker use: storage under config.storageDir, limits from the environment. */
export function createIngestDeps(ctx: AppContext, limits: IntakeLimits = intakeLimits()): IngestDeps {
  return { sequelize: ctx.sequelize, storage: new Storage(ctx.config.storageDir), limits };
}

/** Where a file came from: the browser upload or the collection's drop folder. */
export type IngestOrigin = 'upload' | 'drop-folder';

export interface IngestRequest {
  collectionId: number;
  /** the file's own name (a path is cut to its last component); the item keeps it and its identifier comes from it */
  fileName: string;
  /** the bytes: a file on disk (read as a stream; left where it is) or a buffer */
  source: { path: string } | { buffer: Buffer };
  /** the catalogue's identifier for this scan, when known; else one is made from the file name */
  identifier?: string | null;
  /** who brought the file in; null for the night shift */
  actorId?: number | null;
  origin: IngestOrigin;
  /** also return a small lossless image of the scan for the embedder (the night shift embeds it at once) */
  embedInput?: boolean;
  /**
   * when the review-size image is made: at once (the default for uploads: the person who sent the file is about
   * to look at it), or when it is first needed — opened at the desk, read for text, put in a IIIF manifest — which
   * is the default for the drop folder: the night shift then decodes each scan at thumbnail size only, about a
   * third of the work (bench:nightshift).
   */
  reviewImage?: 'now' | 'when-needed';
}

/**
 * Files on disk up to this size are read into memory once: hashed, decoded and stored from the same bytes
 * (so a file that changes while it is read can never land under the wrong key); larger ones are streamed.
 */
export const READ_WHOLE_BYTES = 64 * 1024 * 1024;

export type RejectCode = 'empty' | 'too-large' | 'unsupported-format' | 'unreadable' | 'too-many-pixels' | 'truncated' | 'damaged';

export type IngestOutcome =
  | {
      outcome: 'ingested';
      fileName: string;
      itemId: number;
      identifier: string;
      format: AcceptedFormat;
      mimeType: string;
      width: number;
      height: number;
      byteSize: number;
      /** things worth knowing that did not stop the file (a misleading extension, a second page, a changed identifier) */
      notes: string[];
      /** the thumbnail's pixels as a lossless PNG, when the request asked for an embedding input */
      embedInput?: Buffer;
    }
  | { outcome: 'duplicate'; fileName: string; itemId: number; identifier: string; reason: string }
  | { outcome: 'rejected'; fileName: string; code: RejectCode; reason: string };

const numberWords = new Intl.NumberFormat('en-GB');
const oneDecimal = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 });
/** A byte count in decimal units, as the client writes them: "812 bytes", "48 kB", "212.5 MB". */
const sizeWords = (bytes: number) =>
  bytes < 1000 ? `${bytes} bytes` : bytes < 1_000_000 ? `${Math.round(bytes / 1000)} kB` : `${oneDecimal.format(bytes / 1_000_000)} MB`;
const acceptedList = 'JPEG, PNG, TIFF or WebP';

/**
 * Brings one scan into a collection: checks what the bytes really are, refuses empty, oversized, unsupported,
 * oversized-in-pixels, truncated and damaged files with a reason in words, recognises bytes the collection
 * already holds (SHA-256), makes the thumbnail and the review-size image, stores all three by content hash and
 * creates the item with an identifier unique in the collection.
 *
 * A problem with the file is an outcome, never an exception: the caller reports it and goes on with the next
 * file. An exception means something else failed (the database, the disk, an unknown collection) and the
 * same call may succeed later; nothing half-made is left in the database.
 */
export async function ingestFile(deps: IngestDeps, req: IngestRequest): Promise<IngestOutcome> {
  const fileName = baseName(req.fileName);
  let source = 'path' in req.source ? req.source.path : req.source.buffer;
  const reject = (code: RejectCode, reason: string): IngestOutcome => ({ outcome: 'rejected', fileName, code, reason });

  await openCollection(req.collectionId);

  const byteSize = typeof source === 'string' ? (await stat(source)).size : source.length;
  if (byteSize === 0) return reject('empty', 'The file is empty (0 bytes).');
  if (byteSize > deps.limits.maxFileBytes) return reject('too-large', tooLargeReason(byteSize, deps.limits.maxFileBytes));
  // a scan of ordinary size is read once; everything below works on those bytes
  if (typeof source === 'string' && byteSize <= READ_WHOLE_BYTES) source = await readFile(source);

  const head = typeof source === 'string' ? await readHead(source, SNIFF_BYTES) : source.subarray(0, SNIFF_BYTES);
  const sniffed = sniffFormat(head);
  if (!sniffed.accepted) {
    const ext = extensionOf(fileName);
    const despite = ext && (Object.values(FORMAT_INFO).some((f) => f.extensions.includes(ext))) ? `, even though its name ends in .${ext}` : '';
    return reject('unsupported-format', `This is ${sniffed.what}${despite}, not a ${acceptedList} image. Cartouche reads the file itself to tell its format.`);
  }
  const format = sniffed.format;
  const label = FORMAT_INFO[format].label;

  const key = typeof source === 'string' ? await sha256OfFile(source) : Storage.keyOf(source);
  const known = await Item.findOne({ attributes: ['id', 'identifier'], where: { collectionId: req.collectionId, fileKey: key } });
  if (known) return duplicate(fileName, known);

  let meta: Metadata;
  try {
    // reads the header only; the pixel count is checked below, before anything is decoded
    meta = await sharp(source, { limitInputPixels: false }).metadata();
  } catch (err) {
    return reject('unreadable', `The ${label} header cannot be read, so the file is damaged or not really ${label} (${decoderMessage(err)}).`);
  }
  const pixels = meta.width * meta.height;
  if (pixels > deps.limits.maxPixels) return reject('too-many-pixels', tooManyPixels(meta.width, meta.height, deps.limits.maxPixels));

  let derived: Awaited<ReturnType<typeof makeDerivatives>>;
  try {
    const view = (req.reviewImage ?? (req.origin === 'drop-folder' ? 'when-needed' : 'now')) === 'now';
    derived = await makeDerivatives(source, deps.limits.maxPixels, deps.sizes ?? DEFAULT_SIZES, { embedInput: req.embedInput, view });
  } catch (err) {
    const message = decoderMessage(err);
    if (/pixel limit/i.test(message)) return reject('too-many-pixels', tooManyPixels(meta.width, meta.height, deps.limits.maxPixels));
    if (/premature end|truncat|unexpected end|end of (file|stream|data)|read error|not enough data/i.test(message)) {
      return reject('truncated', `The ${label} file ends before its image data does: it is incomplete (truncated), perhaps by an interrupted copy or transfer. Send the complete file. (${message})`);
    }
    return reject('damaged', `The ${label} image data is damaged and cannot be decoded (${message}).`);
  }

  const notes: string[] = [];
  const named = extensionNote(fileName, format);
  if (named) notes.push(named);
  if ((meta.pages ?? 1) > 1) notes.push(`The file holds ${meta.pages} pages or frames; the first is used.`);

  if (typeof source === 'string') await putFile(deps.storage, source, key);
  else await deps.storage.put(source);
  const thumbKey = await deps.storage.put(derived.thumb);
  const viewKey = derived.view ? await deps.storage.put(derived.view) : null;
  const upright = meta.autoOrient ?? { width: meta.width, height: meta.height };

  const wanted = req.identifier ? cleanIdentifier(req.identifier) : '';
  const outcome = await deps.sequelize.transaction(async (transaction) => {
    // one intake at a time per collection for these few statements: the duplicate check and the identifier stay true
    await Collection.findByPk(req.collectionId, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
    const raced = await Item.findOne({ attributes: ['id', 'identifier'], where: { collectionId: req.collectionId, fileKey: key }, transaction });
    if (raced) return { raced: true as const, item: raced };
    const identifier = await uniqueIdentifier(req.collectionId, wanted || identifierFromFileName(fileName), transaction);
    const item = await Item.create(
      {
        collectionId: req.collectionId,
        identifier,
        fileName,
        fileKey: key,
        thumbKey,
        viewKey,
        mimeType: FORMAT_INFO[format].mimeType,
        width: upright.width,
        height: upright.height,
        byteSize,
        caption: null,
        creator: null,
        dateText: null,
        rights: null,
        captionFlagNote: null,
        altText: null,
        longDescription: null,
        ocrText: null,
        approvedBy: null,
        approvedAt: null,
      },
      { transaction },
    );
    await audit(
      { action: 'item-ingested', actorId: req.actorId ?? null, targetType: 'item', targetId: item.id, detail: { collectionId: req.collectionId, fileName, origin: req.origin, format, sha256: key } },
      transaction,
    );
    return { raced: false as const, item };
  });
  // the same bytes arrived through another request while this one worked: report the item that won
  if (outcome.raced) return duplicate(fileName, outcome.item);
  const created = outcome.item;
  if (wanted && created.identifier !== wanted) notes.push(`The identifier ${wanted} is already used in this collection; this item is ${created.identifier}.`);
  return {
    outcome: 'ingested',
    fileName,
    itemId: created.id,
    identifier: created.identifier,
    format,
    mimeType: FORMAT_INFO[format].mimeType,
    width: upright.width,
    height: upright.height,
    byteSize,
    notes,
    ...(derived.embedInput ? { embedInput: derived.embedInput } : {}),
  };
}

/** Refuses intake into a collection that does not exist or is archived (an exception: no file is at fault). */
export async function openCollection(collectionId: number): Promise<Collection> {
  const collection = await Collection.findByPk(collectionId);
  if (!collection) throw new HttpProblem(404, 'Not found', `There is no collection ${collectionId}.`);
  if (collection.archivedAt) {
    throw new HttpProblem(409, 'Collection archived', `${collection.name} is archived; it takes no new scans or catalogue records.`, { type: '/problems/conflict' });
  }
  return collection;
}

export function tooLargeReason(byteSize: number, maxBytes: number): string {
  return `The file is ${sizeWords(byteSize)}; Cartouche takes scans of up to ${sizeWords(maxBytes)}.`;
}

/**
 * The derivative keys of an item, making what it lacks from its stored original: both for items that arrived
 * before derivatives were made at intake (e.g. loaded demo data), the review image alone for scans the night
 * shift took from a drop folder (it makes that one when first needed); a thumbnail it has is kept. Changes only
 * the keys, not the item's version: no editor's copy becomes stale because a thumbnail was made. Two requests
 * at once both make the same bytes under the same content key, so either may win.
 */
export async function ensureDerivatives(deps: IngestDeps, item: Pick<Item, 'id' | 'fileKey' | 'thumbKey' | 'viewKey'>): Promise<{ thumbKey: string; viewKey: string }> {
  if (item.thumbKey && item.viewKey) return { thumbKey: item.thumbKey, viewKey: item.viewKey };
  if (!item.fileKey || !(await deps.storage.has(item.fileKey))) {
    throw new HttpProblem(404, 'No image', `Item ${item.id} has no stored scan, so it has no thumbnail or review image.`, { type: '/problems/no-image' });
  }
  let derived: Awaited<ReturnType<typeof makeDerivatives>>;
  try {
    derived = await makeDerivatives(deps.storage.pathOf(item.fileKey), deps.limits.maxPixels, deps.sizes ?? DEFAULT_SIZES);
  } catch (err) {
    throw new HttpProblem(422, 'Scan not decodable', `The stored scan of item ${item.id} cannot be decoded (${decoderMessage(err)}).`, { type: '/problems/scan-not-decodable' });
  }
  const thumbKey = item.thumbKey ?? (await deps.storage.put(derived.thumb));
  const viewKey = await deps.storage.put(derived.view!);
  await deps.sequelize.query('UPDATE items SET thumb_key = :thumbKey, view_key = :viewKey WHERE id = :id', { replacements: { thumbKey, viewKey, id: item.id } });
  return { thumbKey, viewKey };
}

function duplicate(fileName: string, item: Pick<Item, 'id' | 'identifier'>): IngestOutcome {
  return {
    outcome: 'duplicate',
    fileName,
    itemId: item.id,
    identifier: item.identifier,
    reason: `The same bytes are already in this collection as ${item.identifier}; nothing new was added.`,
  };
}

function tooManyPixels(width: number, height: number, max: number): string {
  const mp = (n: number) => numberWords.format(Math.round(n / 100_000) / 10);
  return (
    `The image declares ${numberWords.format(width)} × ${numberWords.format(height)} pixels (${mp(width * height)} megapixels); ` +
    `Cartouche opens images of up to ${mp(max)} megapixels, so it was not decoded. An image that unpacks to so many pixels ` +
    `could fill the server's memory (a decompression bomb); a genuine scan this large can be reduced before intake.`
  );
}

function decoderMessage(err: unknown): string {
  const text = err instanceof Error ? err.message : String(err);
  return text.split('\n').map((l) => l.trim()).filter(Boolean).slice(0, 2).join('; ').slice(0, 300);
}
