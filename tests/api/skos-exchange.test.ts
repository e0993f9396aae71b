import { Parser } from 'n3';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Subject, type Collection } from '../../server/src/models/index.ts';
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

const SKOS = 'http://www.w3.org/2004/02/skos/core#';

/** A small harbour vocabulary: a three-level tree, a form term, labels, notations and notes. */
async function harbourVocabulary(): Promise<Collection> {
  const c = await makeCollection({ slug: 'harbour-plates', name: 'Harbour plates' });
  const vessel = await makeSubject(c, { prefLabel: 'vessel', status: 'active' });
  const sailing = await makeSubject(c, { prefLabel: 'sailing vessel', broaderId: vessel.id });
  const brig = await makeSubject(c, { prefLabel: 'brig', broaderId: sailing.id, status: 'draft' });
  await brig.update({ altLabels: ['two-master', 'brig, square-rigged'], notation: 'V.2.1', scopeNote: 'Two masts, both square-rigged; "hermaphrodite" brigs go under brigantine.', altTextPhrase: 'a brig' });
  await makeSubject(c, { prefLabel: 'lighthouse', status: 'retired' });
  const form = await makeSubject(c, { prefLabel: 'engraving', kind: 'form' });
  await form.update({ feedsAltText: false, conceptUri: 'https://kestrelmouth-harbour.example/vocabulary/forms/engraving' });
  return c;
}

/** The tree as label paths with every field a round trip must keep. */
async function treeOf(collectionId: number, withUris = true) {
  const subjects = await Subject.findAll({ where: { collectionId } });
  const byId = new Map(subjects.map((s) => [s.id, s]));
  const path = (s: Subject): string => (s.broaderId === null ? s.prefLabel : `${path(byId.get(s.broaderId)!)} › ${s.prefLabel}`);
  return subjects
    .map((s) => ({ path: path(s), altLabels: s.altLabels, kind: s.kind, status: s.status, notation: s.notation, scopeNote: s.scopeNote, altTextPhrase: s.altTextPhrase, feedsAltText: s.feedsAltText, ...(withUris ? { uri: s.conceptUri } : {}) }))
    .sort((a, b) => a.path.localeCompare(b.path));
}

const importFile = (collectionId: number, name: string, text: string, fields: Record<string, string> = {}) => {
  let req = archivist.agent.post(`/api/collections/${collectionId}/vocabulary`).set('x-csrf-token', archivist.csrf);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach('file', Buffer.from(text, 'utf8'), name);
};

describe('SKOS round trip', () => {
  it('export → import into an empty collection gives the identical tree, labels and concept URIs', async () => {
    const source = await harbourVocabulary();
    const exported = await archivist.agent.get(`/api/collections/${source.id}/vocabulary?format=turtle`).expect(200).expect('content-type', /text\/turtle/);
    expect(exported.headers['content-disposition']).toContain('harbour-plates-vocabulary.ttl');
    // the export is valid Turtle (parsed by n3) with one skos:ConceptScheme and five skos:Concepts
    const quads = new Parser().parse(exported.text);
    const typed = (t: string) => quads.filter((q) => q.predicate.value.endsWith('#type') && q.object.value === `${SKOS}${t}`).length;
    expect([typed('ConceptScheme'), typed('Concept')]).toEqual([1, 5]);
    // every minted URI is cited, and the given one is kept
    const sourceTree = await treeOf(source.id);
    for (const s of await Subject.findAll({ where: { collectionId: source.id } })) expect(exported.text).toContain(s.conceptUri ?? `/harbour-plates/${s.id}>`);

    const target = await makeCollection({ slug: 'harbour-plates-copy' });
    const res = await importFile(target.id, 'harbour.ttl', exported.text).expect(201);
    expect(res.body.report).toMatchObject({ concepts: 5, created: 5, updated: 0, untouched: 0 });
    const copied = await treeOf(target.id);
    // the copy keeps the URI the export cited for each concept: the stored one, or the one minted for it
    const base = new URL('/vocabulary/', config.publicUrl).href;
    const cited = await Promise.all(
      sourceTree.map(async (s) => {
        const row = (await Subject.findOne({ where: { collectionId: source.id, prefLabel: s.path.split(' › ').pop()! } }))!;
        return { ...s, uri: row.conceptUri ?? `${base}harbour-plates/${row.id}` };
      }),
    );
    expect(copied).toEqual(cited);
    expect(copied.find((s) => s.path === 'engraving')!.uri).toBe('https://kestrelmouth-harbour.example/vocabulary/forms/engraving');

    // importing the same file again changes nothing
    const again = await importFile(target.id, 'harbour.ttl', exported.text).expect(201);
    expect(again.body.report).toMatchObject({ created: 0, updated: 0, untouched: 0 });
  });

  it('CSV export → import into an empty collection gives the identical tree and labels', async () => {
    const source = await harbourVocabulary();
    const csv = await archivist.agent.get(`/api/collections/${source.id}/vocabulary?format=csv`).expect(200).expect('content-type', /text\/csv/);
    expect(csv.text.split('\r\n')[0]).toBe('uri,prefLabel,altLabels,broader,kind,status,notation,scopeNote,altTextPhrase,feedsAltText');
    const target = await makeCollection();
    await importFile(target.id, 'harbour.csv', csv.text).expect(201);
    expect(await treeOf(target.id, false)).toEqual(await treeOf(source.id, false));
  });

  it('a CSV sheet without URIs gets minted URIs and its tree from preferred labels', async () => {
    const target = await makeCollection({ slug: 'quay' });
    const res = await importFile(target.id, 'quay.csv', 'prefLabel,broader,kind\nquay,,subject\ncrane,quay,subject\nlantern slide,,form\n').expect(201);
    expect(res.body.report.created).toBe(3);
    expect((await treeOf(target.id)).map((s) => [s.path, s.kind, /\/quay\/\d+$/.test(s.uri ?? '')])).toEqual([
      ['lantern slide', 'form', true],
      ['quay', 'subject', true],
      ['quay › crane', 'subject', true],
    ]);
  });
});

describe('SKOS import integrity: whole file or nothing', () => {
  const bad = `@prefix skos: <${SKOS}> .
@prefix ex: <https://kestrelmouth-harbour.example/vocabulary/plates/> .
ex:vessel a skos:Concept ; skos:prefLabel "vessel"@en .
ex:brig a skos:Concept ; skos:prefLabel "brig"@en, "two-master"@en ; skos:broader ex:vessel .
ex:pier a skos:Concept ; skos:prefLabel "pier"@en ; skos:altLabel "pier"@en .
`;
  it('reports every violation with its concept URI and the SKOS Reference condition, and imports nothing', async () => {
    const target = await makeCollection();
    const res = await importFile(target.id, 'bad.ttl', bad).expect(422);
    expect(res.body.title).toBe('Vocabulary not imported');
    expect(res.body.errors).toEqual([
      { path: 'https://kestrelmouth-harbour.example/vocabulary/plates/brig', message: expect.stringMatching(/^SKOS Reference S14: .*§5\.4/) },
      { path: 'https://kestrelmouth-harbour.example/vocabulary/plates/pier', message: expect.stringMatching(/^SKOS Reference S13: .*§5\.4/) },
    ]);
    // vessel was fine, but nothing of the file was stored
    expect(await Subject.count({ where: { collectionId: target.id } })).toBe(0);
  });

  it('refuses a preferred label a subject of the collection already has under another URI', async () => {
    const target = await makeCollection();
    await makeSubject(target, { prefLabel: 'Vessel' });
    const res = await importFile(target.id, 'v.ttl', `@prefix skos: <${SKOS}> . <https://kestrelmouth-harbour.example/v/1> a skos:Concept ; skos:prefLabel "vessel"@en . <https://kestrelmouth-harbour.example/v/2> a skos:Concept ; skos:prefLabel "crane"@en .`).expect(422);
    expect(res.body.errors[0].message).toContain('already used');
    expect(await Subject.count({ where: { collectionId: target.id } })).toBe(1);
  });

  it('checks without storing on a dry run', async () => {
    const target = await makeCollection();
    const res = await importFile(target.id, 'v.csv', 'prefLabel\nquay\ncrane\n', { dryRun: 'true' }).expect(200);
    expect(res.body.report).toMatchObject({ dryRun: true, created: 2 });
    expect(await Subject.count()).toBe(0);
  });

  it('refuses a file that is not Turtle with a clear message', async () => {
    const target = await makeCollection();
    const res = await importFile(target.id, 'v.ttl', 'this is not turtle <').expect(400);
    expect(res.body.detail).toMatch(/^Not readable as Turtle/);
  });

  it('lets managers export but not import', async () => {
    const c = await harbourVocabulary();
    const manager = await signIn(app, 'manager');
    await manager.agent.get(`/api/collections/${c.id}/vocabulary?format=csv`).expect(200);
    await manager.agent.post(`/api/collections/${c.id}/vocabulary`).set('x-csrf-token', manager.csrf).attach('file', Buffer.from('prefLabel\nx\n'), 'x.csv').expect(403);
  });
});
