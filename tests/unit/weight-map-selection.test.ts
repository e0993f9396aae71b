/**
 * Choosing a weight map on held-out subjects, on generated feature sets where the right answer is known.
 *
 * The planted world: each subject has a unit direction c in a 16-dimensional prepared space; its confirmed
 * items are c plus noise; its examples are D(c) plus noise, D a fixed signed permutation (reverse the
 * coordinates, flip every other sign) standing in for the drawing → photograph gap. The map that undoes the
 * gap is D⁻¹ = Dᵀ, shared by every subject, so a map learned on some subjects must carry over to the others —
 * and beat the prototype there. Without the gap the prototype is already perfect and a map must not be chosen.
 */
import { describe, expect, it } from 'vitest';
import { cosine, normalise } from '../../server/src/ml/features.ts';
import { gaussian, seededRng, type Rng } from '../../server/src/ml/random.ts';
import { chooseCarry, MIN_SHARED_SUBJECTS } from '../../server/src/ml/synthesis/carried.ts';
import { prototypeWeights } from '../../server/src/ml/synthesis/prototype.ts';
import { compareOnHeldOutSubjects, trainRegressor, trainWeightMap, type HeldOutTask, type WeightMap } from '../../server/src/ml/synthesis/regressor.ts';
import { averagePrecision } from '../../server/src/ml/metrics.ts';

const SLOW = { timeout: 120_000 };
const D = 16;
// the generated gap is extreme (T must travel from a rescaled identity to a signed permutation): Adam gets a
// larger step than the product default, which is tuned for real features (as in ml-synthesis.test.ts)
const FAST = { steps: 400, learningRate: 0.05 };

const unit = (rng: Rng) => normalise(Float32Array.from({ length: D }, () => gaussian(rng)));
const noisy = (c: Float32Array, sigma: number, rng: Rng) => normalise(Float32Array.from(c, (x) => x + (sigma * gaussian(rng)) / Math.sqrt(c.length)));
const distort = (c: Float32Array) => Float32Array.from({ length: c.length }, (_, i) => (i % 2 ? -1 : 1) * c[c.length - 1 - i]!);

function world(seed: number, subjects: number, gap: boolean, sigma = 0.6) {
  const rng = seededRng(seed);
  return Array.from({ length: subjects }, () => {
    const c = unit(rng);
    const drawn = gap ? distort(c) : c;
    return { c, examples: Array.from({ length: 4 }, () => noisy(drawn, sigma, rng)), items: Array.from({ length: 12 }, () => noisy(c, sigma, rng)) };
  });
}

describe('held-out comparison of a weight map with the prototype', () => {
  it('recovers a planted gap: chosen, far better than the prototype on subjects it was not trained on', SLOW, async () => {
    const subjects = world(21, 40, true);
    const tasks: HeldOutTask[] = subjects.map((s) => ({ examples: s.examples, items: s.items }));
    const c = await compareOnHeldOutSubjects(tasks, (ts) => trainRegressor(ts, { kind: 'linear', ...FAST }), { folds: 4 });
    expect(c.folds).toBe(4);
    expect(c.perSubject).toHaveLength(40);
    expect(c.baselineMeanAP).toBeLessThan(0.35); // the prototype of distorted examples ranks near chance (1/40 positives)
    expect(c.mapMeanAP).toBeGreaterThan(c.baselineMeanAP + 0.4); // measured here: 0.027 → 0.73
    expect(c.better).toBe(true);

    // the map trained on all subjects points new subjects' prototypes at their items' direction
    const map = await trainWeightMap(tasks, { kind: 'linear', ...FAST });
    const fresh = world(22, 8, true);
    const mapped = fresh.map((s) => cosine(map.apply(prototypeWeights(s.examples)), s.c));
    const raw = fresh.map((s) => cosine(prototypeWeights(s.examples), s.c));
    const mean = (v: number[]) => v.reduce((a, b) => a + b, 0) / v.length;
    expect(mean(raw)).toBeLessThan(0.3);
    expect(mean(mapped)).toBeGreaterThan(0.8); // measured here: 0.87 (raw prototypes: ≈ 0)
  });

  it('is not chosen where the prototype is already perfect: a tie is not "better"', SLOW, async () => {
    const subjects = world(23, 8, false, 0.2);
    const tasks: HeldOutTask[] = subjects.map((s) => ({ examples: s.examples, items: s.items }));
    const c = await compareOnHeldOutSubjects(tasks, (ts) => trainRegressor(ts, { kind: 'linear', ...FAST }));
    expect(c.folds).toBe(5);
    expect(c.baselineMeanAP).toBe(1);
    expect(c.mapMeanAP).toBeLessThanOrEqual(1);
    expect(c.better).toBe(false);
  });

  it('scores each held-out subject over all reviewed items once, an item confirmed for two subjects positive for both', async () => {
    // 2-D, hand-made: the identity "map" makes both columns equal, so the figures are the prototype's own APs
    const identity: WeightMap = { id: 'identity', kind: 'linear', dimension: 2, apply: (w) => Float32Array.from(w), model: (ex) => ({ weights: prototypeWeights(ex), bias: 0 }), toBuffer: () => Buffer.alloc(0) };
    const x = (a: number, b: number) => normalise(Float32Array.from([a, b]));
    const shared = x(1, 1);
    const tasks: HeldOutTask[] = [
      { examples: [x(1, 0)], items: [x(1, 0.1), shared], itemIds: [1, 2] },
      { examples: [x(0, 1)], items: [x(0.1, 1), shared], itemIds: [3, 2] },
      { examples: [x(-1, 0)], items: [x(-1, 0.2)], itemIds: [4], rejected: [x(-1, 0.1)] },
    ];
    const c = await compareOnHeldOutSubjects(tasks, async () => identity, { folds: 3 });
    expect(c.perSubject.map((r) => r.mapAP)).toEqual(c.perSubject.map((r) => r.baselineAP));
    expect(c.better).toBe(false);
    // subject 0 is scored over the four distinct items (1, 2, 3, 4); its positives are items 1 and 2 (the shared one)
    const w0 = x(1, 0);
    const pool = [x(1, 0.1), shared, x(0.1, 1), x(-1, 0.2)];
    const expected0 = averagePrecision([1, 1, 0, 0], pool.map((v) => v[0]! * w0[0]! + v[1]! * w0[1]!));
    expect(c.perSubject[0]!.baselineAP).toBeCloseTo(expected0, 12);
    expect(expected0).toBe(1); // items 1 and 2 score highest along (1, 0)
    // subject 2 adds its rejected item as a negative: it outscores the confirmed one, so AP = 1/2 (one positive
    // at rank 2; average precision as scikit-learn's average_precision_score defines it, Σ (Rₙ − Rₙ₋₁)·Pₙ)
    expect(c.perSubject[2]!.baselineAP).toBeCloseTo(0.5, 12);
    await expect(compareOnHeldOutSubjects(tasks.slice(0, 2), async () => identity)).rejects.toThrow(/at least 3/);
  });
});

describe('carried models: a carry map only when it beats re-centring on held-out shared subjects', () => {
  // source models are the subjects' weights on a collection of another medium (here: the distorted direction)
  const shared = (seed: number, n: number, gap: boolean) =>
    world(seed, n, gap).map((s) => ({ source: normalise(gap ? distort(s.c) : s.c), targetItems: s.items }));

  it('uses the map when the two collections differ by a learnable gap, and says why', SLOW, async () => {
    const choice = await chooseCarry(shared(31, 30, true), FAST);
    expect(choice.use).toBe('map');
    expect(choice.map?.kind).toBe('linear');
    expect(choice.validation!.mapMeanAP).toBeGreaterThan(choice.validation!.baselineMeanAP + 0.4); // measured here: 0.034 → 0.73
    expect(choice.reason).toMatch(/measured better/);
  });

  it('keeps re-centring when the map does not measure better, keeping the trained map for the record', SLOW, async () => {
    const choice = await chooseCarry(
      world(32, 10, false, 0.2).map((s) => ({ source: s.c, targetItems: s.items })),
      FAST,
    );
    expect(choice.validation!.baselineMeanAP).toBe(1);
    expect(choice.use).toBe('re-centring');
    expect(choice.map).not.toBeNull();
    expect(choice.reason).toMatch(/did not measure better/);
  });

  it(`keeps re-centring below ${MIN_SHARED_SUBJECTS} shared subjects with confirmed items, without training`, async () => {
    const few = shared(33, MIN_SHARED_SUBJECTS, true).map((s, i) => (i === 0 ? { ...s, targetItems: [] } : s));
    const choice = await chooseCarry(few, FAST);
    expect(choice).toMatchObject({ use: 're-centring', map: null, validation: null, sharedSubjects: MIN_SHARED_SUBJECTS - 1 });
    expect(choice.reason).toMatch(new RegExp(`${MIN_SHARED_SUBJECTS - 1} shared subject\\(s\\).*at least ${MIN_SHARED_SUBJECTS}`));
  });
});
