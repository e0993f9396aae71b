import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { AuditEvent, Collection, Example, Subject } from '../../server/src/models/index.ts';
import { buildDemoScenario, renderItemImage } from '../../scripts/demo/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';
import { signIn, type SignedIn } from '../helpers/people.ts';

// Every change made in the subject studio leaves one audit event, written in the change's own transaction,
// with who made it, from where, and what changed; a refused change leaves none.

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
const quay = { name: 'Quay photographs', slug: 'quay-photographs', description: 'Glass negatives of the Kestrelmouth quays.', medium: 'photograph', altTextLanguage: 'en-GB', altTextMaxLength: 150, houseStyle: '' };

/** The studio's audit events (sign-ins left out), oldest first. */
async function studioEvents() {
  const events = await AuditEvent.findAll({ order: [['id', 'ASC']] });
  return events.filter((e) => !e.action.startsWith('sign-'));
}

function expectActor(e: AuditEvent) {
  expect(e.actorId).toBe(archivist.user.id);
  // supertest connects over loopback; Express reports the address it came from
  expect(e.ip).toMatch(/127\.0\.0\.1|::1/);
}

describe('collections are audited', () => {
  it('create, edit (fields and feeding subjects, old and new values), archive and restore each write one event', async () => {
    const created = await send('post', '/api/collections', quay).expect(201);
    const id = created.body.collection.id as number;
    let events = await studioEvents();
    expect(events.map((e) => e.action)).toEqual(['collection-created']);
    expect(events[0]).toMatchObject({ targetType: 'collection', targetId: String(id), detail: { slug: 'quay-photographs', name: 'Quay photographs' } });
    expectActor(events[0]!);

    const c = (await Collection.findByPk(id))!;
    const pier = await makeSubject(c, { prefLabel: 'pier' });
    await pier.update({ feedsAltText: false });
    const read = (await archivist.agent.get(`/api/collections/${id}`).expect(200)).body.collection;
    await send('put', `/api/collections/${id}`, { ...quay, name: 'Quay negatives', altTextMaxLength: 125, feedingSubjectIds: [pier.id], updatedAt: read.updatedAt }).expect(200);
    events = await studioEvents();
    expect(events.map((e) => e.action)).toEqual(['collection-created', 'collection-changed']);
    expect(events[1]!.detail).toEqual({
      changes: { name: { from: 'Quay photographs', to: 'Quay negatives' }, altTextMaxLength: { from: 150, to: 125 } },
      feedingAdded: [pier.id],
      feedingRemoved: [],
    });
    expectActor(events[1]!);

    await send('post', `/api/collections/${id}/archive`, {}).expect(200);
    await send('post', `/api/collections/${id}/archive`, {}).expect(200); // already archived: no change, no event
    await send('post', `/api/collections/${id}/restore`, {}).expect(200);
    events = await studioEvents();
    expect(events.map((e) => e.action)).toEqual(['collection-created', 'collection-changed', 'collection-archived', 'collection-restored']);
    for (const e of events) expectActor(e);
  });

  it('a refused edit — invalid, stale, or a subject of another collection — and a taken short name write no event', async () => {
    const c = await makeCollection({ slug: 'harbour-plates' });
    const foreign = await makeSubject(await makeCollection(), { prefLabel: 'elsewhere' });
    const read = (await archivist.agent.get(`/api/collections/${c.id}`).expect(200)).body.collection;
    await send('put', `/api/collections/${c.id}`, { ...quay, altTextMaxLength: 5, feedingSubjectIds: [], updatedAt: read.updatedAt }).expect(400);
    await send('put', `/api/collections/${c.id}`, { ...quay, feedingSubjectIds: [foreign.id], updatedAt: read.updatedAt }).expect(400);
    await send('put', `/api/collections/${c.id}`, { ...quay, feedingSubjectIds: [], updatedAt: new Date(Date.parse(read.updatedAt) - 60_000).toISOString() }).expect(409);
    await send('post', '/api/collections', { ...quay, slug: 'harbour-plates' }).expect(409);
    expect(await studioEvents()).toEqual([]);
    // and the collection is as it was
    expect((await Collection.findByPk(c.id))!.name).toBe(read.name);
  });
});

describe('subjects are audited', () => {
  it('create, edit with old and new values, retire and move write one event each; a save that changes nothing writes none', async () => {
    const c = await makeCollection({ slug: 'harbour-plates' });
    const vessel = await makeSubject(c, { prefLabel: 'vessel' });
    const made = (await send('post', `/api/collections/${c.id}/subjects`, { ...blank, prefLabel: 'brig', altTextPhrase: 'a brig' }).expect(201)).body.subject;
    let events = await studioEvents();
    expect(events.map((e) => e.action)).toEqual(['subject-created']);
    expect(events[0]).toMatchObject({ targetType: 'subject', targetId: String(made.id), detail: { collectionId: c.id, prefLabel: 'brig', kind: 'subject', status: 'draft', broaderId: null, conceptUri: made.conceptUri } });
    expectActor(events[0]!);

    const edited = (await send('put', `/api/subjects/${made.id}`, { ...blank, prefLabel: 'brig', altTextPhrase: 'a brig', scopeNote: 'Two masts, both square-rigged.', status: 'active', version: made.version }).expect(200)).body.subject;
    // the same record again: nothing changed, so no event (and no new version)
    const same = (await send('put', `/api/subjects/${made.id}`, { ...blank, prefLabel: 'brig', altTextPhrase: 'a brig', scopeNote: 'Two masts, both square-rigged.', status: 'active', version: edited.version }).expect(200)).body.subject;
    expect(same.version).toBe(edited.version);
    const retired = (await send('put', `/api/subjects/${made.id}`, { ...blank, prefLabel: 'brig', altTextPhrase: 'a brig', scopeNote: 'Two masts, both square-rigged.', status: 'retired', version: edited.version }).expect(200)).body.subject;
    await send('post', `/api/subjects/${made.id}/move`, { broaderId: vessel.id, version: retired.version }).expect(200);
    events = await studioEvents();
    expect(events.map((e) => e.action)).toEqual(['subject-created', 'subject-changed', 'subject-retired', 'subject-moved']);
    expect(events[1]!.detail).toEqual({ prefLabel: 'brig', version: edited.version, changes: { scopeNote: { from: null, to: 'Two masts, both square-rigged.' }, status: { from: 'draft', to: 'active' } } });
    expect(events[2]!.detail).toMatchObject({ changes: { status: { from: 'active', to: 'retired' } } });
    expect(events[3]!.detail).toMatchObject({ prefLabel: 'brig', changes: { broaderId: { from: null, to: vessel.id } } });
    for (const e of events) expectActor(e);

    // the subject page's history tells the same, newest first, in words, with who did it
    const history = (await archivist.agent.get(`/api/subjects/${made.id}/history`).expect(200)).body.history as Array<{ action: string; summary: string; actor: { name: string } }>;
    expect(history.map((h) => h.action)).toEqual(['subject-moved', 'subject-retired', 'subject-changed', 'subject-created']);
    expect(history.map((h) => h.summary)).toEqual([
      'moved it under another broader subject',
      'retired the subject (changed the status from “active” to “retired”)',
      'changed the scope note; the status from “draft” to “active”',
      'created the subject “brig”',
    ]);
    expect(new Set(history.map((h) => h.actor.name))).toEqual(new Set([archivist.user.displayName]));
    await archivist.agent.get('/api/subjects/999999/history').expect(404);
  });

  it('long texts are recorded shortened, with their length', async () => {
    const c = await makeCollection();
    const s = await makeSubject(c, { prefLabel: 'breakwater' });
    const note = 'A wall built out into the sea to shelter a harbour. '.repeat(10).trim();
    await send('put', `/api/subjects/${s.id}`, { ...blank, prefLabel: 'breakwater', scopeNote: note, version: s.version }).expect(200);
    const [event] = await studioEvents();
    const to = (event!.detail as { changes: { scopeNote: { to: string } } }).changes.scopeNote.to;
    expect(to.startsWith(note.slice(0, 200))).toBe(true);
    expect(to).toContain(`(${note.length} characters)`);
  });

  it('a refused change — invalid, a taken label, stale, a loop — writes no event and changes nothing', async () => {
    const c = await makeCollection();
    const vessel = await makeSubject(c, { prefLabel: 'vessel' });
    const brig = await makeSubject(c, { prefLabel: 'brig', broaderId: vessel.id });
    await send('post', `/api/collections/${c.id}/subjects`, { ...blank, prefLabel: '' }).expect(400);
    await send('post', `/api/collections/${c.id}/subjects`, { ...blank, prefLabel: 'Vessel' }).expect(409);
    await send('put', `/api/subjects/${brig.id}`, { ...blank, prefLabel: 'vessel', version: brig.version }).expect(409);
    await send('put', `/api/subjects/${brig.id}`, { ...blank, prefLabel: 'brigantine', version: brig.version + 1 }).expect(409);
    await send('post', `/api/subjects/${vessel.id}/move`, { broaderId: brig.id, version: vessel.version }).expect(422);
    expect(await studioEvents()).toEqual([]);
    expect(await Subject.count({ where: { collectionId: c.id } })).toBe(2);
    expect((await Subject.findByPk(brig.id))!.prefLabel).toBe('brig');
  });
});

describe('examples and subject models are audited', () => {
  it('adding and removing examples and making a model write one event each; an unreadable file writes none and stores nothing', async () => {
    const plates = buildDemoScenario().collections[0]!;
    const c = await makeCollection();
    const s = await makeSubject(c, { prefLabel: 'lighthouse' });
    const drawing = (await renderItemImage(plates.items[0]!, plates.medium, { width: 320 })).data;
    const other = (await renderItemImage(plates.items[1]!, plates.medium, { width: 320 })).data;

    await archivist.agent.post(`/api/subjects/${s.id}/examples`).set('x-csrf-token', archivist.csrf).field('medium', 'sketch').attach('files', drawing, 'lighthouse.png').attach('files', Buffer.from('not an image'), 'notes.png').expect(400);
    expect(await studioEvents()).toEqual([]);
    expect(await Example.count()).toBe(0);

    const added = await archivist.agent.post(`/api/subjects/${s.id}/examples`).set('x-csrf-token', archivist.csrf).field('medium', 'sketch').attach('files', drawing, 'sketch-pad-1.png').attach('files', other, 'lighthouse.png').expect(201);
    const [first, second] = added.body.examples as Array<{ id: number }>;
    let events = await studioEvents();
    expect(events.map((e) => e.action)).toEqual(['example-added', 'example-added']);
    expect(events[0]).toMatchObject({ targetType: 'subject', targetId: String(s.id), detail: { exampleId: first!.id, prefLabel: 'lighthouse', medium: 'sketch', origin: 'drawn', fileName: 'sketch-pad-1.png' } });
    expect(events[1]).toMatchObject({ detail: { exampleId: second!.id, origin: 'uploaded', fileName: 'lighthouse.png' } });

    const model = (await send('post', `/api/subjects/${s.id}/models`, { mode: 'from-examples' }).expect(201)).body.model;
    await archivist.agent.delete(`/api/examples/${second!.id}`).set('x-csrf-token', archivist.csrf).expect(204);
    await archivist.agent.delete(`/api/examples/${second!.id}`).set('x-csrf-token', archivist.csrf).expect(404);
    events = await studioEvents();
    expect(events.map((e) => e.action)).toEqual(['example-added', 'example-added', 'subject-model-made', 'example-removed']);
    expect(events[2]).toMatchObject({ targetType: 'subject', targetId: String(s.id), detail: { subjectModelId: model.id, version: model.version, method: model.method, mode: 'from-examples' } });
    expect(events[3]).toMatchObject({ targetType: 'subject', targetId: String(s.id), detail: { exampleId: second!.id, medium: 'sketch', origin: 'uploaded' } });
    for (const e of events) expectActor(e);
  }, 120_000);
});

describe('vocabulary imports are audited', () => {
  // a sheet may carry only some of the columns (services/vocabulary-csv.ts): the preferred label is the one it needs
  const sheet = 'prefLabel,broader,kind,status\nvessel,,subject,active\nbrig,vessel,subject,draft\n';
  const importFile = (collectionId: number, name: string, text: string, fields: Record<string, string> = {}) => {
    let req = archivist.agent.post(`/api/collections/${collectionId}/vocabulary`).set('x-csrf-token', archivist.csrf);
    for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
    return req.attach('file', Buffer.from(text, 'utf8'), name);
  };

  it('an import writes one event with its counts; a dry run and a refused file write none', async () => {
    const c = await makeCollection();
    const dry = await importFile(c.id, 'harbour.csv', sheet, { dryRun: 'true' }).expect(200);
    expect(dry.body.report).toMatchObject({ dryRun: true, created: 2 });
    // the same label twice breaks SKOS Reference S13 / Cartouche's label rule: the whole file is refused
    await importFile(c.id, 'harbour.csv', `${sheet}brig,,subject,draft\n`).expect(422);
    expect(await studioEvents()).toEqual([]);
    expect(await Subject.count({ where: { collectionId: c.id } })).toBe(0);

    const done = await importFile(c.id, 'harbour.csv', sheet).expect(201);
    const events = await studioEvents();
    expect(events.map((e) => e.action)).toEqual(['vocabulary-imported']);
    expect(events[0]).toMatchObject({ targetType: 'collection', targetId: String(c.id), detail: { format: 'csv', concepts: 2, created: 2, updated: 0, untouched: 0, warnings: done.body.report.warnings.length } });
    expectActor(events[0]!);
  });
});
