/**
 * Synthesis methods on small generated feature sets where the right answer is known.
 *
 * The generated world: each subject has a unit "true" direction c in a d-dimensional prepared space;
 * scans (photographs) of the subject are c plus noise; drawings are D(c) plus noise, where D is a fixed
 * distortion (a signed permutation of the coordinates) standing in for the drawing → photograph gap.
 * Under D the prototype of drawings points away from the subject's scans, and the right weight map is
 * D⁻¹ = Dᵀ — which the regressor must find.
 */
import { describe, expect, it } from 'vitest';
import { ensureBackend, tf } from '../../server/src/ml/backbone/tfjs-runtime.ts';
import { cosine, dot, normalise, stackRows } from '../../server/src/ml/features.ts';
import { gaussian, seededRng, type Rng } from '../../server/src/ml/random.ts';
import { carriedModel, MIN_SHARED_SUBJECTS, trainCarryMap } from '../../server/src/ml/synthesis/carried.ts';
import { fitLogistic, fitLogisticMany } from '../../server/src/ml/synthesis/logistic.ts';
import { photoAugmentedModel } from '../../server/src/ml/synthesis/photo-augmented.ts';
import { prototypeModel, prototypeWeights } from '../../server/src/ml/synthesis/prototype.ts';
import { refinedModel } from '../../server/src/ml/synthesis/refined.ts';
import {
  RegressorEnsemble,
  trainRegressor,
  trainWeightMap,
  trainWeightMapWithValidation,
  weightMapFromBuffer,
  WeightRegressor,
  type RegressorTask,
  type WeightMap,
} from '../../server/src/ml/synthesis/regressor.ts';
import { canTrain, trainedModel } from '../../server/src/ml/synthesis/trained.ts';
import { transductiveRefine } from '../../server/src/ml/synthesis/transductive.ts';

const SLOW = { timeout: 60_000 };
const D = 16;

function randomUnit(rng: Rng, d = D): Float32Array {
  return normalise(Float32Array.from({ length: d }, () => gaussian(rng)));
}
function noisy(c: Float32Array, sigma: number, rng: Rng): Float32Array {
  return normalise(Float32Array.from(c, (x) => x + (sigma * gaussian(rng)) / Math.sqrt(c.length)));
}
/** the fixed distortion: reverse the coordinates and flip the sign of every other one */
function distort(c: Float32Array): Float32Array {
  const n = c.length;
  return Float32Array.from({ length: n }, (_, i) => (i % 2 ? -1 : 1) * c[n - 1 - i]!);
}
function world(seed: number, subjects: number, drawingsEach = 10, scansEach = 20, sigma = 0.6) {
  const rng = seededRng(seed);
  return Array.from({ length: subjects }, () => {
    const c = randomUnit(rng);
    return {
      c,
      drawings: Array.from({ length: drawingsEach }, () => noisy(distort(c), sigma, rng)),
      scans: Array.from({ length: scansEach }, () => noisy(c, sigma, rng)),
    };
  });
}
/** N-way accuracy of models (argmax of w·x) on labelled scans */
function accuracy(models: readonly Float32Array[], scans: readonly { x: Float32Array; y: number }[]): number {
  let ok = 0;
  for (const { x, y } of scans) {
    let best = -Infinity;
    let arg = -1;
    models.forEach((w, s) => {
      const v = dot(w, x);
      if (v > best) [best, arg] = [v, s];
    });
    if (arg === y) ok++;
  }
  return ok / scans.length;
}
const labelled = (w: ReturnType<typeof world>) => w.flatMap((s, y) => s.scans.map((x) => ({ x, y })));

describe('prototype (weight imprinting, Qi, Brown & Lowe CVPR 2018)', () => {
  it('is the normalised mean of the normalised examples: e₁ and 3·e₂ give (e₁ + e₂)/√2', () => {
    const e1 = Float32Array.from([1, 0, 0]);
    const e2 = Float32Array.from([0, 3, 0]);
    const m = prototypeModel([e1, e2]);
    expect(Array.from(m.weights)).toEqual([expect.closeTo(Math.SQRT1_2, 6), expect.closeTo(Math.SQRT1_2, 6), 0]);
    expect(m.bias).toBe(0);
  });

  it('recovers the subject direction from noisy examples and ranks its scans first', () => {
    const w = world(1, 8).map((s) => ({ ...s, drawings: s.scans.slice(0, 5) })); // undistorted examples
    const models = w.map((s) => prototypeWeights(s.drawings));
    models.forEach((m, i) => expect(cosine(m, w[i]!.c)).toBeGreaterThan(0.9));
    expect(accuracy(models, labelled(w))).toBeGreaterThan(0.9);
  });

  it('refuses no examples and a wrong dimension', () => {
    expect(() => prototypeModel([])).toThrow();
    expect(() => prototypeModel([new Float32Array(3), new Float32Array(4)])).toThrow(/values/);
  });
});

describe('logistic regression (the trained method and the regressor targets)', () => {
  /** an independent reference: Newton's method on the same balanced, L2-penalised objective */
  function newton(X: Float32Array[], y: number[], l2: number): Float64Array {
    const d = X[0]!.length + 1;
    const n = X.length;
    const pos = y.filter((v) => v === 1).length;
    const wt = y.map((v) => (v === 1 ? n / (2 * pos) : n / (2 * (n - pos))) / n);
    const w = new Float64Array(d);
    for (let it = 0; it < 50; it++) {
      const g = new Float64Array(d);
      const H = Array.from({ length: d }, () => new Float64Array(d));
      X.forEach((x, i) => {
        const xt = [...x, 1];
        const z = xt.reduce((s, v, j) => s + v * w[j]!, 0);
        const p = 1 / (1 + Math.exp(-z));
        for (let a = 0; a < d; a++) {
          g[a]! += wt[i]! * (p - y[i]!) * xt[a]!;
          for (let b = 0; b < d; b++) H[a]![b]! += wt[i]! * p * (1 - p) * xt[a]! * xt[b]!;
        }
      });
      for (let a = 0; a < d - 1; a++) {
        g[a]! += 2 * l2 * w[a]!;
        H[a]![a]! += 2 * l2;
      }
      // solve H·step = g by Gauss–Jordan
      const M = H.map((row, a) => [...row, g[a]!]);
      for (let c = 0; c < d; c++) {
        let piv = c;
        for (let r = c + 1; r < d; r++) if (Math.abs(M[r]![c]!) > Math.abs(M[piv]![c]!)) piv = r;
        [M[c], M[piv]] = [M[piv]!, M[c]!];
        for (let r = 0; r < d; r++) {
          if (r === c) continue;
          const f = M[r]![c]! / M[c]![c]!;
          for (let k = c; k <= d; k++) M[r]![k]! -= f * M[c]![k]!;
        }
      }
      for (let a = 0; a < d; a++) w[a]! -= M[a]![d]! / M[a]![a]!;
    }
    return w;
  }

  it('converges to the optimum that Newton’s method finds (to 1e-3)', SLOW, async () => {
    const rng = seededRng(5);
    const a = randomUnit(rng, 4);
    const b = randomUnit(rng, 4);
    const pos = Array.from({ length: 30 }, () => noisy(a, 1.5, rng));
    const neg = Array.from({ length: 50 }, () => noisy(b, 1.5, rng));
    const l2 = 0.05;
    const m = await fitLogistic(pos, neg, { l2, iterations: 3000 });
    const ref = newton([...pos, ...neg], [...pos.map(() => 1), ...neg.map(() => 0)], l2);
    for (let i = 0; i < 4; i++) expect(m.weights[i]).toBeCloseTo(ref[i]!, 3);
    expect(m.bias).toBeCloseTo(ref[4]!, 3);
  });

  it('fits one-vs-rest models for several subjects at once, each pointing at its subject', SLOW, async () => {
    const w = world(2, 5);
    const rows = w.flatMap((s) => s.scans);
    const Y = new Float32Array(rows.length * 5);
    w.forEach((s, k) => s.scans.forEach((_, j) => (Y[(k * s.scans.length + j) * 5 + k] = 1)));
    const models = await fitLogisticMany(stackRows(rows), D, Y, 5);
    models.forEach((m, k) => expect(cosine(m.weights, w[k]!.c)).toBeGreaterThan(0.7));
    expect(accuracy(models.map((m) => m.weights), labelled(w))).toBeGreaterThan(0.9);
  });

  it('needs positives and negatives', async () => {
    await expect(fitLogistic([Float32Array.from([1, 0])], [])).rejects.toThrow();
  });
});

describe('regressed (model regression network, Wang & Hebert ECCV 2016)', () => {
  const train = world(10, 40);
  const test = world(11, 10);
  const tasks: RegressorTask[] = train.map((s) => ({ examples: s.drawings, items: s.scans }));
  // the generated gap is extreme (T must travel from a rescaled identity to a signed permutation), so
  // these tests give Adam a larger step than the product default, which is tuned for real features
  const FAST = { steps: 400, learningRate: 0.05 };
  const regressed = (T: WeightMap) => test.map((s) => T.model(s.drawings.slice(0, 3)).weights);
  const protoAcc = accuracy(test.map((s) => prototypeWeights(s.drawings.slice(0, 3))), labelled(test));

  it('the prototype of distorted drawings is near chance on new subjects (the gap the regressor must close)', () => {
    expect(protoAcc).toBeLessThan(0.3); // chance 0.1
  });

  it('linear T learns the inverse distortion: on unseen subjects T(prototype) points at the scans', SLOW, async () => {
    await ensureBackend();
    const tensorsBefore = tf.memory().numTensors;
    const T = await trainRegressor(tasks, { kind: 'linear', ...FAST });
    expect(tf.memory().numTensors).toBe(tensorsBefore); // training frees what it allocates
    const w = regressed(T);
    const meanCos = test.reduce((a, s, i) => a + cosine(w[i]!, s.c), 0) / test.length;
    expect(meanCos).toBeGreaterThan(0.8); // the inverse distortion itself reaches ≈ 0.95 on these draws
    expect(accuracy(w, labelled(test))).toBeGreaterThan(0.85);
  });

  it('the residual MLP and the ensemble do as well, and both survive serialisation exactly', SLOW, async () => {
    const map = await trainWeightMap(tasks, { kind: 'ensemble', ...FAST });
    expect(map).toBeInstanceOf(RegressorEnsemble);
    const [linear, mlp] = (map as RegressorEnsemble).members;
    expect(mlp!.kind).toBe('mlp');
    expect(accuracy(regressed(mlp!), labelled(test))).toBeGreaterThan(0.85);
    expect(accuracy(regressed(map), labelled(test))).toBeGreaterThan(0.85);
    const back = weightMapFromBuffer(map.toBuffer());
    expect(back.id).toBe(map.id);
    const p = prototypeWeights(test[0]!.drawings);
    expect(Array.from(back.apply(p))).toEqual(Array.from(map.apply(p)));
    expect(Array.from(WeightRegressor.fromBuffer(linear!.toBuffer()).apply(p))).toEqual(Array.from(linear!.apply(p)));
  });

  it('validation on held-out subjects says it beats the prototype here', SLOW, async () => {
    const { map, validation } = await trainWeightMapWithValidation(tasks, { kind: 'linear', ...FAST, episodes: 2 });
    expect(map.kind).toBe('linear');
    expect(validation.heldOutSubjects).toBe(8);
    expect(validation.regressedMeanAP).toBeGreaterThan(validation.prototypeMeanAP + 0.3);
    expect(validation.better).toBe(true);
  });

  it('refuses to train on fewer than two subjects or a subject without items', async () => {
    await expect(trainRegressor(tasks.slice(0, 1))).rejects.toThrow(/two/);
    await expect(trainRegressor([tasks[0]!, { examples: tasks[1]!.examples, items: [] }])).rejects.toThrow(/no confirmed items/);
  });
});

describe('photo-augmented', () => {
  it('mixes the drawing direction and the confirmed items by λ = m / (m + r·k)', () => {
    const e1 = Float32Array.from([1, 0]);
    const e2 = Float32Array.from([0, 1]);
    // k = 1 example, m = 1 confirmed, r = 1: λ = 1/2 → (e₁ + e₂)/√2
    expect(Array.from(photoAugmentedModel({ examples: [e1], confirmed: [e2], exampleWeight: 1 }).weights)).toEqual([expect.closeTo(Math.SQRT1_2, 6), expect.closeTo(Math.SQRT1_2, 6)]);
    // r = 0.5: λ = 1/1.5 = 2/3 → normalise(1/3, 2/3)
    const w = photoAugmentedModel({ examples: [e1], confirmed: [e2] }).weights;
    expect(w[1]! / w[0]!).toBeCloseTo(2, 6);
    expect(Array.from(photoAugmentedModel({ examples: [], confirmed: [e2] }).weights)).toEqual([0, 1]);
  });

  it('confirmed scans fix what distorted drawings alone get wrong', () => {
    const w = world(20, 8);
    const conf = w.map((s) => s.scans.slice(0, 3));
    const rest = w.flatMap((s, y) => s.scans.slice(3).map((x) => ({ x, y })));
    const drawingsOnly = accuracy(w.map((s) => prototypeWeights(s.drawings.slice(0, 3))), rest);
    const augmented = accuracy(w.map((s, i) => photoAugmentedModel({ examples: s.drawings.slice(0, 3), confirmed: conf[i]! }).weights), rest);
    expect(augmented).toBeGreaterThan(drawingsOnly + 0.4);
  });
});

describe('trained (logistic regression on confirmations and rejections, Platt-calibrated)', () => {
  it('ranks held-out confirmations above rejections and gives them calibrated probabilities above ½', SLOW, async () => {
    const rng = seededRng(30);
    const c = randomUnit(rng);
    const other = randomUnit(rng);
    const confirmed = Array.from({ length: 30 }, () => noisy(c, 1, rng));
    const rejected = Array.from({ length: 40 }, () => noisy(other, 1, rng));
    const r = await trainedModel({ confirmed, rejected });
    expect(cosine(r.model.weights, normalise(Float32Array.from(c, (x, i) => x - other[i]!)))).toBeGreaterThan(0.8);
    expect(r.heldOut.labels).toHaveLength(70);
    const p = (x: Float32Array) => 1 / (1 + Math.exp(r.calibration.a * (dot(r.model.weights, x) + r.model.bias) + r.calibration.b));
    const fresh = Array.from({ length: 20 }, () => noisy(c, 1, rng));
    const freshNeg = Array.from({ length: 20 }, () => noisy(other, 1, rng));
    expect(fresh.filter((x) => p(x) > 0.5).length).toBeGreaterThanOrEqual(18);
    expect(freshNeg.filter((x) => p(x) < 0.5).length).toBeGreaterThanOrEqual(18);
    expect(r.calibration.a).toBeLessThan(0); // higher score → higher probability
  });

  it('waits for enough confirmations and rejections', async () => {
    expect(canTrain({ confirmed: 10, rejected: 10 })).toBe(true);
    expect(canTrain({ confirmed: 9, rejected: 50 })).toBe(false);
    await expect(trainedModel({ confirmed: [Float32Array.from([1, 0])], rejected: [Float32Array.from([0, 1])] })).rejects.toThrow(/confirmations and rejections/);
  });
});

describe('refined (narrower subject from its broader subject)', () => {
  // broader subject b; narrower subjects b + δⱼ with δⱼ in a 3-dimensional subspace (their differences
  // span 2 dimensions: the 2 principal directions of the broader subject's scans); the narrower
  // subjects' drawings carry heavy noise outside that subspace, the broader subject's scans do not
  const rng = seededRng(40);
  const b = randomUnit(rng);
  const basis = [4, 5, 6].map((i) => Float32Array.from({ length: D }, (_, j) => (j === i ? 1 : 0)));
  const deltas = [0, 1, 2].map((j) => basis[j]!.map((x) => 0.5 * x));
  const centre = (j: number) => normalise(Float32Array.from(b, (x, i) => x + deltas[j]![i]!));
  const offSubspace = (x: Float32Array, s: number) => normalise(Float32Array.from(x, (v, i) => ([4, 5, 6].includes(i) ? v : v + s * gaussian(rng))));
  const drawings = [0, 1, 2].map((j) => Array.from({ length: 3 }, () => offSubspace(centre(j), 0.35)));
  const scans = [0, 1, 2].flatMap((j) => Array.from({ length: 30 }, () => ({ x: noisy(centre(j), 0.15, rng), y: j })));
  const broaderItems = scans.map((s) => s.x);

  it('keeps what tells siblings apart: each refined model points at its own offset from the broader subject', () => {
    const protos = drawings.map((d) => prototypeWeights(d));
    const refined = drawings.map((d, j) => refinedModel({ examples: d, broaderItems, siblings: protos.filter((_, i) => i !== j), components: 2 }).weights);
    // the known answer: each narrower subject's centre minus the mean of the sibling centres
    const centres = [0, 1, 2].map(centre);
    const mean = Float32Array.from({ length: D }, (_, i) => (centres[0]![i]! + centres[1]![i]! + centres[2]![i]!) / 3);
    const target = (j: number) => Float32Array.from(centres[j]!, (x, i) => x - mean[i]!);
    refined.forEach((w, j) => expect(cosine(w, target(j))).toBeGreaterThan(0.9));
    // the prototypes point mostly at the broader subject; without the subspace step the drawing noise stays
    const protoMean = Float32Array.from({ length: D }, (_, i) => (protos[0]![i]! + protos[1]![i]! + protos[2]![i]!) / 3);
    protos.forEach((w, j) => expect(cosine(w, target(j))).toBeLessThan(0.6));
    protos.forEach((w, j) => expect(cosine(Float32Array.from(w, (x, i) => x - protoMean[i]!), target(j))).toBeLessThan(0.8));
    expect(accuracy(refined, scans)).toBeGreaterThan(0.9);
  });

  it('without siblings, removes the broader model’s direction instead', () => {
    const w = refinedModel({ examples: drawings[0]!, broaderItems: [], siblings: [], broader: { weights: b, bias: 0 } }).weights;
    expect(Math.abs(dot(w, b))).toBeLessThan(1e-5);
  });
});

describe('carried (a model from one collection used on another)', () => {
  it('with enough shared subjects, a carry map recovers the target-side direction of a new subject', SLOW, async () => {
    const shared = world(50, 20);
    const fresh = world(51, 5);
    // source collection: models are the (distorted) drawing-side prototypes; target: the scans
    const map = await trainCarryMap(shared.map((s) => ({ source: prototypeWeights(s.drawings), targetItems: s.scans })), { steps: 800, learningRate: 0.05 });
    expect(map).not.toBeNull();
    const sources = fresh.map((s) => ({ weights: prototypeWeights(s.drawings), bias: 0 }));
    const carried = sources.map((m) => carriedModel(m, map).weights);
    const recentredOnly = sources.map((m) => carriedModel(m).weights);
    expect(accuracy(carried, labelled(fresh))).toBeGreaterThan(0.85);
    expect(accuracy(carried, labelled(fresh))).toBeGreaterThan(accuracy(recentredOnly, labelled(fresh)) + 0.4);
  });

  it(`falls back to re-centring alone below ${MIN_SHARED_SUBJECTS} shared subjects`, async () => {
    const few = world(52, MIN_SHARED_SUBJECTS - 1);
    expect(await trainCarryMap(few.map((s) => ({ source: prototypeWeights(s.drawings), targetItems: s.scans })))).toBeNull();
    const m = { weights: Float32Array.from([0.6, 0.8]), bias: 1.5 };
    expect(carriedModel(m)).toEqual({ weights: Float32Array.from([0.6, 0.8]), bias: 0 });
  });
});

describe('scoped transductive refinement (soft k-means, temperature 20, 5 iterations, anchor 0.5)', () => {
  const w = world(60, 6, 10, 40, 0.8);
  const rng = seededRng(61);
  const rough = w.map((s) => noisy(s.c, 2.5, rng)); // poor initial models
  const scope = stackRows(w.flatMap((s) => s.scans));

  it('moves rough models toward their subjects when the scope holds the subjects’ scans', () => {
    const refined = transductiveRefine(rough, scope, D);
    const before = rough.reduce((s, m, i) => s + cosine(m, w[i]!.c), 0) / rough.length;
    const after = refined.reduce((s, m, i) => s + cosine(m, w[i]!.c), 0) / refined.length;
    expect(after).toBeGreaterThan(before + 0.1);
    expect(accuracy(refined, labelled(w))).toBeGreaterThanOrEqual(accuracy(rough, labelled(w)));
    refined.forEach((m) => expect(Math.hypot(...m)).toBeCloseTo(1, 5));
  });

  it('with anchor 1 it returns the normalised models unchanged', () => {
    const same = transductiveRefine(rough, scope, D, { anchor: 1 });
    same.forEach((m, i) => expect(cosine(m, rough[i]!)).toBeCloseTo(1, 6));
  });

  it('drifts away from the subjects when the scope is out of scope (why it is opt-in)', () => {
    const offScope = stackRows(Array.from({ length: 240 }, () => randomUnit(rng)));
    const exact = w.map((s) => s.c);
    const drifted = transductiveRefine(exact, offScope, D);
    const after = drifted.reduce((s, m, i) => s + cosine(m, w[i]!.c), 0) / drifted.length;
    expect(after).toBeLessThan(0.95);
  });
});
