import { describe, expect, it } from 'vitest';
import { RunningMean, prepareMatrix, type CollectionCentres } from '../../server/src/ml/centring.ts';
import { cosine, featureFromBuffer, normalise } from '../../server/src/ml/features.ts';
import { gaussian, seededRng } from '../../server/src/ml/random.ts';
import { chooseMethod, synthesizeSubjectModel, trainCollectionRegressor, type RawFeature } from '../../server/src/ml/synthesize.ts';

// A generated collection: raw (uncentred) features = a shared offset (what every scan has in common)
// + the subject direction + noise; drawings have their own shared offset. Centring must remove both.
const d = 8;
const layout = { blocks: [4, 4] };
const rng = seededRng(9);
const g = () => gaussian(rng);
const scanOffset = Float32Array.from({ length: d }, () => 3 + g());
const drawOffset = Float32Array.from({ length: d }, () => -2 + g());
const subjects = Array.from({ length: 6 }, () => normalise(Float32Array.from({ length: d }, g)));
const raw = (offset: Float32Array, c: Float32Array, s = 0.3) => Float32Array.from(offset, (o, i) => o + c[i]! + s * g());
let id = 0;
const scans = subjects.flatMap((c, s) => Array.from({ length: 20 }, () => ({ id: ++id, s, feature: raw(scanOffset, c) })));
const drawings = subjects.flatMap((c, s) => Array.from({ length: 4 }, () => ({ id: ++id, s, feature: raw(drawOffset, c) })));
const centres: CollectionCentres = {
  scans: RunningMean.of(scans.map((x) => x.feature)),
  examples: RunningMean.of(drawings.map((x) => x.feature)),
  subjectsWithExamples: subjects.length,
};
const ctx = { embedderId: 'test-embedder@1', layout, centres, collectionMatrix: prepareMatrix(scans.map((x) => x.feature), centres.scans.mean(), layout) };
const of = (s: number, xs: { s: number; id: number; feature: Float32Array }[]): RawFeature[] => xs.filter((x) => x.s === s).map(({ id, feature }) => ({ id, feature }));

describe('synthesizeSubjectModel: from stored features to a subject_models row', () => {
  it('chooses trained, then photo-augmented, then regressed, then prototype', () => {
    expect(chooseMethod({ examples: 3, confirmed: 12, rejected: 10 }, true)).toBe('trained');
    expect(chooseMethod({ examples: 3, confirmed: 2, rejected: 0 }, true)).toBe('photo_augmented');
    expect(chooseMethod({ examples: 3, confirmed: 0, rejected: 0 }, true)).toBe('regressed');
    expect(chooseMethod({ examples: 3, confirmed: 0, rejected: 0 }, false)).toBe('prototype');
    expect(() => chooseMethod({ examples: 0, confirmed: 0, rejected: 0 }, false)).toThrow();
  });

  it('a prototype from drawings alone: centred weights, honest z-score calibration, measured quality', async () => {
    const r = await synthesizeSubjectModel({ examples: of(0, drawings), confirmed: [], rejected: [], others: of(1, scans).slice(0, 10) }, ctx);
    expect(r.method).toBe('prototype');
    expect(r.calibration.kind).toBe('zscore');
    expect(r.stored.dimension).toBe(d);
    expect(r.stored.embedderId).toBe('test-embedder@1');
    expect(Array.from(featureFromBuffer(r.stored.weights, d))).toEqual(Array.from(r.model.weights));
    expect(r.stored.madeFrom.exampleIds).toEqual(of(0, drawings).map((x) => x.id));
    expect(r.quality.judgements).toEqual({ examples: 4, confirmed: 0, rejected: 0, otherSubject: 10 });
    expect(r.quality.averagePrecision).toBeGreaterThan(0.8);
    // without centring the shared offsets would dominate; with it the model points at the subject
    expect(cosine(r.model.weights, subjects[0]!)).toBeGreaterThan(0.7);
  });

  it('photo-augmented with confirmations, then trained and Platt-calibrated once there are enough decisions', async () => {
    const confirmed = of(2, scans);
    const rejected = scans.filter((x) => x.s !== 2).slice(0, 30).map(({ id, feature }) => ({ id, feature }));
    const few = await synthesizeSubjectModel({ examples: of(2, drawings), confirmed: confirmed.slice(0, 4), rejected: rejected.slice(0, 3) }, ctx);
    expect(few.method).toBe('photo_augmented');
    expect(few.calibration.kind).toBe('zscore'); // 4 confirmations and 3 rejections are not enough for Platt
    const many = await synthesizeSubjectModel({ examples: of(2, drawings), confirmed, rejected }, ctx);
    expect(many.method).toBe('trained');
    expect(many.calibration.kind).toBe('platt');
    expect(many.quality.judgements.confirmed).toBe(20);
    expect(many.quality.averagePrecision).toBeGreaterThan(0.9);
  }, 60_000);

  it('uses the regressor only when its validation measured it better', async () => {
    const all = subjects.map((_, k) => ({ examples: of(k, drawings), confirmed: of(k, scans) }));
    expect(await trainCollectionRegressor(all.slice(0, 4), ctx)).toBeNull(); // fewer than 5 qualifying subjects
    expect(await trainCollectionRegressor(all.map((x) => ({ ...x, confirmed: x.confirmed.slice(0, 9) })), ctx)).toBeNull(); // < 10 confirmed each
    const trained = await trainCollectionRegressor(all, ctx, { kind: 'linear', steps: 50, episodes: 1 });
    expect(trained?.subjects).toBe(6);
    const { map, validation } = trained!;
    const notBetter = { map, validation: { ...validation, better: false } };
    const a = await synthesizeSubjectModel({ examples: of(0, drawings), confirmed: [], rejected: [] }, { ...ctx, regressor: notBetter });
    expect(a.method).toBe('prototype');
    const b = await synthesizeSubjectModel({ examples: of(0, drawings), confirmed: [], rejected: [] }, { ...ctx, regressor: { map, validation: { ...validation, better: true } } });
    expect(b.method).toBe('regressed');
    expect(b.stored.madeFrom.regressorId).toBe(map.id);
  }, 60_000);
});
