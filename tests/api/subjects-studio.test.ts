import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { subjectCreateSchema } from '../../common/schemas/subject.ts';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Example, Item, Subject, type Collection } from '../../server/src/models/index.ts';
import { embedStoredFile, processEmbedder } from '../../server/src/services/features.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { MIN_JUDGED_ITEMS, wilsonInterval } from '../../server/src/services/subject-studio.ts';
import { buildDemoScenario, renderItemImage, type DemoItem } from '../../scripts/demo/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';
import { signIn, type SignedIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let app: CartoucheApp;
let archivist: SignedIn;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
}, 120_000);
afterAll(async () => sequelize.close());
beforeEach(async () => {
  await resetDatabase(sequelize);
  app = createApp({ config, sequelize });
  archivist = await signIn(app, 'archivist');
});

const send = (method: 'post' | 'put', path: string, body: unknown) => archivist.agent[method](path).set('x-csrf-token', archivist.csrf).send(body as object);
const blank = { altLabels: [], kind: 'subject', broaderId: null, notation: '', scopeNote: '', altTextPhrase: '', status: 'draft', feedsAltText: true, conceptUri: '' };

describe('the vocabulary tree', () => {
  it('creates a subject with a minted concept URI that stays when the collection is renamed', async () => {
    const c = await makeCollection({ slug: 'harbour-plates' });
    const res = await send('post', `/api/collections/${c.id}/subjects`, { ...blank, prefLabel: 'lighthouse', altLabels: ['light tower'], altTextPhrase: 'a lighthouse' }).expect(201);
    expect(res.body.subject).toMatchObject({ prefLabel: 'lighthouse', altLabels: ['light tower'], status: 'draft', version: 1, altTextPhrase: 'a lighthouse', notation: null });
    expect(res.body.subject.conceptUri).toBe(`${new URL('/vocabulary/', config.publicUrl).href}harbour-plates/${res.body.subject.id}`);
    await c.update({ slug: 'plates-renamed' });
    expect((await archivist.agent.get(`/api/subjects/${res.body.subject.id}`).expect(200)).body.subject.conceptUri).toBe(res.body.subject.conceptUri);
  });

  it('keeps a given concept URI and refuses it twice in one collection', async () => {
    const c = await makeCollection();
    const uri = 'https://kestrelmouth-harbour.example/vocabulary/plates/pier';
    await send('post', `/api/collections/${c.id}/subjects`, { ...blank, prefLabel: 'pier', conceptUri: uri }).expect(201);
    const again = await send('post', `/api/collections/${c.id}/subjects`, { ...blank, prefLabel: 'jetty', conceptUri: uri }).expect(409);
    expect(again.body.errors[0].path).toBe('conceptUri');
  });

  it('refuses a preferred label the collection already has, whatever its case', async () => {
    const c = await makeCollection();
    await makeSubject(c, { prefLabel: 'Pier' });
    const res = await send('post', `/api/collections/${c.id}/subjects`, { ...blank, prefLabel: 'pier' }).expect(409);
    expect(res.body.title).toBe('Label in use');
  });

  it('locks on the version: a save from a stale copy gets 409 and changes nothing', async () => {
    const c = await makeCollection();
    const s = await makeSubject(c, { prefLabel: 'brig' });
    const first = await send('put', `/api/subjects/${s.id}`, { ...blank, prefLabel: 'brig', scopeNote: 'Two-masted, square-rigged.', version: 1 }).expect(200);
    expect(first.body.subject.version).toBe(2);
    const stale = await send('put', `/api/subjects/${s.id}`, { ...blank, prefLabel: 'brigantine', version: 1 }).expect(409);
    expect(stale.body.type).toBe('/problems/stale-version');
    expect((await Subject.findByPk(s.id))!.prefLabel).toBe('brig');
  });

  it('re-parents a subject, and refuses a move under itself, under its own narrower subject or into another collection', async () => {
    const c = await makeCollection();
    const vessel = await makeSubject(c, { prefLabel: 'vessel' });
    const sailing = await makeSubject(c, { prefLabel: 'sailing vessel', broaderId: vessel.id });
    const brig = await makeSubject(c, { prefLabel: 'brig' });
    const moved = await send('post', `/api/subjects/${brig.id}/move`, { broaderId: sailing.id, version: brig.version }).expect(200);
    expect(moved.body.subject.broaderId).toBe(sailing.id);
    // vessel under brig would make vessel → sailing vessel → brig → vessel
    const loop = await send('post', `/api/subjects/${vessel.id}/move`, { broaderId: brig.id, version: vessel.version }).expect(422);
    expect(loop.body.title).toBe('Would make a loop');
    await send('post', `/api/subjects/${vessel.id}/move`, { broaderId: vessel.id, version: vessel.version }).expect(422);
    const foreign = await makeSubject(await makeCollection(), { prefLabel: 'elsewhere' });
    await send('post', `/api/subjects/${vessel.id}/move`, { broaderId: foreign.id, version: vessel.version }).expect(422);
    // stale move
    await send('post', `/api/subjects/${brig.id}/move`, { broaderId: null, version: brig.version }).expect(409);
    expect((await Subject.findByPk(vessel.id))!.broaderId).toBeNull();
  });

  it('lists the tree with labels, versions and URIs', async () => {
    const c = await makeCollection();
    const vessel = await makeSubject(c, { prefLabel: 'vessel' });
    await makeSubject(c, { prefLabel: 'brig', broaderId: vessel.id });
    const list = (await archivist.agent.get(`/api/collections/${c.id}/subjects`).expect(200)).body.subjects;
    expect(list.map((s: { prefLabel: string; broaderId: number | null }) => [s.prefLabel, s.broaderId])).toEqual([['brig', vessel.id], ['vessel', null]]);
    expect(list[0]).toMatchObject({ version: 1, altLabels: [], feedsAltText: true });
    expect(typeof list[0].conceptUri).toBe('string');
  });

  it('refuses editors', async () => {
    const c = await makeCollection();
    const editor = await signIn(app, 'editor');
    await editor.agent.post(`/api/collections/${c.id}/subjects`).set('x-csrf-token', editor.csrf).send({ ...blank, prefLabel: 'x' }).expect(403);
  });
});

describe('the same zod schema refuses the same subject in the browser and at the API', () => {
  const bad: Array<[string, Record<string, unknown>, string]> = [
    ['an empty preferred label', { prefLabel: ' ' }, 'prefLabel'],
    ['a label over two lines', { prefLabel: 'pier\nquay' }, 'prefLabel'],
    ['an alternative label equal to the preferred one (SKOS Reference S13, §5.4)', { prefLabel: 'pier', altLabels: ['Pier'] }, 'altLabels.0'],
    ['the same alternative label twice', { prefLabel: 'pier', altLabels: ['jetty', 'jetty'] }, 'altLabels.1'],
    ['an unknown kind', { prefLabel: 'pier', kind: 'genre' }, 'kind'],
    ['an unknown status', { prefLabel: 'pier', status: 'live' }, 'status'],
    ['a relative concept URI', { prefLabel: 'pier', conceptUri: 'plates/pier' }, 'conceptUri'],
  ];
  for (const [what, change, field] of bad) {
    it(`refuses ${what}`, async () => {
      const c = await makeCollection();
      const input = { ...blank, ...change };
      const client = subjectCreateSchema.safeParse(input);
      expect(client.success).toBe(false);
      expect(client.error!.issues.map((i) => i.path.join('.'))).toContain(field);
      const res = await send('post', `/api/collections/${c.id}/subjects`, input).expect(400);
      expect(res.body.errors.map((e: { path: string }) => e.path)).toContain(field);
      expect(await Subject.count()).toBe(0);
    });
  }
});

describe('estimated precision and recall at a threshold', () => {
  it('the Wilson interval matches a worked value: 8 of 10 at 95 % is about [0.490, 0.943] (Wilson 1927; computed by hand from the formula, from memory)', () => {
    const w = wilsonInterval(8, 10)!;
    expect(w.low).toBeCloseTo(0.49, 2);
    expect(w.high).toBeCloseTo(0.943, 2);
    expect(wilsonInterval(0, 0)).toBeNull();
  });

  it(`says plainly when fewer than ${MIN_JUDGED_ITEMS} items are judged, and estimates from judged items once there are enough`, async () => {
    const storage = new Storage(config.storageDir);
    const embedder = await processEmbedder();
    const plates = buildDemoScenario().collections[0]!;
    const c: Collection = await makeCollection({ medium: plates.medium });
    const lighthouse = await makeSubject(c, { prefLabel: 'lighthouse' });
    const withTruth = (key: string, n: number, skip = 0) => plates.items.filter((i) => i.truth.includes(key)).slice(skip, skip + n);
    const add = async (d: DemoItem) => {
      const bytes = (await renderItemImage(d, plates.medium, { width: 320 })).data;
      const fileKey = await storage.put(bytes);
      const item = await Item.create({ collectionId: c.id, identifier: d.identifier, fileName: d.fileName, fileKey, mimeType: 'image/jpeg', width: null, height: null, byteSize: bytes.length, caption: d.caption, creator: null, dateText: null, rights: null, captionFlagNote: null, altText: null, longDescription: null, ocrText: null, approvedBy: null, approvedAt: null });
      await embedStoredFile(embedder, storage, { type: 'item', id: item.id }, fileKey);
      return item;
    };
    // examples: two drawings of lighthouses
    for (const d of withTruth('lighthouse', 2)) {
      const fileKey = await storage.put((await renderItemImage(d, plates.medium, { width: 320 })).data);
      const ex = await Example.create({ subjectId: lighthouse.id, medium: 'illustration', origin: 'uploaded', fileKey, itemId: null, createdBy: null });
      await embedStoredFile(embedder, storage, { type: 'example', id: ex.id }, fileKey);
    }
    const yes = await Promise.all(withTruth('lighthouse', 6, 2).map(add));
    const others = plates.items.filter((i) => !i.truth.includes('lighthouse') && !yes.some((y) => y.identifier === i.identifier)).slice(0, 6);
    const no = await Promise.all(others.map(add));

    const few = (await archivist.agent.get(`/api/subjects/${lighthouse.id}/estimate?minZ=0`).expect(200)).body.estimate;
    expect(few).toMatchObject({ enough: false, precision: null, recall: null, minimumJudged: MIN_JUDGED_ITEMS, judged: { confirmed: 0, rejected: 0 } });
    expect(few.reason).toContain('Too few reviewed items');

    for (const i of yes) await makeSuggestion(i, lighthouse, 'accepted');
    for (const i of no) await makeSuggestion(i, lighthouse, 'rejected');
    const est = (await archivist.agent.get(`/api/subjects/${lighthouse.id}/estimate?minZ=-10`).expect(200)).body.estimate;
    // at the lowest threshold every judged item is listed: recall 1, precision = confirmed share (6 of 12)
    expect(est).toMatchObject({ enough: true, judged: { confirmed: 6, rejected: 6 }, recall: 1, precision: 0.5, counts: { truePositives: 6, falsePositives: 6, falseNegatives: 0 } });
    const high = (await archivist.agent.get(`/api/subjects/${lighthouse.id}/estimate?minZ=10`).expect(200)).body.estimate;
    expect(high).toMatchObject({ enough: true, recall: 0, precision: null });
    expect(high.reason).toContain('No reviewed item scores this high');
  }, 240_000);
});
