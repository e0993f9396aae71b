import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { collectionCreateSchema, collectionUpdateSchema } from '../../common/schemas/collection.ts';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Collection, Subject } from '../../server/src/models/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';
import { signIn, type SignedIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let app: CartoucheApp;
let archivist: SignedIn;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
});
afterAll(async () => sequelize.close());
beforeEach(async () => {
  await resetDatabase(sequelize);
  app = createApp({ config, sequelize });
  archivist = await signIn(app, 'archivist');
});

const quay = {
  name: 'Quay photographs',
  slug: 'quay-photographs',
  description: 'Glass negatives of the Kestrelmouth quays, 1890–1930.',
  medium: 'photograph',
  altTextLanguage: 'en-GB',
  altTextMaxLength: 150,
  houseStyle: 'Name the vessel when the caption does; never guess a date.',
};

const post = (path: string, body: unknown) => archivist.agent.post(path).set('x-csrf-token', archivist.csrf).send(body as object);
const put = (path: string, body: unknown) => archivist.agent.put(path).set('x-csrf-token', archivist.csrf).send(body as object);

describe('collections: create, edit, archive', () => {
  it('creates a collection with its alt-text guidance and default night-shift schedule', async () => {
    const res = await post('/api/collections', quay).expect(201);
    expect(res.body.collection).toMatchObject({ ...quay, scheduleCron: '0 2 * * *', scheduleTimezone: 'UTC', scheduleEnabled: true, dropFolder: '', archivedAt: null, feedingSubjectIds: [] });
    expect((await archivist.agent.get('/api/collections').expect(200)).body.collections.map((c: { slug: string }) => c.slug)).toEqual(['quay-photographs']);
  });

  it('refuses a short name another collection, even an archived one, already uses', async () => {
    await makeCollection({ slug: 'quay-photographs', archivedAt: new Date() });
    const res = await post('/api/collections', quay).expect(409);
    expect(res.body.errors).toEqual([{ path: 'slug', message: 'Already used by another collection.' }]);
    expect(await Collection.count()).toBe(1);
  });

  it('saves every setting and which subjects feed alt-text drafts, and refuses a stale copy', async () => {
    const c = (await post('/api/collections', quay).expect(201)).body.collection;
    const col = (await Collection.findByPk(c.id))!;
    const pier = await makeSubject(col, { prefLabel: 'pier' });
    const brig = await makeSubject(col, { prefLabel: 'brig' });
    const read = (await archivist.agent.get(`/api/collections/${c.id}`).expect(200)).body.collection;
    expect(read.feedingSubjectIds).toEqual([pier.id, brig.id]);

    const saved = await put(`/api/collections/${c.id}`, { ...quay, name: 'Quay negatives', altTextMaxLength: 125, feedingSubjectIds: [brig.id], updatedAt: read.updatedAt }).expect(200);
    expect(saved.body.collection).toMatchObject({ name: 'Quay negatives', altTextMaxLength: 125, feedingSubjectIds: [brig.id] });
    expect((await Subject.findByPk(pier.id))!.feedsAltText).toBe(false);

    // the first copy is now stale: refused, nothing changed
    const stale = await put(`/api/collections/${c.id}`, { ...quay, name: 'Overwritten', feedingSubjectIds: [], updatedAt: read.updatedAt }).expect(409);
    expect(stale.body.title).toBe('Changed by someone else');
    expect((await Collection.findByPk(c.id))!.name).toBe('Quay negatives');
    expect((await Subject.findByPk(brig.id))!.feedsAltText).toBe(true);
  });

  it('refuses feeding subjects of another collection, and changes nothing', async () => {
    const c = (await post('/api/collections', quay).expect(201)).body.collection;
    const other = await makeSubject(await makeCollection(), { prefLabel: 'lighthouse' });
    await put(`/api/collections/${c.id}`, { ...quay, name: 'Changed', feedingSubjectIds: [other.id], updatedAt: c.updatedAt }).expect(400);
    expect((await Collection.findByPk(c.id))!.name).toBe(quay.name);
  });

  it('archives a collection out of every list and restores it', async () => {
    const c = (await post('/api/collections', quay).expect(201)).body.collection;
    const archived = await post(`/api/collections/${c.id}/archive`, {}).expect(200);
    expect(archived.body.collection.archivedAt).not.toBeNull();
    expect((await archivist.agent.get('/api/collections').expect(200)).body.collections).toEqual([]);
    expect((await archivist.agent.get('/api/collections/archived').expect(200)).body.collections.map((x: { id: number }) => x.id)).toEqual([c.id]);
    await post(`/api/collections/${c.id}/restore`, {}).expect(200);
    expect((await archivist.agent.get('/api/collections').expect(200)).body.collections).toHaveLength(1);
  });

  it('reads text in scans at night by default; the setting is saved with the others, and a save without it keeps it', async () => {
    const c = (await post('/api/collections', quay).expect(201)).body.collection;
    expect(c.readText).toBe(true);
    const off = await put(`/api/collections/${c.id}`, { ...quay, readText: false, feedingSubjectIds: [], updatedAt: c.updatedAt }).expect(200);
    expect(off.body.collection.readText).toBe(false);
    expect((await Collection.findByPk(c.id))!.readText).toBe(false);
    // a client that does not know the setting changes something else: reading stays off
    // (saved with the updatedAt of the last answer, as the settings screen does without reloading: the answer
    // carries the new updatedAt, so a second save in a row is not taken for someone else's change)
    const renamed = await put(`/api/collections/${c.id}`, { ...quay, name: 'Quay negatives', feedingSubjectIds: [], updatedAt: off.body.collection.updatedAt }).expect(200);
    expect(renamed.body.collection).toMatchObject({ name: 'Quay negatives', readText: false });
    expect(renamed.body.collection.updatedAt).toBe((await archivist.agent.get(`/api/collections/${c.id}`).expect(200)).body.collection.updatedAt);
    // a bad value is refused and changes nothing
    const bad = await put(`/api/collections/${c.id}`, { ...quay, readText: 'no', feedingSubjectIds: [], updatedAt: renamed.body.collection.updatedAt }).expect(400);
    expect(bad.body.errors.map((e: { path: string }) => e.path)).toEqual(['readText']);
    expect((await Collection.findByPk(c.id))!.name).toBe('Quay negatives');
    // a collection can also be made with reading off
    expect((await post('/api/collections', { ...quay, slug: 'quay-prints', readText: false }).expect(201)).body.collection.readText).toBe(false);
  });

  it('lets editors read the settings but not change them', async () => {
    const c = (await post('/api/collections', quay).expect(201)).body.collection;
    const editor = await signIn(app, 'editor');
    await editor.agent.get(`/api/collections/${c.id}`).expect(200);
    await editor.agent.post('/api/collections').set('x-csrf-token', editor.csrf).send({ ...quay, slug: 'other' }).expect(403);
    await editor.agent.post(`/api/collections/${c.id}/archive`).set('x-csrf-token', editor.csrf).expect(403);
  });
});

describe('the same zod schemas refuse the same input in the browser and at the API', () => {
  // each bad input is refused by the shared schema (what the form runs) and by the server, on the same field
  const bad: Array<[string, Record<string, unknown>, string]> = [
    ['an empty name', { name: '  ' }, 'name'],
    ['a short name with capitals and spaces', { slug: 'Quay Photos' }, 'slug'],
    ['a malformed language tag (BCP 47, RFC 5646)', { altTextLanguage: 'english' }, 'altTextLanguage'],
    ['an alt-text length below the minimum', { altTextMaxLength: 5 }, 'altTextMaxLength'],
    ['an alt-text length that is not a whole number', { altTextMaxLength: 99.5 }, 'altTextMaxLength'],
    ['a missing medium', { medium: '' }, 'medium'],
    ['a text-reading switch that is not true or false', { readText: 'yes' }, 'readText'],
  ];
  for (const [what, change, field] of bad) {
    it(`refuses ${what} on both sides`, async () => {
      const input = { ...quay, ...change };
      const client = collectionCreateSchema.safeParse(input);
      expect(client.success).toBe(false);
      expect(client.error!.issues.map((i) => i.path.join('.'))).toContain(field);
      const res = await post('/api/collections', input).expect(400);
      expect(res.body.errors.map((e: { path: string }) => e.path)).toContain(field);
      expect(await Collection.count()).toBe(0);
    });
  }
  it('accepts what the schema accepts', async () => {
    expect(collectionCreateSchema.safeParse(quay).success).toBe(true);
    expect(collectionUpdateSchema.safeParse({ ...quay, feedingSubjectIds: [], updatedAt: '2026-12-02T07:00:00.000Z' }).success).toBe(true);
    await post('/api/collections', quay).expect(201);
  });
});
