import { existsSync, mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { deflateSync } from 'node:zlib';
import type { Sequelize } from 'sequelize';
import sharp, { type Sharp } from 'sharp';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { AuditEvent, Item } from '../../server/src/models/index.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection } from '../helpers/fixtures.ts';
import { signIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let storage: Storage;

beforeAll(async () => {
  const dataDir = mkdtempSync(join(tmpdir(), 'cartouche-intake-'));
  ({ sequelize, config } = await openTestDatabase({ dataDir, storageDir: join(dataDir, 'storage') }));
  storage = new Storage(config.storageDir);
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

const app = () => createApp({ config, sequelize });
const spool = () => join(config.dataDir, 'intake-spool');

/** A photograph-like test scan: a gradient with a little deterministic noise (compresses like a real scan). */
async function scan(width: number, height: number, seed = 1): Promise<Sharp> {
  const px = Buffer.alloc(width * height * 3);
  let s = seed;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      s = (s * 1103515245 + 12345) & 0x7fffffff;
      const i = (y * width + x) * 3;
      px[i] = ((x * 255) / width + (s % 17)) & 255;
      px[i + 1] = ((y * 255) / height + (s % 13)) & 255;
      px[i + 2] = (x + y + seed * 40) & 255;
    }
  }
  return sharp(px, { raw: { width, height, channels: 3 } });
}

// CRC-32 as the PNG specification defines it (W3C / ISO/IEC 15948, Annex D: polynomial 0xEDB88320, reflected)
const crcTable = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});
function crc32(buf: Buffer): number {
  let c = 0xffffffff;
  for (const b of buf) c = crcTable[(c ^ b) & 0xff]! ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}
function chunk(type: string, data: Buffer): Buffer {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([len, body, crc]);
}

/**
 * A decompression bomb in a few hundred bytes: a PNG whose IHDR declares 30000 × 30000 8-bit RGB pixels
 * (2.7 GB decoded) followed by a small IDAT. Chunk layout and IHDR fields per the PNG specification §11.2.2.
 */
function pixelBomb(): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(30000, 0);
  ihdr.writeUInt32BE(30000, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type: truecolour
  // compression 0, filter 0, interlace 0
  const rows = deflateSync(Buffer.alloc((30000 * 3 + 1) * 4));
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', rows),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

function upload(agent: request.Agent, csrf: string, collectionId: number, files: Array<[name: string, data: Buffer]>) {
  let req = agent.post(`/api/collections/${collectionId}/items/upload`).set('x-csrf-token', csrf);
  for (const [name, data] of files) req = req.attach('files', data, name);
  return req;
}

async function decoded(key: string | null) {
  expect(key).toMatch(/^[0-9a-f]{64}$/);
  return sharp(storage.pathOf(key!)).metadata();
}

describe('uploading scans', () => {
  it('ingests a JPEG, a PNG with alpha, a TIFF and a WebP; refuses a truncated JPEG, a text file named .jpg and a pixel bomb, each with its reason; the batch completes', async () => {
    const a = app();
    const { agent, csrf, user } = await signIn(a, 'archivist');
    const c = await makeCollection({ name: 'Harbour plates' });

    const jpeg = await (await scan(1200, 900, 1)).jpeg({ quality: 90 }).toBuffer();
    const alpha = await sharp({ create: { width: 400, height: 300, channels: 4, background: { r: 31, g: 100, b: 114, alpha: 0.5 } } }).png().toBuffer();
    const tiff = await (await scan(2000, 1000, 3)).tiff({ compression: 'lzw' }).toBuffer();
    const webp = await (await scan(300, 500, 4)).webp().toBuffer();
    const whole = await (await scan(640, 480, 5)).jpeg({ quality: 95 }).toBuffer();
    const truncated = whole.subarray(0, Math.floor(whole.length * 0.6));
    const text = Buffer.from('Kestrelmouth Harbour Museum, accession ledger 1903.\nPlate 12: the east pier at low water.\n');
    const bomb = pixelBomb();
    expect(bomb.length).toBeLessThan(2000);

    const res = await upload(agent, csrf, c.id, [
      ['east-pier.jpg', jpeg],
      ['lantern.png', alpha],
      ['net lofts 1903.tif', tiff],
      ['pilot-cutter.webp', webp],
      ['broken.jpg', truncated],
      ['ledger.jpg', text],
      ['bomb.png', bomb],
    ]).expect(200);

    const outcomes = res.body.outcomes as Array<Record<string, unknown>>;
    expect(outcomes.map((o) => [o.fileName, o.outcome])).toEqual([
      ['east-pier.jpg', 'ingested'],
      ['lantern.png', 'ingested'],
      ['net lofts 1903.tif', 'ingested'],
      ['pilot-cutter.webp', 'ingested'],
      ['broken.jpg', 'rejected'],
      ['ledger.jpg', 'rejected'],
      ['bomb.png', 'rejected'],
    ]);
    expect(res.body.counts).toEqual({ ingested: 4, duplicate: 0, rejected: 3, failed: 0 });
    expect(outcomes.slice(0, 4).map((o) => o.format)).toEqual(['jpeg', 'png', 'tiff', 'webp']);
    expect(outcomes[4]).toMatchObject({ code: 'truncated', reason: expect.stringMatching(/JPEG file ends before its image data does.*truncated/) });
    expect(outcomes[5]).toMatchObject({ code: 'unsupported-format', reason: expect.stringMatching(/This is a text file, even though its name ends in \.jpg, not a JPEG, PNG, TIFF or WebP image/) });
    expect(outcomes[6]).toMatchObject({ code: 'too-many-pixels', reason: expect.stringMatching(/30,000 × 30,000 pixels \(900 megapixels\).*up to 100 megapixels/) });

    const items = await Item.findAll({ where: { collectionId: c.id }, order: [['id', 'ASC']] });
    expect(items.map((i) => [i.identifier, i.fileName, i.mimeType, i.width, i.height])).toEqual([
      ['EAST-PIER', 'east-pier.jpg', 'image/jpeg', 1200, 900],
      ['LANTERN', 'lantern.png', 'image/png', 400, 300],
      ['NET-LOFTS-1903', 'net lofts 1903.tif', 'image/tiff', 2000, 1000],
      ['PILOT-CUTTER', 'pilot-cutter.webp', 'image/webp', 300, 500],
    ]);
    for (const item of items) {
      expect(item.state).toBe('new');
      expect(item.fileKey).toBe(Storage.keyOf([jpeg, alpha, tiff, webp][items.indexOf(item)]!));
      expect(existsSync(storage.pathOf(item.fileKey!))).toBe(true);
      const thumb = await decoded(item.thumbKey);
      const view = await decoded(item.viewKey);
      expect([thumb.format, view.format]).toEqual(['jpeg', 'jpeg']);
      expect(Math.max(thumb.width, thumb.height)).toBe(Math.min(320, Math.max(item.width!, item.height!)));
      expect(Math.max(view.width, view.height)).toBe(Math.min(1600, Math.max(item.width!, item.height!)));
      // the aspect ratio survives (to the pixel)
      expect(Math.abs(view.width / view.height - item.width! / item.height!)).toBeLessThan(0.01);
    }
    // the half-transparent PNG is flattened on white: 50 % of (31, 100, 114) over white ≈ (143, 177, 184)
    const px = await sharp(storage.pathOf(items[1]!.viewKey!)).raw().toBuffer({ resolveWithObject: true });
    expect(px.info.channels).toBe(3);
    expect([...px.data.subarray(0, 3)].map((v) => Math.round(v / 4))).toEqual([143, 177, 184].map((v) => Math.round(v / 4)));

    expect(await AuditEvent.count({ where: { action: 'item-ingested', actorId: user.id } })).toBe(4);
    // nothing is left in the spool folder
    expect(readdirSync(spool())).toEqual([]);
  });

  it('recognises the same bytes in the same collection as a duplicate, whatever the name; another collection takes them', async () => {
    const a = app();
    const { agent, csrf } = await signIn(a, 'archivist');
    const plates = await makeCollection();
    const photos = await makeCollection();
    const jpeg = await (await scan(500, 400, 7)).jpeg().toBuffer();

    const first = await upload(agent, csrf, plates.id, [['quay.jpg', jpeg]]).expect(200);
    const itemId = first.body.outcomes[0].itemId as number;
    const again = await upload(agent, csrf, plates.id, [
      ['quay-copy.jpeg', jpeg],
      ['quay.jpg', jpeg],
    ]).expect(200);
    expect(again.body.outcomes).toEqual([
      { outcome: 'duplicate', fileName: 'quay-copy.jpeg', itemId, identifier: 'QUAY', reason: expect.stringContaining('already in this collection as QUAY') },
      { outcome: 'duplicate', fileName: 'quay.jpg', itemId, identifier: 'QUAY', reason: expect.any(String) },
    ]);
    expect(await Item.count({ where: { collectionId: plates.id } })).toBe(1);

    const elsewhere = await upload(agent, csrf, photos.id, [['quay.jpg', jpeg]]).expect(200);
    expect(elsewhere.body.outcomes[0]).toMatchObject({ outcome: 'ingested', identifier: 'QUAY' });
    expect(elsewhere.body.outcomes[0].itemId).not.toBe(itemId);
  });

  it('gives each new item an identifier unique in its collection, the same way every time', async () => {
    const { agent, csrf } = await signIn(app(), 'archivist');
    const c = await makeCollection();
    const res = await upload(agent, csrf, c.id, [
      ['plate 1.jpg', await (await scan(64, 64, 1)).jpeg().toBuffer()],
      ['Plate-1.png', await (await scan(64, 64, 2)).png().toBuffer()],
      ['plate_1.jpg', await (await scan(64, 64, 3)).jpeg().toBuffer()],
      ['plate  1.tif', await (await scan(64, 64, 4)).tiff().toBuffer()],
    ]).expect(200);
    expect(res.body.outcomes.map((o: { identifier: string }) => o.identifier)).toEqual(['PLATE-1', 'PLATE-1-2', 'PLATE_1', 'PLATE-1-3']);
  });

  it('turns a scan upright by its EXIF orientation in the derivatives (orientation 6: rotate 90° clockwise)', async () => {
    const { agent, csrf } = await signIn(app(), 'archivist');
    const c = await makeCollection();
    // stored 800 × 600 with Orientation = 6 (EXIF 2.3, tag 0x0112: "row 0 is the visual right-hand side")
    const rotated = await (await scan(800, 600, 9)).jpeg().withMetadata({ orientation: 6 }).toBuffer();
    expect((await sharp(rotated).metadata()).orientation).toBe(6);
    const res = await upload(agent, csrf, c.id, [['sideways.jpg', rotated]]).expect(200);
    expect(res.body.outcomes[0]).toMatchObject({ outcome: 'ingested', width: 600, height: 800 });
    const item = (await Item.findByPk(res.body.outcomes[0].itemId))!;
    expect([item.width, item.height]).toEqual([600, 800]);
    const view = await decoded(item.viewKey);
    const thumb = await decoded(item.thumbKey);
    expect([view.width, view.height]).toEqual([600, 800]);
    expect([thumb.width, thumb.height]).toEqual([240, 320]);
    // the derivatives carry no orientation of their own, so nothing turns them a second time
    expect(view.orientation).toBeUndefined();
  });

  it('serves the thumbnail and the review image with their type and a long cache life, to anyone who may read collections', async () => {
    const a = app();
    const archivist = await signIn(a, 'archivist');
    const c = await makeCollection();
    const res = await upload(archivist.agent, archivist.csrf, c.id, [['long-quay.png', await (await scan(2400, 1200, 11)).png().toBuffer()]]).expect(200);
    const itemId = res.body.outcomes[0].itemId as number;

    const manager = await signIn(a, 'manager');
    const thumb = await manager.agent.get(`/api/items/${itemId}/thumbnail`).buffer(true).expect(200);
    expect(thumb.headers['content-type']).toBe('image/jpeg');
    expect(thumb.headers['cache-control']).toBe('private, max-age=31536000, immutable');
    expect((await sharp(thumb.body as Buffer).metadata()).width).toBe(320);
    const view = await manager.agent.get(`/api/items/${itemId}/view`).buffer(true).expect(200);
    expect((await sharp(view.body as Buffer).metadata()).width).toBe(1600);
    await manager.agent.get(`/api/items/${itemId}/view`).set('if-none-match', view.headers.etag!).expect(304);
    await manager.agent.get('/api/items/999999/thumbnail').expect(404);
    await request(a).get(`/api/items/${itemId}/thumbnail`).expect(401);
  });

  it('makes the derivatives of an item that arrived without them (e.g. loaded data) on first request, without bumping its version', async () => {
    const a = app();
    const { agent } = await signIn(a, 'editor');
    const c = await makeCollection();
    const png = await (await scan(900, 300, 12)).png().toBuffer();
    const key = await storage.put(png);
    const item = await Item.create({
      collectionId: c.id, identifier: 'LOADED-1', fileName: 'loaded.png', fileKey: key, mimeType: 'image/png', width: 900, height: 300, byteSize: png.length,
      caption: null, creator: null, dateText: null, rights: null, captionFlagNote: null, altText: null, longDescription: null, ocrText: null, approvedBy: null, approvedAt: null,
    });
    const res = await agent.get(`/api/items/${item.id}/thumbnail`).buffer(true).expect(200);
    expect((await sharp(res.body as Buffer).metadata()).width).toBe(320);
    const after = (await Item.findByPk(item.id))!;
    expect(after.thumbKey).toMatch(/^[0-9a-f]{64}$/);
    expect(after.version).toBe(item.version);
  });

  it('refuses a file over the size limit alone, and takes the others of the same upload', async () => {
    process.env.CARTOUCHE_INTAKE_MAX_FILE_MB = '0.05';
    let a;
    try {
      a = app();
    } finally {
      delete process.env.CARTOUCHE_INTAKE_MAX_FILE_MB;
    }
    const { agent, csrf } = await signIn(a, 'archivist');
    const c = await makeCollection();
    const big = await (await scan(600, 600, 13)).png().toBuffer();
    expect(big.length).toBeGreaterThan(50_000);
    const small = await (await scan(80, 60, 14)).jpeg().toBuffer();
    const res = await upload(agent, csrf, c.id, [
      ['big.png', big],
      ['small.jpg', small],
    ]).expect(200);
    expect(res.body.outcomes[0]).toMatchObject({ outcome: 'rejected', code: 'too-large', reason: `The file is ${Math.round(big.length / 1000)} kB; Cartouche takes scans of up to 50 kB.` });
    expect(res.body.outcomes[1]).toMatchObject({ outcome: 'ingested', fileName: 'small.jpg' });
    expect(readdirSync(spool())).toEqual([]);
  });

  it('refuses an upload with more files than allowed as a whole, keeping nothing', async () => {
    process.env.CARTOUCHE_INTAKE_MAX_FILES = '2';
    let a;
    try {
      a = app();
    } finally {
      delete process.env.CARTOUCHE_INTAKE_MAX_FILES;
    }
    const { agent, csrf } = await signIn(a, 'archivist');
    const c = await makeCollection();
    const img = async (n: number) => (await scan(32, 32, n)).jpeg().toBuffer();
    const res = await upload(agent, csrf, c.id, [
      ['a.jpg', await img(1)],
      ['b.jpg', await img(2)],
      ['c.jpg', await img(3)],
    ]).expect(413);
    expect(res.body).toMatchObject({ title: 'Too many files', detail: expect.stringContaining('at most 2 files') });
    expect(await Item.count()).toBe(0);
    expect(readdirSync(spool())).toEqual([]);
  });

  it('answers clearly when there are no files, the collection is unknown or archived, or the role may not import', async () => {
    const a = app();
    const { agent, csrf } = await signIn(a, 'archivist');
    const c = await makeCollection();
    const none = await agent.post(`/api/collections/${c.id}/items/upload`).set('x-csrf-token', csrf).field('note', 'nothing attached').expect(400);
    expect(none.body.title).toBe('No files');
    const png = await (await scan(16, 16, 1)).png().toBuffer();
    await upload(agent, csrf, 999999, [['a.png', png]]).expect(404);
    const archived = await makeCollection({ archivedAt: new Date() });
    expect((await upload(agent, csrf, archived.id, [['a.png', png]]).expect(409)).body.title).toBe('Collection archived');
    const wrongField = await agent.post(`/api/collections/${c.id}/items/upload`).set('x-csrf-token', csrf).attach('scan', png, 'a.png').expect(400);
    expect(wrongField.body.detail).toContain('"files"');
    const editor = await signIn(a, 'editor');
    await upload(editor.agent, editor.csrf, c.id, [['a.png', png]]).expect(403);
    await upload(agent, 'not-the-token', c.id, [['a.png', png]]).expect(403);
    expect(await Item.count()).toBe(0);
  });

  it('ingests from a path or a buffer through the same service the night shift calls, and never throws for a bad file', async () => {
    const c = await makeCollection();
    const deps = { sequelize, storage, limits: intakeLimits({}) };
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-drop-'));
    const path = join(dir, 'drop 7.tif');
    await (await scan(300, 200, 21)).tiff().toFile(path);
    const fromPath = await ingestFile(deps, { collectionId: c.id, fileName: path, source: { path }, origin: 'drop-folder', identifier: 'KHM 1903/7' });
    expect(fromPath).toMatchObject({ outcome: 'ingested', fileName: 'drop 7.tif', identifier: 'KHM 1903/7', format: 'tiff', notes: [] });
    expect(existsSync(path)).toBe(true);
    const again = await ingestFile(deps, { collectionId: c.id, fileName: 'other.jpg', source: { buffer: await (await scan(30, 30, 22)).jpeg().toBuffer() }, origin: 'drop-folder', identifier: 'khm 1903/7' });
    expect(again).toMatchObject({ outcome: 'ingested', identifier: 'khm 1903/7-2', notes: ['The identifier khm 1903/7 is already used in this collection; this item is khm 1903/7-2.'] });
    const misnamed = await ingestFile(deps, { collectionId: c.id, fileName: 'looks-like.tif', source: { buffer: await (await scan(30, 30, 23)).png().toBuffer() }, origin: 'upload' });
    expect(misnamed).toMatchObject({ outcome: 'ingested', format: 'png', notes: ['Named .tif, but the file is a PNG image; it was read as PNG.'] });
    expect(await ingestFile(deps, { collectionId: c.id, fileName: 'empty.jpg', source: { buffer: Buffer.alloc(0) }, origin: 'drop-folder' })).toMatchObject({ outcome: 'rejected', code: 'empty' });
    await expect(ingestFile(deps, { collectionId: 999999, fileName: 'x.jpg', source: { buffer: Buffer.from('x') }, origin: 'drop-folder' })).rejects.toMatchObject({ status: 404 });
    const audit = await AuditEvent.findOne({ where: { action: 'item-ingested', targetId: String((fromPath as { itemId: number }).itemId) } });
    expect(audit?.actorId).toBeNull();
    expect(audit?.detail).toMatchObject({ origin: 'drop-folder', fileName: 'drop 7.tif', format: 'tiff' });
  });
});
