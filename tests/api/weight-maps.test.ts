/**
 * The collection's weight map against the real database: trained from the collection's reviewed subjects,
 * measured on held-out subjects, stored as versions, chosen only when it beats the prototype, and used by
 * from-examples models; carry maps between two collections likewise against re-centring.
 *
 * Features are generated, not embedded (these tests check what the services decide on features whose right
 * answer is known): a 16-dimensional "embedder" of two 8-float blocks; each subject has a direction c; its
 * scans are c plus noise, its examples D(c) plus noise with D a fixed signed permutation (the drawing →
 * photograph gap the map must undo). Without the gap the prototype is already perfect.
 */
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { featureToBuffer, normalise, seededRng, type Rng } from '../../server/src/ml/index.ts';
import { gaussian } from '../../server/src/ml/random.ts';
import type { Subject } from '../../server/src/models/index.ts';
import { Embedding, Example, Item, SubjectModel, Suggestion, WeightMapVersion, type Collection } from '../../server/src/models/index.ts';
import { synthesizeSubjectModel } from '../../server/src/services/subject-models.ts';
import { carryDecision, listWeightMaps, refreshRegressor } from '../../server/src/services/weight-maps.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';
import { signIn } from '../helpers/people.ts';

const EMBEDDER = { id: 'planted-16@test', dimension: 16, layout: { blocks: [8, 8] } };
// the generated gap is extreme: Adam gets a larger step than the product default (tuned for real features)
const FAST = { kind: 'linear' as const, steps: 400, learningRate: 0.05 };
const SLOW = { timeout: 120_000 };

let sequelize: Sequelize;
let config: AppConfig;
beforeAll(async () => ({ sequelize, config } = await openTestDatabase()), 60_000);
afterAll(async () => sequelize?.close());
beforeEach(async () => resetDatabase(sequelize));

const noisy = (c: Float32Array, sigma: number, rng: Rng) => normalise(Float32Array.from(c, (x) => x + (sigma * gaussian(rng)) / Math.sqrt(c.length)));
const distort = (c: Float32Array) => Float32Array.from({ length: c.length }, (_, i) => (i % 2 ? -1 : 1) * c[c.length - 1 - i]!);
const NO_FILE = 'f'.repeat(64);

interface Planted {
  subject: Subject;
  c: Float32Array;
  items: number[];
}

/** Subjects with examples and `confirmed` accepted items each (features stored under the planted embedder). */
async function plant(collection: Collection, n: number, opts: { seed: number; gap: boolean; confirmed?: number; sigma?: number; labels?: string[]; examples?: number }): Promise<Planted[]> {
  // directions from their own generator: the same seed gives the same subjects whatever the counts
  const directions = seededRng(opts.seed);
  const rng = seededRng(opts.seed * 7919 + (opts.confirmed ?? 12));
  const out: Planted[] = [];
  for (let s = 0; s < n; s++) {
    const c = normalise(Float32Array.from({ length: EMBEDDER.dimension }, () => gaussian(directions)));
    const subject = await makeSubject(collection, { prefLabel: opts.labels?.[s] ?? `planted subject ${opts.seed}-${s}` });
    const examples = await Example.bulkCreate(
      Array.from({ length: opts.examples ?? 4 }, () => ({ subjectId: subject.id, medium: 'illustration' as const, origin: 'uploaded' as const, fileKey: NO_FILE, itemId: null, createdBy: null })),
    );
    const items = await Item.bulkCreate(
      Array.from({ length: opts.confirmed ?? 12 }, (_, q) => ({
        collectionId: collection.id, identifier: `P-${opts.seed}-${opts.confirmed ?? 12}-${s}-${q}`, fileName: `p-${s}-${q}.jpg`, fileKey: null, mimeType: null, width: null, height: null, byteSize: null,
        caption: null, creator: null, dateText: null, rights: null, captionFlagNote: null, altText: null, longDescription: null, ocrText: null, approvedBy: null, approvedAt: null,
      })),
    );
    const sigma = opts.sigma ?? 0.6;
    await Embedding.bulkCreate([
      ...examples.map((x) => ({ ownerType: 'example' as const, ownerId: x.id, embedderId: EMBEDDER.id, dimension: 16, vector: featureToBuffer(noisy(opts.gap ? distort(c) : c, sigma, rng)) })),
      ...items.map((i) => ({ ownerType: 'item' as const, ownerId: i.id, embedderId: EMBEDDER.id, dimension: 16, vector: featureToBuffer(noisy(c, sigma, rng)) })),
    ]);
    await Suggestion.bulkCreate(items.map((i) => ({ itemId: i.id, subjectId: subject.id, subjectModelId: null, runId: null, score: null, probability: null, state: 'accepted' as const, decidedBy: null, decidedAt: new Date() })));
    out.push({ subject, c, items: items.map((i) => i.id) });
  }
  return out;
}

describe('the collection weight map', () => {
  it('is trained on the reviewed subjects, chosen when it beats the prototype on held-out subjects, and used by from-examples models', SLOW, async () => {
    const c = await makeCollection({ name: 'Harbour engravings' });
    const trained = await plant(c, 30, { seed: 41, gap: true });
    // a new subject: examples only, nothing confirmed yet
    const [fresh] = await plant(c, 1, { seed: 42, gap: true, confirmed: 0, labels: ['net loft'] });

    const first = await refreshRegressor(sequelize, EMBEDDER, c.id, { settings: FAST });
    expect(first).toMatchObject({ status: 'trained', chosenChanged: true, latest: { version: 1, chosen: true, kind: 'linear', embedderId: EMBEDDER.id, purpose: 'regressed' } });
    expect(first.latest!.mapAp).toBeGreaterThan(first.latest!.baselineAp + 0.4); // measured here: 0.04 → 0.70
    expect(first.reason).toMatch(/^Chosen: it measured better than the prototype \(held-out AP 0\.\d{3} regressed against 0\.\d{3} prototype, over 30 subjects in 5 folds\)/);
    const row = await WeightMapVersion.findOne({ where: { collectionId: c.id } });
    expect(row!.weights.length).toBeGreaterThan(16 * 16 * 4);
    expect((row!.trainedOn as { subjects: Array<{ subjectId: number; confirmed: number }> }).subjects.map((s) => s.subjectId)).toEqual(trained.map((t) => t.subject.id));
    expect((row!.validation as { perSubject: unknown[]; method: string }).perSubject).toHaveLength(30);
    expect(row!.fingerprint).toMatch(/^[0-9a-f]{64}$/);

    // the same inputs never train twice
    const again = await refreshRegressor(sequelize, EMBEDDER, c.id, { settings: FAST });
    expect(again).toMatchObject({ status: 'unchanged', chosenChanged: false, chosen: { version: 1 } });
    expect(await WeightMapVersion.count()).toBe(1);

    const model = await synthesizeSubjectModel(sequelize, EMBEDDER, fresh!.subject.id, { mode: 'from-examples' }, null);
    expect(model.method).toBe('regressed');
    expect(model.madeFrom).toMatchObject({ weightMapVersionId: row!.id, weightMapVersion: 1, regressorId: row!.mapId });
    expect(model.madeFrom.how).toMatch(/mapped by the collection's weight map version 1 \(linear\)/);
    // the regressed model points at the subject's scans, where its prototype pointed away (D is a signed reversal)
    const stored = await SubjectModel.findByPk(model.id);
    const w = new Float32Array(stored!.weights.buffer.slice(stored!.weights.byteOffset, stored!.weights.byteOffset + stored!.weights.byteLength));
    const cos = w.reduce((a, v, i) => a + v * fresh!.c[i]!, 0) / Math.hypot(...w);
    expect(cos).toBeGreaterThan(0.6); // measured here: 0.82

    // the subject page reads how the model was made from the model history
    const { agent } = await signIn(createApp({ config, sequelize }), 'editor');
    const history = await agent.get(`/api/subjects/${fresh!.subject.id}/models`).expect(200);
    expect(history.body.models[0]).toMatchObject({ method: 'regressed', madeFrom: { weightMapVersion: 1 } });
    expect(await listWeightMaps(c.id)).toHaveLength(1);
  });

  it('is stored but not chosen when it does not beat the prototype, and from-examples models say so', SLOW, async () => {
    const c = await makeCollection();
    await plant(c, 6, { seed: 43, gap: false, sigma: 0.2 });
    const [fresh] = await plant(c, 1, { seed: 44, gap: false, confirmed: 0 });
    const out = await refreshRegressor(sequelize, EMBEDDER, c.id, { settings: FAST });
    expect(out).toMatchObject({ status: 'trained', chosen: null, chosenChanged: false, latest: { version: 1, chosen: false, baselineAp: 1 } });
    expect(out.reason).toMatch(/^Not chosen: it did not measure better than the prototype/);
    const model = await synthesizeSubjectModel(sequelize, EMBEDDER, fresh!.subject.id, { mode: 'from-examples' }, null);
    expect(model.method).toBe('prototype');
    expect(model.madeFrom).toMatchObject({ weightMapVersionId: null });
    expect(model.madeFrom.how).toMatch(/weight map version 1 is not used\. Not chosen: it did not measure better/);
  });

  it('needs five subjects with examples and ten confirmed items; below that, none is trained and a chosen one is withdrawn', SLOW, async () => {
    const c = await makeCollection();
    const planted = await plant(c, 5, { seed: 45, gap: true, confirmed: 10 });
    await plant(c, 3, { seed: 46, gap: true, confirmed: 9 });
    const out = await refreshRegressor(sequelize, EMBEDDER, c.id, { settings: FAST });
    expect(out.status).toBe('trained');
    expect((out.latest!.trainedOn as { subjects: unknown[] }).subjects).toHaveLength(5);
    // an editor takes back one confirmation: four qualifying subjects remain
    await Suggestion.update({ state: 'rejected' }, { where: { subjectId: planted[0]!.subject.id, itemId: planted[0]!.items[0]! } });
    const after = await refreshRegressor(sequelize, EMBEDDER, c.id, { settings: FAST });
    expect(after.status).toBe(out.chosen ? 'withdrawn' : 'too-few');
    expect(after.chosen).toBeNull();
    expect(after.reason).toMatch(/^4 subject\(s\) have examples and at least 10 confirmed items; the weight map needs 5\./);
    expect(await WeightMapVersion.count({ where: { chosen: true } })).toBe(0);
  });
});

describe('carried models between two collections', () => {
  async function sourceModels(source: Collection, planted: Planted[], gap: boolean): Promise<void> {
    for (const p of planted) {
      await SubjectModel.create({
        subjectId: p.subject.id, version: 1, method: 'trained', embedderId: EMBEDDER.id, dimension: 16, weights: featureToBuffer(normalise(gap ? distort(p.c) : p.c)),
        bias: 0, calibration: null, metrics: null, madeFrom: {}, active: true, createdBy: null,
      });
    }
  }

  it('use a carry map only when it beats re-centring alone on held-out shared subjects, and record which and why', SLOW, async () => {
    const labels = Array.from({ length: 25 }, (_, i) => `shared subject ${i}`);
    const drawings = await makeCollection({ name: 'Pattern book', medium: 'drawing' });
    const photos = await makeCollection({ name: 'Harbour photographs', medium: 'photograph' });
    // the same directions on both sides (same seed); the source side's models carry the gap
    const onSource = await plant(drawings, 25, { seed: 51, gap: false, confirmed: 1, labels });
    await sourceModels(drawings, onSource, true);
    await plant(photos, 24, { seed: 51, gap: false, labels });
    const target = await makeSubject(photos, { prefLabel: 'shared subject 24' }); // shares a label, nothing confirmed here

    const decision = await carryDecision(sequelize, EMBEDDER, drawings.id, photos.id, { settings: FAST });
    expect(decision.use).toBe('map');
    expect(decision.sharedSubjects).toBe(24);
    expect(decision.version).toMatchObject({ purpose: 'carried', sourceCollectionId: drawings.id, version: 1, chosen: true });
    expect(decision.version!.mapAp).toBeGreaterThan(decision.version!.baselineAp + 0.3); // measured here: 0.04 → 0.49
    expect(decision.reason).toMatch(/^The carry map measured better \(held-out AP 0\.\d{3} with the carry map against 0\.\d{3} by re-centring alone, over 24 shared subjects in 5 folds\)\.$/);

    const model = await synthesizeSubjectModel(sequelize, EMBEDDER, target.id, { mode: 'carried', sourceSubjectId: onSource[24]!.subject.id }, null);
    expect(model.method).toBe('carried');
    expect(model.madeFrom).toMatchObject({ sourceSubjectId: onSource[24]!.subject.id, carry: { use: 'map', weightMapVersion: 1, sharedSubjects: 24 } });
    expect(await WeightMapVersion.count({ where: { purpose: 'carried' } })).toBe(1); // same inputs: reused, not retrained
  });

  it('carry by re-centring alone below eight shared subjects, and say so', SLOW, async () => {
    const labels = Array.from({ length: 5 }, (_, i) => `shared subject ${i}`);
    const drawings = await makeCollection({ medium: 'drawing' });
    const photos = await makeCollection({ medium: 'photograph' });
    const onSource = await plant(drawings, 5, { seed: 52, gap: false, confirmed: 1, labels });
    await sourceModels(drawings, onSource, true);
    const onTarget = await plant(photos, 5, { seed: 52, gap: false, labels });
    const model = await synthesizeSubjectModel(sequelize, EMBEDDER, onTarget[0]!.subject.id, { mode: 'carried', sourceSubjectId: onSource[0]!.subject.id }, null);
    expect(model.madeFrom).toMatchObject({ carry: { use: 're-centring', weightMapVersionId: null, sharedSubjects: 5 } });
    expect((model.madeFrom.carry as { reason: string }).reason).toMatch(/^5 shared subject\(s\) have confirmed items on this collection; a carry map needs at least 8/);
    expect(await WeightMapVersion.count()).toBe(0);
  });
});
