/**
 * Switching the embedder (TF.js → the ONNX default): features are stored per embedder id, so the next
 * night-shift run embeds again — items and examples that have no feature from the current embedder —
 * and retrains the subject models for it, while the old features stay untouched; a ranking only ever
 * reads the features of one embedder.
 */
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { EmbeddingPool } from '../../jobs/src/embed-pool.ts';
import { createTasks } from '../../jobs/src/tasks/index.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { createEmbedder, defaultEmbedderConfig, ONNX_EMBEDDER_ID, TFJS_EMBEDDER_ID, type Embedder } from '../../server/src/ml/backbone/embedder.ts';
import { Embedding, Example, Item, Run, SubjectModel } from '../../server/src/models/index.ts';
import { embedStoredFile, loadItemMatrix, prepareCollection } from '../../server/src/services/features.ts';
import { startRun } from '../../server/src/services/runs.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { synthesizeSubjectModel } from '../../server/src/services/subject-models.ts';
import { buildDemoScenario, renderItemImage } from '../../scripts/demo/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';
import { startTestSmtp } from '../helpers/mail.ts';

let sequelize: Sequelize;
let config: AppConfig;
let tfjs: Embedder;
let pool: EmbeddingPool;
let smtp: Awaited<ReturnType<typeof startTestSmtp>>;
const plates = buildDemoScenario().collections[0]!;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  smtp = await startTestSmtp();
  config = { ...config, smtp: { ...config.smtp, port: smtp.port }, mailDir: smtp.mailDir };
  tfjs = await createEmbedder(defaultEmbedderConfig());
  pool = await EmbeddingPool.start(1, { kind: 'builtin', runtime: 'onnx', cacheDir: config.embedder.modelCacheDir });
}, 120_000);
afterAll(async () => {
  tfjs?.dispose();
  pool?.dispose();
  await smtp?.close();
  await sequelize?.close();
});
beforeEach(async () => resetDatabase(sequelize));

describe('switching from TF.js to the ONNX embedder', () => {
  it('re-embeds lazily on the next run, retrains for the new embedder, and never mixes the two in a ranking', { timeout: 180_000 }, async () => {
    expect(pool.embedder.id).toBe(ONNX_EMBEDDER_ID);
    const storage = new Storage(config.storageDir);
    const c = await makeCollection();
    const subject = await makeSubject(c, { prefLabel: 'lighthouse', status: 'active' });
    const items: Item[] = [];
    for (const d of plates.items.slice(0, 5)) {
      const bytes = (await renderItemImage(d, plates.medium, { width: 360 })).data;
      const fileKey = await storage.put(bytes);
      const item = await Item.create({ collectionId: c.id, identifier: d.identifier, fileName: d.fileName, fileKey, mimeType: 'image/jpeg', width: null, height: null, byteSize: bytes.length, caption: d.caption, creator: null, dateText: null, rights: null, captionFlagNote: null, altText: null, longDescription: null, ocrText: null, approvedBy: null, approvedAt: null });
      await embedStoredFile(tfjs, storage, { type: 'item', id: item.id }, fileKey);
      items.push(item);
    }
    for (const d of plates.items.filter((i) => i.truth.includes('lighthouse')).slice(10, 12)) {
      const key = await storage.put((await renderItemImage(d, plates.medium, { width: 360 })).data);
      const ex = await Example.create({ subjectId: subject.id, medium: 'illustration', origin: 'uploaded', fileKey: key, itemId: null, createdBy: null });
      await embedStoredFile(tfjs, storage, { type: 'example', id: ex.id }, key);
    }
    await synthesizeSubjectModel(sequelize, tfjs, subject.id, { mode: 'from-examples' }, null);
    const tfjsRowsBefore = (await Embedding.findAll({ where: { embedderId: TFJS_EMBEDDER_ID }, order: [['id', 'ASC']] })).map((e) => [e.ownerType, e.ownerId, Buffer.from(e.vector).toString('base64')]);
    expect(tfjsRowsBefore).toHaveLength(7);

    // before the run the ONNX side of the collection is empty: nothing from TF.js leaks into it
    const empty = await prepareCollection(sequelize, c.id, pool.embedder);
    expect(empty.itemIds).toEqual([]);
    expect(empty.examples).toEqual([]);

    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool }) });
    const run = await startRun(sequelize, c.id, 'manual', null);
    expect(await worker.runOnce()).toBe(true);
    const done = await Run.findByPk(run.id);
    expect(done?.status).toBe('succeeded');
    expect(done?.counts).toMatchObject({ embedded: 5 });

    // every item and example now has an ONNX feature too; the TF.js rows are exactly as they were
    expect(await Embedding.count({ where: { embedderId: ONNX_EMBEDDER_ID, ownerType: 'item' } })).toBe(5);
    expect(await Embedding.count({ where: { embedderId: ONNX_EMBEDDER_ID, ownerType: 'example' } })).toBe(2);
    const tfjsRowsAfter = (await Embedding.findAll({ where: { embedderId: TFJS_EMBEDDER_ID }, order: [['id', 'ASC']] })).map((e) => [e.ownerType, e.ownerId, Buffer.from(e.vector).toString('base64')]);
    expect(tfjsRowsAfter).toEqual(tfjsRowsBefore);
    // a subject model for the new embedder was trained; the TF.js one is kept for its own features
    expect(await SubjectModel.count({ where: { subjectId: subject.id, embedderId: ONNX_EMBEDDER_ID, active: true } })).toBe(1);
    expect(await SubjectModel.count({ where: { subjectId: subject.id, embedderId: TFJS_EMBEDDER_ID, active: true } })).toBe(1);

    // each embedder's matrix holds its own rows only (close, since the two agree to ~1e-6, but not the same rows)
    const onnxMatrix = await loadItemMatrix(sequelize, c.id, ONNX_EMBEDDER_ID, 240);
    const tfjsMatrix = await loadItemMatrix(sequelize, c.id, TFJS_EMBEDDER_ID, 240);
    expect(onnxMatrix.itemIds).toEqual(items.map((i) => i.id));
    expect(tfjsMatrix.itemIds).toEqual(items.map((i) => i.id));
    expect(Buffer.from(onnxMatrix.raw.buffer).equals(Buffer.from(tfjsMatrix.raw.buffer))).toBe(false);

    // a new scan embedded by TF.js only is not in the ONNX ranking until the ONNX embedder has seen it
    const d = plates.items[7]!;
    const bytes = (await renderItemImage(d, plates.medium, { width: 360 })).data;
    const fileKey = await storage.put(bytes);
    const late = await Item.create({ collectionId: c.id, identifier: d.identifier, fileName: d.fileName, fileKey, mimeType: 'image/jpeg', width: null, height: null, byteSize: bytes.length, caption: d.caption, creator: null, dateText: null, rights: null, captionFlagNote: null, altText: null, longDescription: null, ocrText: null, approvedBy: null, approvedAt: null });
    await embedStoredFile(tfjs, storage, { type: 'item', id: late.id }, fileKey);
    const prepared = await prepareCollection(sequelize, c.id, pool.embedder);
    expect(prepared.embedderId).toBe(ONNX_EMBEDDER_ID);
    expect(prepared.itemIds).not.toContain(late.id);
    expect(prepared.examples).toHaveLength(2);
    expect((await prepareCollection(sequelize, c.id, tfjs)).itemIds).toContain(late.id);
  });
});
