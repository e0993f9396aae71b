import sharp from 'sharp';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AppConfig } from '../../server/src/config.ts';
import { Item, ItemTextRead } from '../../server/src/models/index.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { OCR_ENGINE, ocrPendingItems } from '../../server/src/services/ocr.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem } from '../helpers/fixtures.ts';

let sequelize: Sequelize;
let config: AppConfig;
let storage: Storage;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  await resetDatabase(sequelize);
  storage = new Storage(config.storageDir);
});
afterAll(async () => {
  await sequelize.close();
});

/** Renders lines of text (DejaVu Sans, Debian's fonts-dejavu) on paper, with an optional drawing beside them. */
async function rendered(lines: string[], opts: { width?: number; height?: number; drawing?: boolean } = {}): Promise<Buffer> {
  const width = opts.width ?? 1000;
  const height = opts.height ?? 120 + lines.length * 70;
  const text = lines.map((l, i) => `<text x="50" y="${100 + i * 70}" font-family="DejaVu Sans" font-size="48" fill="#1d1b18">${l}</text>`).join('');
  const drawing = opts.drawing ? '<path d="M100 900 L400 300 L700 900 Z" fill="none" stroke="#333" stroke-width="8"/><circle cx="400" cy="600" r="120" fill="#777"/>' : '';
  return sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}"><rect width="100%" height="100%" fill="#f4efe2"/>${text}${drawing}</svg>`)).png().toBuffer();
}

async function ingest(collectionId: number, fileName: string, data: Buffer): Promise<number> {
  const outcome = await ingestFile({ sequelize, storage, limits: intakeLimits({}) }, { collectionId, fileName, source: { buffer: data }, origin: 'upload' });
  if (outcome.outcome !== 'ingested') throw new Error(JSON.stringify(outcome));
  return outcome.itemId;
}

describe('OCR of review-size images (tesseract.js with @tesseract.js-data/eng, offline)', () => {
  it('reads a rendered line exactly, flags a page of text as mostly text, is idempotent and survives a bad image', async () => {
    const c = await makeCollection();
    const poster = await ingest(c.id, 'regatta-poster.png', await rendered(['KESTRELMOUTH REGATTA'], { height: 1000, drawing: true }));
    const notice = await ingest(
      c.id,
      'harbour-notice.png',
      await rendered(['NOTICE TO MARINERS', 'The harbour light will be', 'extinguished for repairs on', 'the nights of the ninth and', 'tenth of March. Vessels are', 'to keep well clear of the pier.'], { width: 800 }),
    );
    // an item whose stored scan is gone: it is recorded as failed and does not stop the others
    const broken = await makeItem(c);
    await broken.update({ fileKey: 'f'.repeat(64) });

    const progress: number[] = [];
    // two workers at once, as the night shift reads: progress counts finished items
    const first = await ocrPendingItems({ sequelize, storage }, c.id, { workers: 2, onProgress: (done) => void progress.push(done) });
    expect(first.read).toBe(2);
    expect(first.failed.map((f) => f.itemId)).toEqual([broken.id]);
    expect(progress).toEqual([1, 2, 3]);

    const posterItem = await Item.findByPk(poster);
    expect(posterItem?.ocrText).toBe('KESTRELMOUTH REGATTA');
    const posterRead = await ItemTextRead.findByPk(poster);
    expect(posterRead).toMatchObject({ engine: OCR_ENGINE, mostlyText: false });
    expect(posterRead!.confidence).toBeGreaterThan(80);
    const noticeRead = await ItemTextRead.findByPk(notice);
    // WCAG 2.2 SC 1.4.5 Images of Text: a page that is all text is flagged for the editor
    expect(noticeRead?.mostlyText).toBe(true);
    expect((await Item.findByPk(notice))?.ocrText).toContain('NOTICE TO MARINERS');
    expect((await ItemTextRead.findByPk(broken.id))?.error).toBeTruthy();

    // a second run reads nothing new; a run told to stop leaves the rest for the next one
    const again = await ocrPendingItems({ sequelize, storage }, c.id);
    expect(again).toEqual({ read: 0, failed: [], mostlyText: 0, left: 0 });
    const later = await ingest(c.id, 'later.png', await rendered(['PIER TOLLS']));
    const stopped = await ocrPendingItems({ sequelize, storage }, c.id, { shouldStop: () => true });
    expect(stopped.left).toBe(1);
    expect(await ItemTextRead.findByPk(later)).toBeNull();
    expect((await ocrPendingItems({ sequelize, storage }, c.id)).read).toBe(1);
  }, 120_000);
});
