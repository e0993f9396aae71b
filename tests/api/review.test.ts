import { QueryTypes, type Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import sharp from 'sharp';
import { AuditEvent, Embedding, Example, Item, SubjectModel, Suggestion } from '../../server/src/models/index.ts';
import { refreshCollectionReviewMargins } from '../../server/src/models/review-margin.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';
import { signIn, type SignedIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let app: CartoucheApp;
let editor: SignedIn;
let other: SignedIn;
let storage: Storage;

beforeAll(async () => {
  const opened = await openTestDatabase();
  sequelize = opened.sequelize;
  await resetDatabase(sequelize);
  app = createApp({ config: opened.config, sequelize });
  storage = new Storage(opened.config.storageDir);
  editor = await signIn(app, 'editor');
  other = await signIn(app, 'editor');
});
afterAll(async () => {
  await sequelize.close();
});

async function scene() {
  const c = await makeCollection();
  const engraving = await makeSubject(c, { prefLabel: 'engraving', kind: 'form' });
  await engraving.update({ altTextPhrase: 'an engraving' });
  const map = await makeSubject(c, { prefLabel: 'map', kind: 'form' });
  const vessel = await makeSubject(c, { prefLabel: 'vessel' });
  const ship = await makeSubject(c, { prefLabel: 'sailing ship', broaderId: vessel.id });
  await ship.update({ altTextPhrase: 'a sailing ship', altLabels: ['tall ship', 'square-rigger'] });
  const lighthouse = await makeSubject(c, { prefLabel: 'lighthouse' });
  await lighthouse.update({ altTextPhrase: 'a lighthouse' });
  const model = await SubjectModel.create({ subjectId: lighthouse.id, version: 3, method: 'prototype', embedderId: 'test', dimension: 2, weights: Buffer.alloc(8), madeFrom: {}, calibration: null, metrics: null, active: true, createdBy: null });
  const item = await makeItem(c, { state: 'suggested' });
  await item.update({ caption: 'The light at Kestrel Point, 1871' });
  const proposal = await makeSuggestion(item, lighthouse);
  await proposal.update({ subjectModelId: model.id, probability: 0.8 });
  return { c, engraving, map, vessel, ship, lighthouse, model, item: (await Item.findByPk(item.id))!, proposal };
}

describe('the review desk API', () => {
  it('shows the item panel with suggestions, model version, broader subjects and a draft', async () => {
    const s = await scene();
    const res = await editor.agent.get(`/api/review/items/${s.item.id}`).expect(200);
    expect(res.body.item.identifier).toBe(s.item.identifier);
    expect(res.body.subjects[0]).toMatchObject({ state: 'proposed', probability: 0.8, model: { id: s.model.id, version: 3 } });
    const typeahead = await editor.agent.get(`/api/review/subjects?collectionId=${s.c.id}&q=tall`).expect(200);
    expect(typeahead.body.subjects[0]).toMatchObject({ prefLabel: 'sailing ship', matchedAltLabel: 'tall ship', broader: [{ id: s.vessel.id, prefLabel: 'vessel' }] });
  });

  it('accepts, adds and sets a form, versions every change and audits it with the model version answered', async () => {
    const s = await scene();
    let v = s.item.version;
    let r = await editor.agent.post(`/api/review/items/${s.item.id}/subjects`).set('x-csrf-token', editor.csrf).send({ version: v, subjectId: s.lighthouse.id, decision: 'accept' }).expect(200);
    expect(r.body.item.version).toBe(v + 1);
    v = r.body.item.version;
    r = await editor.agent.post(`/api/review/items/${s.item.id}/subjects`).set('x-csrf-token', editor.csrf).send({ version: v, subjectId: s.ship.id, decision: 'accept' }).expect(200);
    v = r.body.item.version;
    r = await editor.agent.put(`/api/review/items/${s.item.id}/form`).set('x-csrf-token', editor.csrf).send({ version: v, subjectId: s.engraving.id }).expect(200);
    v = r.body.item.version;
    r = await editor.agent.put(`/api/review/items/${s.item.id}/form`).set('x-csrf-token', editor.csrf).send({ version: v, subjectId: s.map.id }).expect(200);
    expect(r.body.acceptedForm.prefLabel).toBe('map');
    expect(r.body.forms.find((f: { subject: { id: number } }) => f.subject.id === s.engraving.id).state).toBe('rejected');
    r = await editor.agent.put(`/api/review/items/${s.item.id}/form`).set('x-csrf-token', editor.csrf).send({ version: r.body.item.version, subjectId: s.engraving.id }).expect(200);
    expect(r.body.draft).toBe('Engraving of a lighthouse and a sailing ship: The light at Kestrel Point, 1871.');
    expect((await Suggestion.findOne({ where: { itemId: s.item.id, subjectId: s.ship.id } }))?.state).toBe('added');
    const accepted = await AuditEvent.findOne({ where: { action: 'review-subject-accepted', targetId: String(s.item.id) } });
    expect(accepted?.detail).toMatchObject({ subjectId: s.lighthouse.id, subjectModelId: s.model.id, modelVersion: 3, from: 'proposed', to: 'accepted' });
    expect(accepted?.actorId).toBe(editor.user.id);
  });

  it('a stale save answers 409 with what the editor sent and the stored version, and saves nothing', async () => {
    const s = await scene();
    const first = await other.agent
      .put(`/api/review/items/${s.item.id}/description`)
      .set('x-csrf-token', other.csrf)
      .send({ version: s.item.version, altText: 'Engraving of the lighthouse on its rock', longDescription: '', decorative: false })
      .expect(200);
    const mine = { version: s.item.version, altText: 'My own careful words about the light', longDescription: 'Waves break on the rock.', decorative: false };
    const res = await editor.agent.put(`/api/review/items/${s.item.id}/description`).set('x-csrf-token', editor.csrf).send(mine).expect(409);
    expect(res.type).toBe('application/problem+json');
    expect(res.body).toMatchObject({ status: 409, type: '/problems/stale-item', submittedVersion: s.item.version, submitted: mine });
    expect(res.body.current.item).toMatchObject({ altText: 'Engraving of the lighthouse on its rock', version: first.body.item.version });
    const stored = await Item.findByPk(s.item.id);
    expect(stored?.altText).toBe('Engraving of the lighthouse on its rock');
    // the editor merges and saves against the current version: now it lands
    await editor.agent.put(`/api/review/items/${s.item.id}/description`).set('x-csrf-token', editor.csrf).send({ ...mine, version: res.body.current.item.version }).expect(200);
    expect((await Item.findByPk(s.item.id))?.longDescription).toBe('Waves break on the rock.');
  });

  it('approval runs the checker on the server: errors block, warnings do not; open proposals become rejections', async () => {
    const s = await scene();
    const blocked = await editor.agent.post(`/api/review/items/${s.item.id}/approve`).set('x-csrf-token', editor.csrf).send({ version: s.item.version, altText: 'image', longDescription: '', decorative: false }).expect(422);
    expect(blocked.body.findings.map((f: { ruleId: string }) => f.ruleId)).toContain('placeholder');
    expect((await Item.findByPk(s.item.id))?.state).toBe('suggested');
    const ok = await editor.agent
      .post(`/api/review/items/${s.item.id}/approve`)
      .set('x-csrf-token', editor.csrf)
      .send({ version: s.item.version, altText: 'Image of a lighthouse on a rock with waves', longDescription: '', decorative: false })
      .expect(200);
    expect(ok.body.warnings.map((f: { ruleId: string }) => f.ruleId)).toEqual(['leading-image-of']);
    expect(ok.body.rejected).toBe(1);
    const item = await Item.findByPk(s.item.id);
    expect(item).toMatchObject({ state: 'approved', approvedBy: editor.user.id });
    expect((await Suggestion.findByPk(s.proposal.id))?.state).toBe('rejected');
    // decorative: the alt must be empty (H67)
    const deco = await makeItem(s.c);
    await editor.agent.post(`/api/review/items/${deco.id}/approve`).set('x-csrf-token', editor.csrf).send({ version: deco.version, altText: 'border', longDescription: '', decorative: true }).expect(422);
    await editor.agent.post(`/api/review/items/${deco.id}/approve`).set('x-csrf-token', editor.csrf).send({ version: deco.version, altText: '', longDescription: '', decorative: true }).expect(200);
  });

  it('flags a caption only with a note, and a skip sends the item to the end of the queue', async () => {
    const s = await scene();
    await editor.agent.put(`/api/review/items/${s.item.id}/caption-flag`).set('x-csrf-token', editor.csrf).send({ version: s.item.version, flagged: true, note: '' }).expect(400);
    const f = await editor.agent.put(`/api/review/items/${s.item.id}/caption-flag`).set('x-csrf-token', editor.csrf).send({ version: s.item.version, flagged: true, note: 'Outdated term for the keepers.' }).expect(200);
    expect(f.body.item).toMatchObject({ captionFlagged: true, captionFlagNote: 'Outdated term for the keepers.' });
    const second = await makeItem(s.c, { state: 'suggested' });
    const p = await makeSuggestion(second, s.lighthouse);
    await p.update({ probability: 0.95 });
    let q = await editor.agent.get(`/api/review/queue?collectionId=${s.c.id}`).expect(200);
    // uncertainty first: 0.8 is nearer 0.5 than 0.95
    expect(q.body.items.map((i: { id: number }) => i.id)).toEqual([s.item.id, second.id]);
    await editor.agent.post(`/api/review/items/${s.item.id}/skip`).set('x-csrf-token', editor.csrf).expect(204);
    q = await editor.agent.get(`/api/review/queue?collectionId=${s.c.id}`).expect(200);
    expect(q.body.items.map((i: { id: number }) => i.id)).toEqual([second.id, s.item.id]);
    expect(q.body.items[1].skippedByYou).toBe(true);
    q = await editor.agent.get(`/api/review/queue?collectionId=${s.c.id}&minProbability=0.9&maxProbability=1`).expect(200);
    expect(q.body.items.map((i: { id: number }) => i.id)).toEqual([second.id]);
    await editor.agent.get(`/api/review/queue?collectionId=${s.c.id}&minProbability=0.9&maxProbability=0.2`).expect(400);
  });

  it('the subject grid confirms many items in one transaction, or none when one is stale', async () => {
    const s = await scene();
    const more = [];
    for (let i = 0; i < 3; i++) {
      const it = await makeItem(s.c, { state: 'suggested' });
      const g = await makeSuggestion(it, s.lighthouse);
      await g.update({ score: 0.9 - i * 0.1, subjectModelId: s.model.id });
      more.push((await Item.findByPk(it.id))!);
    }
    const grid = await editor.agent.get(`/api/review/subjects/${s.lighthouse.id}/grid`).expect(200);
    expect(grid.body.items.slice(0, 3).map((g: { itemId: number }) => g.itemId)).toEqual(more.map((m) => m.id));
    const decisions = more.map((m, i) => ({ itemId: m.id, version: m.version, decision: i === 2 ? 'reject' : 'accept' }));
    await more[1]!.update({ caption: 'changed meanwhile' });
    const stale = await editor.agent.post(`/api/review/subjects/${s.lighthouse.id}/grid`).set('x-csrf-token', editor.csrf).send({ decisions }).expect(409);
    expect(stale.body.stale.map((x: { itemId: number }) => x.itemId)).toEqual([more[1]!.id]);
    expect(await Suggestion.count({ where: { subjectId: s.lighthouse.id, state: 'accepted' } })).toBe(0);
    decisions[1]!.version = (await Item.findByPk(more[1]!.id))!.version;
    await editor.agent.post(`/api/review/subjects/${s.lighthouse.id}/grid`).set('x-csrf-token', editor.csrf).send({ decisions }).expect(200);
    expect(await Suggestion.count({ where: { itemId: more.map((m) => m.id), state: 'accepted' } })).toBe(2);
    expect(await Suggestion.count({ where: { itemId: more.map((m) => m.id), state: 'rejected' } })).toBe(1);
  });

  it('a second review is blind, from another editor, once, and only for the sampled share', async () => {
    const s = await scene();
    const manager = await signIn(app, 'manager');
    await manager.agent.put(`/api/review/collections/${s.c.id}/settings`).set('x-csrf-token', manager.csrf).send({ doubleReviewShare: 1 }).expect(403);
    const archivist = await signIn(app, 'archivist');
    await archivist.agent.put(`/api/review/collections/${s.c.id}/settings`).set('x-csrf-token', archivist.csrf).send({ doubleReviewShare: 1 }).expect(200);
    const r = await editor.agent.post(`/api/review/items/${s.item.id}/subjects`).set('x-csrf-token', editor.csrf).send({ version: s.item.version, subjectId: s.ship.id, decision: 'accept' }).expect(200);
    await editor.agent.post(`/api/review/items/${s.item.id}/approve`).set('x-csrf-token', editor.csrf).send({ version: r.body.item.version, altText: 'Engraving of a sailing ship off the light', longDescription: '', decorative: false }).expect(200);
    await editor.agent.post(`/api/review/items/${s.item.id}/second-review`).set('x-csrf-token', editor.csrf).send({ present: [s.lighthouse.id], absent: [] }).expect(409);
    const queue = await other.agent.get(`/api/review/collections/${s.c.id}/second-reviews`).expect(200);
    expect(queue.body.items.map((i: { id: number }) => i.id)).toContain(s.item.id);
    const blind = await other.agent.get(`/api/review/items/${s.item.id}?blind=1`).expect(200);
    expect(blind.body.secondReview).toMatchObject({ status: 'open', blind: true });
    expect(blind.body.item.altText).toBeNull();
    expect(blind.body.subjects.map((x: { state: unknown; subject: { id: number } }) => [x.subject.id, x.state])).toEqual([[s.lighthouse.id, null]]);
    await other.agent.post(`/api/review/items/${s.item.id}/second-review`).set('x-csrf-token', other.csrf).send({ present: [s.lighthouse.id, s.ship.id], absent: [] }).expect(201);
    await other.agent.post(`/api/review/items/${s.item.id}/second-review`).set('x-csrf-token', other.csrf).send({ present: [], absent: [] }).expect(409);
    const agreement = await manager.agent.get(`/api/review/collections/${s.c.id}/agreement`).expect(200);
    expect(agreement.body.perPair).toHaveLength(1);
    expect(agreement.body.perPair[0].items).toBe(1);
    expect(agreement.body.perSubject.map((x: { label: string }) => x.label).sort()).toEqual(['lighthouse', 'sailing ship']);
  });

  it('promotes a reviewed item to a photo example of a confirmed subject, embedded, once', async () => {
    const s = await scene();
    const png = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 40, g: 90, b: 120 } } }).png().toBuffer();
    const outcome = await ingestFile({ sequelize, storage, limits: intakeLimits({}) }, { collectionId: s.c.id, fileName: 'promote-me.png', source: { buffer: png }, origin: 'upload' });
    if (outcome.outcome !== 'ingested') throw new Error(JSON.stringify(outcome));
    const item = (await Item.findByPk(outcome.itemId))!;
    await editor.agent.post(`/api/review/items/${item.id}/examples`).set('x-csrf-token', editor.csrf).send({ subjectId: s.lighthouse.id }).expect(409);
    await editor.agent.post(`/api/review/items/${item.id}/subjects`).set('x-csrf-token', editor.csrf).send({ version: item.version, subjectId: s.lighthouse.id, decision: 'accept' }).expect(200);
    const made = await editor.agent.post(`/api/review/items/${item.id}/examples`).set('x-csrf-token', editor.csrf).send({ subjectId: s.lighthouse.id }).expect(201);
    const example = await Example.findByPk(made.body.exampleId);
    expect(example).toMatchObject({ subjectId: s.lighthouse.id, medium: 'photo', origin: 'promoted', itemId: item.id, createdBy: editor.user.id });
    expect(await Embedding.count({ where: { ownerType: 'example', ownerId: example!.id } })).toBe(1);
    const again = await editor.agent.post(`/api/review/items/${item.id}/examples`).set('x-csrf-token', editor.csrf).send({ subjectId: s.lighthouse.id }).expect(200);
    expect(again.body).toEqual({ exampleId: example!.id, created: false });
    // a fresh item with nothing decided is "not reviewed"; one with a decision is not
    const q = await editor.agent.get(`/api/review/queue?collectionId=${s.c.id}&notReviewed=true`).expect(200);
    expect(q.body.items.map((i: { id: number }) => i.id)).toEqual([s.item.id]);
  }, 60_000);

  it('refuses a decision on a subject of another collection, and a manager may not decide', async () => {
    const s = await scene();
    const elsewhere = await makeSubject(await makeCollection());
    await editor.agent.post(`/api/review/items/${s.item.id}/subjects`).set('x-csrf-token', editor.csrf).send({ version: s.item.version, subjectId: elsewhere.id, decision: 'accept' }).expect(422);
    const manager = await signIn(app, 'manager');
    await manager.agent.post(`/api/review/items/${s.item.id}/subjects`).set('x-csrf-token', manager.csrf).send({ version: s.item.version, subjectId: s.lighthouse.id, decision: 'accept' }).expect(403);
    expect((await Item.findByPk(s.item.id))?.version).toBe(s.item.version);
  });
});

describe('the queue order', () => {
  // A small collection whose order is worked out by hand from the rule the queue states: items this editor
  // skipped last; before them, the items whose most doubtful open proposal is nearest 0.5 first, items
  // without a calibrated open proposal after those (items under review, 'suggested', before items with no proposal);
  // ties by identifier. Approved items are not in the open queue.
  async function queueScene() {
    const c = await makeCollection();
    const a = await makeSubject(c, { prefLabel: 'harbour crane' });
    const b = await makeSubject(c, { prefLabel: 'pilot boat' });
    const made = new Map<string, Item>();
    const item = async (identifier: string, state: 'new' | 'suggested' | 'approved', proposals: Array<[typeof a, number | null, ('proposed' | 'accepted')?]>) => {
      const it = await makeItem(c, { identifier, state });
      for (const [subject, probability, decision] of proposals) await (await makeSuggestion(it, subject, decision ?? 'proposed')).update({ probability });
      made.set(identifier, it);
    };
    // created out of identifier order, so neither id nor creation order can pass for the queue's order
    await item('Q-07', 'suggested', [[a, 0.75], [b, 0.55]]);
    await item('Q-05', 'suggested', [[b, 0.75]]);
    await item('Q-02', 'suggested', [[a, 0.25]]);
    await item('Q-01', 'suggested', [[a, null]]);
    await item('Q-04', 'new', []);
    await item('Q-03', 'suggested', [[a, 0.5, 'accepted'], [b, 0.9]]);
    await item('Q-06', 'suggested', [[a, 0.5]]);
    await item('Q-08', 'approved', [[a, 0.45]]);
    await item('Q-09', 'suggested', [[a, 0.52]]);
    await editor.agent.post(`/api/review/items/${made.get('Q-06')!.id}/skip`).set('x-csrf-token', editor.csrf).expect(204);
    const identifiers = new Map([...made].map(([k, v]) => [v.id, k]));
    const queue = async (query: string) => {
      const res = await editor.agent.get(`/api/review/queue?collectionId=${c.id}${query}`).expect(200);
      return { ids: (res.body.items as Array<{ id: number }>).map((e) => identifiers.get(e.id)), body: res.body };
    };
    return { a, b, queue };
  }

  it('orders by the open proposal nearest 0.5, uncalibrated and unsuggested items next, ties by identifier, skipped last', async () => {
    const { a, b, queue } = await queueScene();
    const all = await queue('');
    expect(all.ids).toEqual(['Q-09', 'Q-07', 'Q-02', 'Q-05', 'Q-03', 'Q-01', 'Q-04', 'Q-06']);
    expect(all.body.total).toBe(8);
    const q07 = all.body.items[1];
    expect(q07).toMatchObject({ proposed: 2, mostUncertain: { subjectId: b.id, probability: 0.55 }, skippedByYou: false });
    expect(all.body.items[5]).toMatchObject({ proposed: 1, mostUncertain: null });
    expect(all.body.items[7]).toMatchObject({ skippedByYou: true });
    expect((await queue('&limit=3&offset=2')).ids).toEqual(['Q-02', 'Q-05', 'Q-03']);
    // one subject: only its proposals count towards the doubt
    const one = await queue(`&subjectId=${a.id}`);
    expect(one.ids).toEqual(['Q-09', 'Q-02', 'Q-07', 'Q-01', 'Q-03', 'Q-06']);
    expect(one.body.items[2]).toMatchObject({ mostUncertain: { subjectId: a.id, probability: 0.75 } });
    // a probability band picks the items, the doubt still comes from all their open proposals
    expect((await queue('&minProbability=0.7&maxProbability=0.8')).ids).toEqual(['Q-07', 'Q-05']);
    expect((await queue('&sort=identifier')).ids).toEqual(['Q-01', 'Q-02', 'Q-03', 'Q-04', 'Q-05', 'Q-07', 'Q-09', 'Q-06']);
    expect((await queue('&notReviewed=true')).ids).toEqual(['Q-09', 'Q-07', 'Q-02', 'Q-05', 'Q-01', 'Q-04', 'Q-06']);
    expect((await queue('&state=approved')).ids).toEqual(['Q-08']);
  });

  it('keeps that order current: a decision at the desk, and proposals rewritten by SQL and then refreshed as the suggest stage does', async () => {
    const { a, b, queue } = await queueScene();
    const before = await queue('');
    expect(before.ids.slice(0, 2)).toEqual(['Q-09', 'Q-07']);
    // accepting Q-09's only proposal leaves it with no open doubt: it joins the items still under review without one
    // (state 'suggested', by identifier), before Q-04, which never had a proposal
    const q09 = before.body.items[0] as { id: number; version: number };
    await editor.agent.post(`/api/review/items/${q09.id}/subjects`).set('x-csrf-token', editor.csrf).send({ version: q09.version, subjectId: a.id, decision: 'accept' }).expect(200);
    expect((await queue('')).ids).toEqual(['Q-07', 'Q-02', 'Q-05', 'Q-03', 'Q-01', 'Q-09', 'Q-04', 'Q-06']);
    // the suggest stage writes its proposals with SQL of its own, past the model's hooks, then refreshes the collection
    const q05 = before.body.items.find((e: { identifier: string }) => e.identifier === 'Q-05') as { id: number };
    await sequelize.query('UPDATE suggestions SET probability = 0.5 WHERE item_id = :id AND subject_id = :s', { replacements: { id: q05.id, s: b.id } });
    expect((await queue('')).ids[0]).toBe('Q-07');
    const [row] = await sequelize.query<{ collection_id: number }>('SELECT collection_id FROM items WHERE id = :id', { replacements: { id: q05.id }, type: QueryTypes.SELECT });
    await refreshCollectionReviewMargins(sequelize, row!.collection_id);
    expect((await queue('')).ids.slice(0, 2)).toEqual(['Q-05', 'Q-07']);
  });
});

