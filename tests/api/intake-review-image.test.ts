// Scans the night shift takes from a drop folder are decoded at thumbnail size only; their review-size image is
// made the first time someone needs it. These tests pin what that must not change: the same refusals, the same
// upright thumbnail, and a review image that appears — once — when asked for.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Sequelize } from 'sequelize';
import sharp from 'sharp';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Item } from '../../server/src/models/index.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection } from '../helpers/fixtures.ts';
import { signIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let storage: Storage;

beforeAll(async () => {
  const dataDir = mkdtempSync(join(tmpdir(), 'cartouche-review-image-'));
  ({ sequelize, config } = await openTestDatabase({ dataDir, storageDir: join(dataDir, 'storage') }));
  storage = new Storage(config.storageDir);
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

/** A scan with structure in it (so the JPEG is not trivially small): circles on a gradient, 3000 × 2000 unless told. */
async function scanJpeg(width = 3000, height = 2000, orientation?: number): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">
    <defs><linearGradient id="g"><stop offset="0" stop-color="#2b4a6f"/><stop offset="1" stop-color="#e8d9b0"/></linearGradient></defs>
    <rect width="100%" height="100%" fill="url(#g)"/>
    ${Array.from({ length: 40 }, (_, i) => `<circle cx="${(i * 997) % width}" cy="${(i * 613) % height}" r="${40 + (i % 7) * 30}" fill="#${((i * 2654435761) >>> 8).toString(16).padStart(6, '0').slice(0, 6)}"/>`).join('')}
  </svg>`;
  const img = sharp(Buffer.from(svg)).jpeg({ quality: 88 });
  return (orientation ? img.withMetadata({ orientation }) : img).toBuffer();
}

const deps = () => ({ sequelize, storage, limits: intakeLimits() });
const dims = async (key: string | null) => {
  expect(key).toBeTruthy();
  const m = await sharp(storage.pathOf(key!)).metadata();
  return [m.width, m.height];
};

describe('intake from the drop folder: review image made when first needed', () => {
  it('stores the scan and an upright thumbnail at once, and no review image yet', async () => {
    const c = await makeCollection();
    const out = await ingestFile(deps(), { collectionId: c.id, fileName: 'quay-001.jpg', source: { buffer: await scanJpeg() }, origin: 'drop-folder', embedInput: true });
    expect(out).toMatchObject({ outcome: 'ingested', width: 3000, height: 2000 });
    if (out.outcome !== 'ingested') throw new Error('not ingested');
    const item = (await Item.findByPk(out.itemId))!;
    expect(item.viewKey).toBeNull();
    expect(await dims(item.thumbKey)).toEqual([320, 213]);
    expect(await storage.has(item.fileKey!)).toBe(true);
    // the embedding input is the thumbnail's own pixels, losslessly
    const embed = await sharp(out.embedInput!).metadata();
    expect([embed.format, embed.width, embed.height]).toEqual(['png', 320, 213]);
  });

  it('turns a sideways scan upright in the thumbnail (EXIF 2.3 Orientation 6: rotate 90° clockwise)', async () => {
    const c = await makeCollection();
    const out = await ingestFile(deps(), { collectionId: c.id, fileName: 'sideways.jpg', source: { buffer: await scanJpeg(1200, 900, 6) }, origin: 'drop-folder' });
    if (out.outcome !== 'ingested') throw new Error(`not ingested: ${JSON.stringify(out)}`);
    expect([out.width, out.height]).toEqual([900, 1200]);
    expect(await dims((await Item.findByPk(out.itemId))!.thumbKey)).toEqual([240, 320]);
  });

  it('refuses a truncated JPEG just as the full decode does: the shrunk decode still reads every byte', async () => {
    const c = await makeCollection();
    const whole = await scanJpeg();
    for (const origin of ['drop-folder', 'upload'] as const) {
      const out = await ingestFile(deps(), { collectionId: c.id, fileName: `cut-${origin}.jpg`, source: { buffer: whole.subarray(0, Math.floor(whole.length * 0.97)) }, origin });
      expect(out).toMatchObject({ outcome: 'rejected', code: 'truncated' });
    }
    expect(await Item.count()).toBe(0);
  });

  it('makes the review image on the first request, keeps the thumbnail, and serves the same bytes afterwards', async () => {
    const c = await makeCollection();
    const out = await ingestFile(deps(), { collectionId: c.id, fileName: 'quay-002.jpg', source: { buffer: await scanJpeg() }, origin: 'drop-folder' });
    if (out.outcome !== 'ingested') throw new Error('not ingested');
    const before = (await Item.findByPk(out.itemId))!;

    const { agent } = await signIn(createApp({ config, sequelize }), 'editor');
    const first = await agent.get(`/api/items/${out.itemId}/view`).buffer(true).expect(200);
    expect(first.headers['content-type']).toBe('image/jpeg');
    const m = await sharp(first.body as Buffer).metadata();
    expect([m.width, m.height]).toEqual([1600, 1067]);

    const after = (await Item.findByPk(out.itemId))!;
    expect(after.viewKey).toMatch(/^[0-9a-f]{64}$/);
    expect(after.thumbKey).toBe(before.thumbKey);
    expect(after.version).toBe(before.version);
    const second = await agent.get(`/api/items/${out.itemId}/view`).buffer(true).expect(200);
    expect(Buffer.compare(second.body as Buffer, first.body as Buffer)).toBe(0);
  });

  it('still makes the review image at once for an upload (its sender is about to look at it)', async () => {
    const c = await makeCollection();
    const out = await ingestFile(deps(), { collectionId: c.id, fileName: 'quay-003.jpg', source: { buffer: await scanJpeg() }, origin: 'upload' });
    if (out.outcome !== 'ingested') throw new Error('not ingested');
    expect(await dims((await Item.findByPk(out.itemId))!.viewKey)).toEqual([1600, 1067]);
  });
});
