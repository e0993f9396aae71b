import { readFile } from 'node:fs/promises';
import { availableParallelism } from 'node:os';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { QueryTypes, type Sequelize } from 'sequelize';
import sharp from 'sharp';
import { createWorker, type Worker } from 'tesseract.js';
import { logger } from '../logger.ts';
import { Item, ItemTextRead } from '../models/index.ts';
import { syncSearchText } from './catalogue.ts';
import { ensureDerivatives, intakeLimits } from './ingest.ts';
import type { Storage } from './storage.ts';

/**
 * Text in the image: tesseract.js with the English data of the npm package @tesseract.js-data/eng, read from
 * node_modules (never downloaded), run on each item's review-size image. Only confident words are kept, so the
 * hatching of an engraving does not turn into letters; an item whose confident lines cover much of the image is
 * flagged as mostly text (WCAG 2.2 SC 1.4.5 Images of Text: its words belong in the alt text or the long
 * description).
 */

const require = createRequire(import.meta.url);
const LANG_PATH = join(dirname(require.resolve('@tesseract.js-data/eng/package.json')), '4.0.0_best_int');
const TESSERACT_VERSION = (require('tesseract.js/package.json') as { version: string }).version;

/** a word is kept at this confidence (0–100) or above */
export const MIN_WORD_CONFIDENCE = 70;
/** mostly text: confident lines cover at least this share of the image and hold at least MOSTLY_TEXT_WORDS words */
export const MOSTLY_TEXT_AREA = 0.2;
export const MOSTLY_TEXT_WORDS = 10;
/**
 * Page segmentation mode 3, fully automatic: tesseract finds the text regions itself. Left unset, the library's
 * API default (6, one uniform block of text) reads a whole engraving as if it were a page of text; on the demo
 * scans (`npx tsx scripts/bench/review.ts`) mode 3 took about half the CPU time, found more of the drawn words and
 * kept far fewer stray ones. Measured and not kept: a smaller input (1400, 1200, 1000 px: no faster, or fewer
 * words found), sparse-text mode 11 (faster, fewer words), no inverted-line pass (loses light-on-dark posters).
 */
export const OCR_PAGE_SEGMENTATION = '3';
/** changes whenever the engine, its data, how it reads or the filter above change: every item is then read again */
export const OCR_ENGINE = `tesseract.js@${TESSERACT_VERSION}+eng-4.0.0_best_int+psm${OCR_PAGE_SEGMENTATION}+words>=${MIN_WORD_CONFIDENCE}`;

/**
 * tesseract.js workers the night shift reads with at once (`CARTOUCHE_OCR_WORKERS`, 1–8); each is one thread.
 * By default one per core, at most 2: the text stage runs after suggest, when the embedding threads are idle.
 */
export function ocrWorkers(env: NodeJS.ProcessEnv = process.env): number {
  const raw = env.CARTOUCHE_OCR_WORKERS;
  if (raw === undefined || raw === '') return Math.max(1, Math.min(2, availableParallelism()));
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 8) throw new Error(`CARTOUCHE_OCR_WORKERS must be a whole number from 1 to 8, got "${raw}"`);
  return n;
}

export interface TextReading {
  /** confident lines, one per line; '' when none */
  text: string;
  /** mean confidence of the kept words, null when none was kept */
  confidence: number | null;
  /** share of the image covered by the kept lines' boxes */
  textArea: number;
  words: number;
  mostlyText: boolean;
}

export async function createOcrWorker(): Promise<Worker> {
  const worker = await createWorker('eng', 1, { langPath: LANG_PATH, cacheMethod: 'none', gzip: true });
  try {
    // debug_file: tesseract's own progress lines ("Estimating resolution as …") go nowhere instead of the worker's log
    await worker.setParameters({ tessedit_pageseg_mode: OCR_PAGE_SEGMENTATION as never, debug_file: '/dev/null' } as never);
  } catch (err) {
    await worker.terminate();
    throw err;
  }
  return worker;
}

interface OcrWord { text: string; confidence: number }
interface OcrLine { words: OcrWord[]; bbox: { x0: number; y0: number; x1: number; y1: number } }

/** Reads one image (bytes of a JPEG, PNG, …) with a worker made by createOcrWorker. */
export async function readImageText(worker: Worker, image: Buffer): Promise<TextReading> {
  const { data } = await worker.recognize(image, {}, { blocks: true, text: false });
  const lines: OcrLine[] = (data.blocks ?? []).flatMap((b) => b.paragraphs.flatMap((p) => p.lines as unknown as OcrLine[]));
  const kept: Array<{ text: string; area: number; confidences: number[] }> = [];
  let maxX = 0;
  let maxY = 0;
  for (const line of lines) {
    maxX = Math.max(maxX, line.bbox.x1);
    maxY = Math.max(maxY, line.bbox.y1);
    const words = line.words.filter((w) => w.confidence >= MIN_WORD_CONFIDENCE && /[\p{L}\p{N}]/u.test(w.text));
    if (words.length === 0) continue;
    kept.push({ text: words.map((w) => w.text).join(' '), area: (line.bbox.x1 - line.bbox.x0) * (line.bbox.y1 - line.bbox.y0), confidences: words.map((w) => w.confidence) });
  }
  const size = await imageArea(image, maxX, maxY);
  const confidences = kept.flatMap((k) => k.confidences);
  const textArea = size > 0 ? Math.min(1, kept.reduce((s, k) => s + k.area, 0) / size) : 0;
  return {
    text: kept.map((k) => k.text).join('\n'),
    confidence: confidences.length ? confidences.reduce((a, b) => a + b, 0) / confidences.length : null,
    textArea,
    words: confidences.length,
    mostlyText: textArea >= MOSTLY_TEXT_AREA && confidences.length >= MOSTLY_TEXT_WORDS,
  };
}

async function imageArea(image: Buffer, maxX: number, maxY: number): Promise<number> {
  try {
    const meta = await sharp(image).metadata();
    if (meta.width && meta.height) return meta.width * meta.height;
  } catch {
    // fall through: the extent of the lines found is the best estimate there is
  }
  return maxX * maxY;
}

export interface OcrContext {
  sequelize: Sequelize;
  storage: Storage;
}

export interface OcrRunResult {
  read: number;
  failed: Array<{ itemId: number; identifier: string; reason: string }>;
  mostlyText: number;
  /** items left for another run because shouldStop said so */
  left: number;
}

/** Reads one item now and stores what it found (the desk offers this when the night shift has not read it yet). */
export async function ocrItem(ctx: OcrContext, itemId: number, worker?: Worker): Promise<TextReading> {
  const own = worker ? null : await createOcrWorker();
  try {
    const item = await Item.findByPk(itemId, { attributes: ['id', 'identifier', 'fileKey', 'thumbKey', 'viewKey'] });
    if (!item) throw new Error(`there is no item ${itemId}`);
    const { viewKey } = await ensureDerivatives({ sequelize: ctx.sequelize, storage: ctx.storage, limits: intakeLimits() }, item);
    const reading = await readImageText((worker ?? own)!, await readFile(ctx.storage.pathOf(viewKey)));
    await store(ctx.sequelize, itemId, reading, null);
    return reading;
  } finally {
    await own?.terminate();
  }
}

async function store(sequelize: Sequelize, itemId: number, reading: TextReading | null, error: string | null): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    await ItemTextRead.upsert(
      { itemId, engine: OCR_ENGINE, text: reading?.text ?? null, confidence: reading?.confidence ?? null, textArea: reading?.textArea ?? null, mostlyText: reading?.mostlyText ?? false, error, readAt: new Date() },
      { transaction },
    );
    if (reading) {
      await sequelize.query('UPDATE items SET ocr_text = :text, updated_at = NOW(3) WHERE id = :itemId', { replacements: { text: reading.text || null, itemId }, transaction });
      await syncSearchText(sequelize, [itemId], transaction);
    }
  });
}

/**
 * The night shift's OCR stage for one collection: reads every item with a scan not yet read by the current engine, on
 * `workers` tesseract.js workers at once (1 by default), each taking the next item when it is free. Idempotent (a
 * second run reads nothing new) and resumable (no item is started once shouldStop says so, and the next run goes
 * on with what is left). An image that cannot be read is recorded with its reason and never stops the others; it
 * is read again only by a newer engine. onProgress counts finished items.
 */
export async function ocrPendingItems(
  ctx: OcrContext,
  collectionId: number,
  opts: { workers?: number; shouldStop?: () => Promise<boolean> | boolean; onProgress?: (done: number, total: number) => Promise<void> | void } = {},
): Promise<OcrRunResult> {
  const pending = await ctx.sequelize.query<{ id: number; identifier: string }>(
    `SELECT i.id, i.identifier FROM items i
      WHERE i.collection_id = :collectionId AND i.file_key IS NOT NULL
        AND NOT EXISTS (SELECT 1 FROM item_text_reads r WHERE r.item_id = i.id AND r.engine = :engine)
      ORDER BY i.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId, engine: OCR_ENGINE } },
  );
  const result: OcrRunResult = { read: 0, failed: [], mostlyText: 0, left: 0 };
  if (pending.length === 0) return result;
  const n = Math.max(1, Math.min(opts.workers ?? 1, pending.length));
  const started = await Promise.allSettled(Array.from({ length: n }, () => createOcrWorker()));
  const workers = started.flatMap((w) => (w.status === 'fulfilled' ? [w.value] : []));
  try {
    const refused = started.find((w) => w.status === 'rejected');
    if (refused) throw refused.reason;
    let next = 0;
    let done = 0;
    let stopped = false;
    const lane = async (worker: Worker) => {
      for (;;) {
        if (stopped || next >= pending.length) return;
        if (await opts.shouldStop?.()) {
          stopped = true;
          return;
        }
        if (next >= pending.length) return;
        const row = pending[next++]!;
        try {
          const reading = await ocrItem(ctx, Number(row.id), worker);
          result.read++;
          if (reading.mostlyText) result.mostlyText++;
        } catch (err) {
          const reason = (err as Error).message;
          result.failed.push({ itemId: Number(row.id), identifier: row.identifier, reason });
          logger.warn({ itemId: row.id, reason }, 'ocr: item could not be read');
          await store(ctx.sequelize, Number(row.id), null, reason);
        }
        await opts.onProgress?.(++done, pending.length);
      }
    };
    await Promise.all(workers.map(lane));
    result.left = pending.length - next;
    result.failed.sort((a, b) => a.itemId - b.itemId);
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return result;
}
