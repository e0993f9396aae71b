/**
 * Few-shot benchmark: `npm run bench:fewshot -- [dir] [--folds 5] [--episodes 10] [--shots 1,5,10] [--seed 1]`
 *
 * `dir` is laid out `<domain>/<category>/<image>` (default ../shared/bench/sketch-photo-125, skipped
 * politely when absent); an optional manifest.csv gives `instance_group`, so a drawing is never scored
 * against the photograph it was drawn from. Every non-photo domain is a source; the target is `photo`.
 *
 * Protocol (../shared/bench/README.md): categories split into disjoint folds; anything
 * category-independent (the weight regressors, the carry map) is learned on the other folds only; for
 * each test fold, seeded episodes pick k source images per category, build every method's subject
 * models, and classify the fold's photographs (N-way, argmax of the subject scores), excluding the
 * instance groups of the chosen drawings. Mean accuracy ± standard error over folds × episodes.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { projectRoot } from '../../server/src/config.ts';
import { createEmbedder, mirrorAverage } from '../../server/src/ml/backbone/embedder.ts';
import { prepareFeature, RunningMean, type FeatureLayout } from '../../server/src/ml/centring.ts';
import { dot, meanOf, stackRows } from '../../server/src/ml/features.ts';
import { meanAndStandardError } from '../../server/src/ml/metrics.ts';
import type { LinearModel } from '../../server/src/ml/model.ts';
import { sample, seededRng, shuffled } from '../../server/src/ml/random.ts';
import { carriedModel, trainCarryMap } from '../../server/src/ml/synthesis/carried.ts';
import { fitLogisticMany } from '../../server/src/ml/synthesis/logistic.ts';
import { photoAugmentedModel } from '../../server/src/ml/synthesis/photo-augmented.ts';
import { prototypeModel, prototypeWeights } from '../../server/src/ml/synthesis/prototype.ts';
import { narrowerBaseWeights, refinedModel } from '../../server/src/ml/synthesis/refined.ts';
import { manyShotTargets, RegressorEnsemble, trainRegressor, type WeightMap } from '../../server/src/ml/synthesis/regressor.ts';
import { transductiveRefine } from '../../server/src/ml/synthesis/transductive.ts';
import { benchRoot, embedSet, type EmbeddedSet } from './dataset.ts';
import { BROADER_GROUPS } from './groups.ts';

const { values, positionals } = parseArgs({
  allowPositionals: true,
  options: {
    folds: { type: 'string', default: '5' },
    episodes: { type: 'string', default: '10' },
    shots: { type: 'string', default: '1,5,10' },
    seed: { type: 'string', default: '1' },
    steps: { type: 'string', default: '1200' },
    confirmed: { type: 'string', default: '5' },
    methods: { type: 'string' },
  },
});

const dir = resolve(positionals[0] ?? join(benchRoot(), 'sketch-photo-125'));
if (!existsSync(dir)) {
  console.log(`bench:fewshot — ${dir} is not here; nothing to measure (the bench data lives in ../shared/bench/ next to the repository).`);
  process.exit(0);
}
const FOLDS = Number(values.folds);
const EPISODES = Number(values.episodes);
const SHOTS = values.shots!.split(',').map(Number);
const SEED = Number(values.seed);
const STEPS = Number(values.steps);
const CONFIRMED = Number(values.confirmed);
const only = values.methods ? new Set(values.methods.split(',')) : null;

const set: EmbeddedSet = await embedSet(dir);
// ms per image with the product's embedder, measured now on a sample (the cache may have served the rest)
const embedTiming = await (async () => {
  const e = await createEmbedder();
  try {
    const step = Math.max(1, Math.floor(set.images.length / 24));
    const sample = set.images.filter((_, i) => i % step === 0).slice(0, 24).map((im) => readFileSync(join(dir, im.path)));
    await e.embed([sample[0]!]);
    const t = performance.now();
    for (const b of sample) await e.embed([b]);
    return { ms: (performance.now() - t) / sample.length, n: sample.length };
  } finally {
    e.dispose();
  }
})();
const layout: FeatureLayout = { blocks: set.blocks };
const d = set.dimension;

interface Img {
  i: number;
  category: string;
  group: string;
  raw: Float32Array;
  /** raw feature averaged with its mirror image (non-photo) */
  rawMirror: Float32Array;
}
const byDomain = new Map<string, Img[]>();
set.images.forEach((im, i) => {
  const raw = set.features[i]!;
  const m = set.mirrored[i];
  const entry: Img = { i, category: im.category, group: im.group, raw, rawMirror: m ? mirrorAverage({ original: raw, mirrored: m }) : raw };
  if (!byDomain.has(im.domain)) byDomain.set(im.domain, []);
  byDomain.get(im.domain)!.push(entry);
});
const photos = byDomain.get('photo');
if (!photos) throw new Error(`${dir} has no photo/ domain`);
const sources = [...byDomain.keys()].filter((k) => k !== 'photo');

function groupBy<T>(xs: readonly T[], key: (x: T) => string): Map<string, T[]> {
  const m = new Map<string, T[]>();
  for (const x of xs) {
    const k = key(x);
    if (!m.has(k)) m.set(k, []);
    m.get(k)!.push(x);
  }
  return m;
}

/** N-way accuracy: argmax over subjects of w·x. */
function accuracy(models: readonly Float32Array[], evalSet: readonly { x: Float32Array; label: number }[]): number {
  let ok = 0;
  for (const e of evalSet) {
    let best = -Infinity;
    let arg = -1;
    models.forEach((w, s) => {
      const v = dot(w, e.x);
      if (v > best) {
        best = v;
        arg = s;
      }
    });
    if (arg === e.label) ok++;
  }
  return ok / evalSet.length;
}

type Results = Map<string, Map<number, number[]>>;
const results: Results = new Map();
const timings = new Map<string, { ms: number; models: number }>();
const notes = new Map<string, string>();
function record(method: string, k: number, acc: number): void {
  if (!results.has(method)) results.set(method, new Map());
  const r = results.get(method)!;
  if (!r.has(k)) r.set(k, []);
  r.get(k)!.push(acc);
}
function timed<T>(method: string, models: number, fn: () => T): T {
  const t0 = performance.now();
  const out = fn();
  const t = timings.get(method) ?? { ms: 0, models: 0 };
  t.ms += performance.now() - t0;
  t.models += models;
  timings.set(method, t);
  return out;
}
const want = (m: string) => !only || [...only].some((o) => m.startsWith(o));

const pooled = new Map<number, { proto: number; base: number; refined: number; chance: number; n: number }>();
const t0 = performance.now();
for (const source of sources) {
  const drawings = byDomain.get(source)!;
  const drawingsByCat = groupBy(drawings, (x) => x.category);
  const categories = [...groupBy(photos, (x) => x.category).keys()].filter((c) => drawingsByCat.has(c)).sort();
  const folds = Array.from({ length: FOLDS }, () => [] as string[]);
  shuffled(categories, seededRng(SEED)).forEach((c, i) => folds[i % FOLDS]!.push(c));

  for (let f = 0; f < FOLDS; f++) {
    const testCats = folds[f]!.slice().sort();
    const testSet = new Set(testCats);
    const trainCats = categories.filter((c) => !testSet.has(c));
    const rngFold = seededRng(SEED * 1000 + f);

    // ---- training side (other folds): its own collection means
    const trainPhotos = photos.filter((p) => !testSet.has(p.category));
    const trainDrawings = drawings.filter((p) => !testSet.has(p.category));
    const trScan = RunningMean.of(trainPhotos.map((p) => p.raw)).mean();
    const trEx = RunningMean.of(trainDrawings.map((p) => p.rawMirror)).mean();
    const tasks = trainCats.map((c) => ({
      examples: drawingsByCat.get(c)!.map((p) => prepareFeature(p.rawMirror, trEx, layout)),
      items: trainPhotos.filter((p) => p.category === c).map((p) => prepareFeature(p.raw, trScan, layout)),
    }));
    const regressors: Partial<Record<'linear' | 'mlp' | 'ensemble', WeightMap>> = {};
    if (want('regressed') || want('transductive') || want('photo-augmented') || want('refined')) {
      const tt = performance.now();
      const targets = await manyShotTargets(tasks);
      const linear = await trainRegressor(tasks, { kind: 'linear', steps: STEPS, seed: SEED + f }, targets);
      const mlp = await trainRegressor(tasks, { kind: 'mlp', steps: STEPS, seed: SEED + f }, targets);
      regressors.linear = linear;
      regressors.mlp = mlp;
      regressors.ensemble = new RegressorEnsemble([linear, mlp]);
      process.stderr.write(`fold ${f + 1}/${FOLDS}: regressors trained in ${((performance.now() - tt) / 1000).toFixed(1)} s\n`);
    }
    // carry map: source-collection models (logistic regression on k drawings) → photo-collection models
    let carry: WeightMap | null = null;
    if (want('carried')) {
      const inputs = new Map<string, Float32Array[]>();
      const tc = performance.now();
      for (const k of SHOTS) {
        for (let rep = 0; rep < 2; rep++) {
          const chosen = trainCats.map((c) => sample(tasks[trainCats.indexOf(c)]!.examples, k, rngFold));
          const models = await sourceModels(chosen);
          trainCats.forEach((c, s) => {
            if (!inputs.has(c)) inputs.set(c, []);
            inputs.get(c)!.push(models[s]!.weights);
          });
        }
      }
      carry = await trainCarryMap(
        trainCats.map((c, s) => ({ source: inputs.get(c)!, targetItems: tasks[s]!.items })),
        { steps: STEPS, seed: SEED + f },
      );
      process.stderr.write(`fold ${f + 1}/${FOLDS}: carry map trained in ${((performance.now() - tc) / 1000).toFixed(1)} s\n`);
    }

    // ---- test side: the fold is the collection
    const testPhotos = photos.filter((p) => testSet.has(p.category));
    const scanMean = RunningMean.of(testPhotos.map((p) => p.raw)).mean();
    const prepPhoto = new Map(testPhotos.map((p) => [p.i, prepareFeature(p.raw, scanMean, layout)]));
    const uncentred = new Map(testPhotos.map((p) => [p.i, prepareFeature(p.raw, null, layout)]));
    const label = new Map(testCats.map((c, s) => [c, s]));

    for (const k of SHOTS) {
      for (let e = 0; e < EPISODES; e++) {
        const rng = seededRng(SEED * 1_000_000 + f * 10_000 + k * 100 + e);
        const chosen = testCats.map((c) => sample(drawingsByCat.get(c)!, k, rng));
        const excludedGroups = new Set(chosen.flat().map((x) => x.group));
        const evalPhotos = testPhotos.filter((p) => !excludedGroups.has(p.group));
        const evalSet = evalPhotos.map((p) => ({ x: prepPhoto.get(p.i)!, label: label.get(p.category)! }));
        // example centring: the mean of the collection's examples (here: this episode's drawings)
        const exMeanMirror = meanOf(chosen.flat().map((x) => x.rawMirror));
        const exMeanPlain = meanOf(chosen.flat().map((x) => x.raw));
        const ex = chosen.map((xs) => xs.map((x) => prepareFeature(x.rawMirror, exMeanMirror, layout)));
        const exPlain = chosen.map((xs) => xs.map((x) => prepareFeature(x.raw, exMeanPlain, layout)));
        const S = testCats.length;

        if (want('prototype, L2 only')) {
          const w = timed('prototype, L2 only', S, () => chosen.map((xs) => prototypeWeights(xs.map((x) => prepareFeature(x.raw, null, layout)))));
          record('prototype, L2 only', k, accuracy(w, evalPhotos.map((p) => ({ x: uncentred.get(p.i)!, label: label.get(p.category)! }))));
        }
        if (want('prototype, centred')) {
          record('prototype, centred', k, accuracy(timed('prototype, centred', S, () => exPlain.map((xs) => prototypeModel(xs).weights)), evalSet));
          record('prototype, centred + mirror', k, accuracy(timed('prototype, centred + mirror', S, () => ex.map((xs) => prototypeModel(xs).weights)), evalSet));
        }
        const regressed: Partial<Record<'linear' | 'mlp' | 'ensemble', Float32Array[]>> = {};
        for (const kind of ['linear', 'mlp', 'ensemble'] as const) {
          const T = regressors[kind];
          if (!T) continue;
          const name = `regressed ${kind}`;
          regressed[kind] = timed(name, S, () => ex.map((xs) => T.model(xs).weights));
          if (want(name)) record(name, k, accuracy(regressed[kind]!, evalSet));
          if (want('transductive') && kind !== 'mlp') {
            const scope = stackRows(evalSet.map((x) => x.x), d);
            const tname = `regressed ${kind} + transductive`;
            const w = timed(tname, S, () => transductiveRefine(regressed[kind]!, scope, d));
            record(tname, k, accuracy(w, evalSet));
          }
        }
        if (want('transductive')) {
          const scope = stackRows(evalSet.map((x) => x.x), d);
          const w = timed('prototype + transductive', S, () => transductiveRefine(ex.map((xs) => prototypeWeights(xs)), scope, d));
          record('prototype + transductive', k, accuracy(w, evalSet));
        }
        if (want('carried') && carry) {
          const src = await sourceModels(ex);
          record('carried (source LR, re-centring alone)', k, accuracy(src.map((m) => carriedModel(m).weights), evalSet));
          record('carried (source LR, carry map T)', k, accuracy(timed('carried (source LR, carry map T)', S, () => src.map((m) => carriedModel(m, carry).weights)), evalSet));
        }
        if (want('photo-augmented')) {
          // CONFIRMED photographs per subject join the drawings; they leave the evaluation set
          const conf = testCats.map((c) => sample(evalPhotos.filter((p) => p.category === c), CONFIRMED, rng));
          const confIds = new Set(conf.flat().map((p) => p.i));
          const evalRest = evalSet.filter((_, j) => !confIds.has(evalPhotos[j]!.i));
          const confPrep = conf.map((ps) => ps.map((p) => prepPhoto.get(p.i)!));
          const name = `photo-augmented, union prototype (+${CONFIRMED} confirmed)`;
          record(name, k, accuracy(timed(name, S, () => ex.map((xs, s) => photoAugmentedModel({ examples: xs, confirmed: confPrep[s]!, exampleWeight: 1 }).weights)), evalRest));
          if (regressors.ensemble) {
            const n2 = `photo-augmented with T ensemble (+${CONFIRMED} confirmed)`;
            record(n2, k, accuracy(timed(n2, S, () => ex.map((xs, s) => photoAugmentedModel({ examples: xs, confirmed: confPrep[s]!, regressor: regressors.ensemble }).weights)), evalRest));
          }
        }
        if (want('photo → photo')) {
          // reference: k photographs as the examples (scan-side centring), scored on the other photographs
          const ph = testCats.map((c) => sample(testPhotos.filter((p) => p.category === c), k, rng));
          const used = new Set(ph.flat().map((p) => p.i));
          const rest = testPhotos.filter((p) => !used.has(p.i)).map((p) => ({ x: prepPhoto.get(p.i)!, label: label.get(p.category)! }));
          record('photo → photo prototype (reference)', k, accuracy(ph.map((ps) => prototypeWeights(ps.map((p) => prepPhoto.get(p.i)!))), rest));
        }
        if (want('trained') && k === SHOTS[0]) {
          // upper bound: logistic regression on 15 confirmed photographs per subject (rejections = the others')
          const tr = testCats.map((c) => sample(testPhotos.filter((p) => p.category === c), 15, rng));
          const used = new Set(tr.flat().map((p) => p.i));
          const rest = testPhotos.filter((p) => !used.has(p.i)).map((p) => ({ x: prepPhoto.get(p.i)!, label: label.get(p.category)! }));
          const rows = tr.flat();
          const Y = new Float32Array(rows.length * S);
          rows.forEach((p, r) => (Y[r * S + label.get(p.category)!] = 1));
          const tt = performance.now();
          const models = await fitLogisticMany(stackRows(rows.map((p) => prepPhoto.get(p.i)!), d), d, Y, S);
          const t = timings.get('trained') ?? { ms: 0, models: 0 };
          timings.set('trained', { ms: t.ms + performance.now() - tt, models: t.models + S });
          record('trained: logistic regression, 15 confirmed photos (upper bound)', 0, accuracy(models.map((m) => withBias(m)), rest.map((r) => ({ x: withOne(r.x), label: r.label }))));
        }
        if (want('refined') && regressors.ensemble) {
          refinedEpisode(testCats, ex, evalPhotos, prepPhoto, regressors.ensemble, k);
          flushRefined(k);
        }
      }
    }
    process.stderr.write(`fold ${f + 1}/${FOLDS} done (${((performance.now() - t0) / 1000).toFixed(0)} s)\n`);
  }
}

/** Source-collection models for `carried`: one-vs-rest logistic regression on the chosen drawings. */
async function sourceModels(chosen: readonly (readonly Float32Array[])[]): Promise<LinearModel[]> {
  const rows = chosen.flat();
  const S = chosen.length;
  const Y = new Float32Array(rows.length * S);
  let r = 0;
  chosen.forEach((xs, s) => xs.forEach(() => (Y[r++ * S + s] = 1)));
  return fitLogisticMany(stackRows(rows, d), d, Y, S);
}

function withBias(m: LinearModel): Float32Array {
  const w = new Float32Array(m.weights.length + 1);
  w.set(m.weights);
  w[m.weights.length] = m.bias;
  return w;
}
function withOne(x: Float32Array): Float32Array {
  const y = new Float32Array(x.length + 1);
  y.set(x);
  y[x.length] = 1;
  return y;
}

/**
 * Narrower subjects: the fold's categories grouped under invented broader subjects (groups.ts); each
 * group with ≥ 2 categories in the fold is a sub-problem scored only among its own photographs.
 */
function refinedEpisode(
  testCats: string[],
  ex: Float32Array[][],
  evalPhotos: { i: number; category: string }[],
  prep: Map<number, Float32Array>,
  T: WeightMap,
  k: number,
): void {
  for (const [broader, members] of Object.entries(BROADER_GROUPS)) {
    const inFold = testCats.filter((c) => members.includes(c));
    if (inFold.length < 2) continue;
    const items = evalPhotos.filter((p) => inFold.includes(p.category));
    const evalSet = items.map((p) => ({ x: prep.get(p.i)!, label: inFold.indexOf(p.category) }));
    const exs = inFold.map((c) => ex[testCats.indexOf(c)]!);
    const base = exs.map((xs) => narrowerBaseWeights(xs, T));
    const broaderItems = items.map((p) => prep.get(p.i)!);
    const refined = timed('refined', inFold.length, () =>
      exs.map((xs, s) => refinedModel({ examples: xs, broaderItems, siblings: base.filter((_, j) => j !== s), regressor: T }).weights),
    );
    const n = evalSet.length;
    const acc = pooled.get(k) ?? { proto: 0, base: 0, refined: 0, chance: 0, n: 0 };
    acc.proto += accuracy(exs.map((xs) => prototypeWeights(xs)), evalSet) * n;
    acc.base += accuracy(base, evalSet) * n;
    acc.refined += accuracy(refined, evalSet) * n;
    acc.chance += n / inFold.length;
    acc.n += n;
    pooled.set(k, acc);
    void broader;
  }
}
function flushRefined(k: number): void {
  const acc = pooled.get(k);
  if (!acc || acc.n === 0) return;
  record('narrower: prototype, within broader', k, acc.proto / acc.n);
  record('narrower: regressed alone, within broader', k, acc.base / acc.n);
  record('narrower: refined (siblings, 16 PCs)', k, acc.refined / acc.n);
  record('narrower: chance', k, acc.chance / acc.n);
  pooled.delete(k);
}

// ---- table
console.log(`\nbench:fewshot — ${dir}`);
console.log(`embedder ${set.embedderId} (${d} floats); ${set.images.length} images; sources: ${sources.join(', ')} → photo`);
console.log(`${FOLDS} folds of categories, ${EPISODES} seeded episodes per fold and k; instance groups of the chosen drawings excluded; mean accuracy ± s.e.`);
console.log(`embedding: ${embedTiming.ms.toFixed(1)} ms/image (decode + resize + backbone, one thread, ${embedTiming.n} images measured now)` + (set.timing ? `; this run embedded the set at ${(set.timing.ms / set.timing.passes).toFixed(1)} ms per backbone pass` : '; other features from the cache'));
console.log('ms/subject: synthesis time per subject model (features already stored); scoring is bench:rank');
const ks = SHOTS;
const header = ['method', ...ks.map((k) => `k = ${k}`), 'ms/subject'];
const rows: string[][] = [];
for (const [method, byK] of results) {
  const t = timings.get(method) ?? (method.startsWith('trained') ? timings.get('trained') : undefined);
  const cells = ks.map((k) => {
    const v = byK.get(k) ?? (method.startsWith('trained') ? byK.get(0) : undefined);
    if (!v) return '—';
    const { mean, se } = meanAndStandardError(v);
    return `${mean.toFixed(3)} ± ${se.toFixed(3)}`;
  });
  rows.push([method, ...cells, t && t.models ? (t.ms / t.models).toFixed(3) : '—']);
}
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
const line = (r: string[]) => '| ' + r.map((c, i) => c.padEnd(widths[i]!)).join(' | ') + ' |';
console.log(line(header));
console.log('|' + widths.map((w) => '-'.repeat(w + 2)).join('|') + '|');
for (const r of rows) console.log(line(r));
for (const [k, v] of notes) console.log(`${k}: ${v}`);
console.log(`total ${((performance.now() - t0) / 1000).toFixed(0)} s`);
void projectRoot;
