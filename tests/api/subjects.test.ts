import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Embedding, Item, SubjectModel, type Collection } from '../../server/src/models/index.ts';
import { embedStoredFile, processEmbedder } from '../../server/src/services/features.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { buildDemoScenario, renderItemImage, type DemoItem } from '../../scripts/demo/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';
import { signIn } from '../helpers/people.ts';

// Scans and examples are drawn by the demo renderer: these tests check behaviour (storage, versions,
// methods, ranking mechanics), not accuracy; accuracy is measured by the benchmark and the clip-art check.
let sequelize: Sequelize;
let config: AppConfig;
let storage: Storage;
const plates = buildDemoScenario().collections[0]!;
const withTruth = (key: string, n: number, skip = 0) => plates.items.filter((i) => i.truth.includes(key)).slice(skip, skip + n);
const images = new Map<string, Buffer>();
async function image(item: DemoItem): Promise<Buffer> {
  if (!images.has(item.identifier)) images.set(item.identifier, (await renderItemImage(item, plates.medium, { width: 480 })).data);
  return images.get(item.identifier)!;
}

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  storage = new Storage(config.storageDir);
  await processEmbedder();
}, 120_000);
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

async function addScans(collection: Collection, items: DemoItem[]): Promise<Item[]> {
  const embedder = await processEmbedder();
  const out: Item[] = [];
  const unique = [...new Map(items.map((d) => [d.identifier, d])).values()];
  for (const d of unique) {
    const bytes = await image(d);
    const fileKey = await storage.put(bytes);
    const item = await Item.create({ collectionId: collection.id, identifier: d.identifier, fileName: d.fileName, fileKey, mimeType: 'image/jpeg', width: null, height: null, byteSize: bytes.length, caption: d.caption, creator: null, dateText: null, rights: null, captionFlagNote: null, altText: null, longDescription: null, ocrText: null, approvedBy: null, approvedAt: null });
    await embedStoredFile(embedder, storage, { type: 'item', id: item.id }, fileKey);
    out.push(item);
  }
  return out;
}

describe('subject models from examples, through the API', () => {
  it('stores and embeds uploaded examples, previews a ranking, and versions each synthesized model', async () => {
    const app = createApp({ config, sequelize });
    const archivist = await signIn(app, 'archivist');
    const c = await makeCollection({ medium: 'engraving' });
    const lighthouse = await makeSubject(c, { prefLabel: 'lighthouse' });
    const exampleItems = withTruth('lighthouse', 2);
    const scans = await addScans(c, [...withTruth('lighthouse', 3, 2), ...withTruth('steamship', 3), ...withTruth('pier', 1)]);

    // no examples yet: an empty preview and a clear refusal to synthesize
    expect((await archivist.agent.get(`/api/subjects/${lighthouse.id}/preview`).expect(200)).body.items).toEqual([]);
    const none = await archivist.agent.post(`/api/subjects/${lighthouse.id}/models`).set('x-csrf-token', archivist.csrf).send({ mode: 'from-examples' }).expect(409);
    expect(none.body.title).toBe('No examples yet');

    let req = archivist.agent.post(`/api/subjects/${lighthouse.id}/examples`).set('x-csrf-token', archivist.csrf).field('medium', 'illustration');
    for (const d of exampleItems) req = req.attach('files', await image(d), d.fileName);
    const added = await req.expect(201);
    expect(added.body.examples).toHaveLength(2);
    expect(added.body.embedderId).toBe((await processEmbedder()).id);
    expect(await Embedding.count({ where: { ownerType: 'example' } })).toBe(2);
    await archivist.agent.get(added.body.examples[0].imageUrl).expect(200).expect('content-type', /image\/jpeg/);

    const preview = await archivist.agent.get(`/api/subjects/${lighthouse.id}/preview?minZ=-10`).expect(200);
    expect(preview.body.scored).toBe(scans.length);
    expect(preview.body.model).toBeNull();
    const scores = preview.body.items.map((i: { score: number }) => i.score);
    expect(scores).toEqual([...scores].sort((a, b) => b - a));
    expect(preview.body.items.map((i: { itemId: number }) => i.itemId).sort()).toEqual(scans.map((s) => s.id).sort());
    // without reviewed decisions there is no calibrated probability, only the z-score
    expect(preview.body.items.every((i: { probability: unknown; z: number }) => i.probability === null && Number.isFinite(i.z))).toBe(true);
    // with the default z ≥ 2 cut-off, a handful of scans cannot all be listed
    const strict = await archivist.agent.get(`/api/subjects/${lighthouse.id}/preview`).expect(200);
    expect(strict.body.items.length).toBeLessThan(scans.length);

    const v1 = await archivist.agent.post(`/api/subjects/${lighthouse.id}/models`).set('x-csrf-token', archivist.csrf).send({ mode: 'from-examples' }).expect(201);
    expect(v1.body.model).toMatchObject({ version: 1, method: 'prototype', active: true, calibration: { kind: 'zscore' } });
    expect(v1.body.model.madeFrom.exampleIds).toHaveLength(2);
    expect(v1.body.model.metrics.judgements.examples).toBe(2);

    // an editor confirms two scans: the next version learns from them (photo-augmented)
    await makeSuggestion(scans[0]!, lighthouse, 'accepted');
    await makeSuggestion(scans[1]!, lighthouse, 'added');
    await makeSuggestion(scans[3]!, lighthouse, 'rejected');
    const v2 = await archivist.agent.post(`/api/subjects/${lighthouse.id}/models`).set('x-csrf-token', archivist.csrf).send({ mode: 'from-examples' }).expect(201);
    expect(v2.body.model).toMatchObject({ version: 2, method: 'photo_augmented', active: true });
    expect(v2.body.model.madeFrom.confirmedItemIds.sort()).toEqual([scans[0]!.id, scans[1]!.id].sort());
    expect(v2.body.model.metrics.judgements).toMatchObject({ examples: 2, confirmed: 2, rejected: 1 });

    const history = await archivist.agent.get(`/api/subjects/${lighthouse.id}/models`).expect(200);
    expect(history.body.models.map((m: { version: number; active: boolean }) => [m.version, m.active])).toEqual([[2, true], [1, false]]);
    expect(await SubjectModel.count({ where: { subjectId: lighthouse.id, active: true } })).toBe(1);

    const judged = await archivist.agent.get(`/api/subjects/${lighthouse.id}/preview?minZ=-10`).expect(200);
    expect(judged.body.model.version).toBe(2);
    const byId = new Map(judged.body.items.map((i: { itemId: number; judgement: string | null }) => [i.itemId, i.judgement]));
    expect(byId.get(scans[0]!.id)).toBe('confirmed');
    expect(byId.get(scans[3]!.id)).toBe('rejected');

    // deleting an example removes its feature
    await archivist.agent.delete(`/api/examples/${added.body.examples[1].id}`).set('x-csrf-token', archivist.csrf).expect(204);
    expect(await Embedding.count({ where: { ownerType: 'example' } })).toBe(1);
  });

  it('refuses a file that is not an image, whatever its name, and stores nothing of the batch', async () => {
    const app = createApp({ config, sequelize });
    const archivist = await signIn(app, 'archivist');
    const c = await makeCollection();
    const s = await makeSubject(c);
    const res = await archivist.agent
      .post(`/api/subjects/${s.id}/examples`)
      .set('x-csrf-token', archivist.csrf)
      .field('medium', 'sketch')
      .attach('files', await image(withTruth('lighthouse', 1)[0]!), 'good.jpg')
      .attach('files', Buffer.from('not a picture at all'), 'drawing.png')
      .expect(400);
    expect(res.body.detail).toMatch(/drawing\.png/);
    expect(await Embedding.count()).toBe(0);
  });

  it('refines a narrower subject from its broader one, and carries a model to a collection of another medium', async () => {
    const app = createApp({ config, sequelize });
    const archivist = await signIn(app, 'archivist');
    const c = await makeCollection();
    const vessel = await makeSubject(c, { prefLabel: 'vessel' });
    const steam = await makeSubject(c, { prefLabel: 'steamship', broaderId: vessel.id });
    await addScans(c, [...withTruth('steamship', 3), ...withTruth('sailing-ship', 3)]);
    const post = (subjectId: number, files: DemoItem[]) => {
      let r = archivist.agent.post(`/api/subjects/${subjectId}/examples`).set('x-csrf-token', archivist.csrf).field('medium', 'illustration');
      return Promise.all(files.map((f) => image(f))).then((bufs) => {
        bufs.forEach((b, i) => (r = r.attach('files', b, files[i]!.fileName)));
        return r.expect(201);
      });
    };
    await post(vessel.id, [...withTruth('steamship', 1, 5), ...withTruth('sailing-ship', 1, 5)]);
    await archivist.agent.post(`/api/subjects/${vessel.id}/models`).set('x-csrf-token', archivist.csrf).send({ mode: 'from-examples' }).expect(201);
    await post(steam.id, withTruth('steamship', 2, 6));
    const refined = await archivist.agent.post(`/api/subjects/${steam.id}/models`).set('x-csrf-token', archivist.csrf).send({ mode: 'narrower' }).expect(201);
    expect(refined.body.model).toMatchObject({ method: 'refined', madeFrom: { broaderSubjectId: vessel.id } });

    const photos = await makeCollection({ medium: 'photograph' });
    const target = await makeSubject(photos, { prefLabel: 'steamship' });
    const carried = await archivist.agent.post(`/api/subjects/${target.id}/models`).set('x-csrf-token', archivist.csrf).send({ mode: 'carried', sourceSubjectId: steam.id }).expect(201);
    expect(carried.body.model).toMatchObject({ method: 'carried', madeFrom: { sourceCollectionId: c.id, sourceModelId: refined.body.model.id } });
    const same = await archivist.agent.post(`/api/subjects/${target.id}/models`).set('x-csrf-token', archivist.csrf).send({ mode: 'carried', sourceSubjectId: target.id }).expect(400);
    expect(same.body.title).toBe('Same collection');
  });
});
