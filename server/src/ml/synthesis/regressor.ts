/**
 * Regressed — a model regression network (Wang & Hebert, "Learning to Learn: Model Regression Networks for
 * Easy Small Sample Learning", ECCV 2016): a map T from few-shot classifier weights (here the subject's
 * prototype) to the weights a many-shot classifier reaches. T is learned on the collection's own subjects
 * that have examples and many confirmed items, with the loss
 *
 *     α·‖w_many − T(w_few)‖² + β·cross-entropy(softmax over the batch's subjects of x·T(w_few))
 *
 * α = 0.01, β = 1, Adam. w_many is the one-vs-rest logistic regression on the confirmed items; w_few is
 * drawn afresh every step from k random examples (k from `shots`), so T sees many few-shot draws.
 * Two forms: linear (T(p) = pA + b) and a one-hidden-layer residual MLP (T(p) = pA + b + relu(pU + c)V),
 * and their ensemble (mean of the two unit-length outputs), which measured at least as well as the
 * linear form on the bench and better on some folds (the two forms err differently). Applying T needs no TF.js (a few thousand
 * multiply-adds in plain TypeScript). A regressed model's weights are T's output normalised to unit
 * length: ranking within a subject does not depend on the scale, and comparing subjects by cosine
 * measured better than by raw T output.
 */
import { createHash } from 'node:crypto';
import { ensureBackend, tf } from '../backbone/tfjs-runtime.ts';
import { dot, normalise, stackRows } from '../features.ts';
import { vecMat } from '../linalg.ts';
import type { LinearModel } from '../model.ts';
import { gaussian, seededRng, type Rng } from '../random.ts';
import { averagePrecision } from '../metrics.ts';
import { fitLogisticMany, type LogisticOptions } from './logistic.ts';
import { prototypeWeights } from './prototype.ts';

export type RegressorKind = 'linear' | 'mlp';
export type WeightMapKind = RegressorKind | 'ensemble';

/** A learned map from few-shot weights to many-shot weights: one regressor or an ensemble. */
export interface WeightMap {
  readonly id: string;
  readonly kind: WeightMapKind;
  readonly dimension: number;
  /** T(w), raw scale */
  apply(w: Float32Array): Float32Array;
  /** the regressed model of a subject: normalise(T(prototype of its examples)) */
  model(examples: readonly Float32Array[]): LinearModel;
  toBuffer(): Buffer;
}

/** One training subject: where its few-shot input comes from, and its confirmed items. */
export interface RegressorTask {
  /** prepared example features; few-shot prototypes are drawn from k of them */
  examples: readonly Float32Array[];
  /** prepared features of the subject's confirmed items (at least a few; ≥ 10 is the product rule) */
  items: readonly Float32Array[];
  /**
   * fixed inputs instead of drawn prototypes (used when carrying models across collections: the
   * source collection's model weights, normalised to unit length like a prototype); one is picked at
   * random each step
   */
  inputs?: readonly Float32Array[];
}

export interface RegressorOptions {
  kind?: RegressorKind;
  alpha?: number;
  beta?: number;
  steps?: number;
  learningRate?: number;
  /** numbers of examples drawn for a few-shot prototype during training */
  shots?: readonly number[];
  /** confirmed items drawn per subject per step for the cross-entropy term */
  itemsPerSubject?: number;
  /** subjects per step (all of them when fewer) */
  subjectsPerStep?: number;
  /** hidden width of the residual MLP */
  hidden?: number;
  /** logistic regression of the many-shot targets */
  target?: LogisticOptions;
  seed?: number;
}

export const REGRESSOR_DEFAULTS = {
  kind: 'linear' as RegressorKind,
  alpha: 0.01,
  beta: 1,
  steps: 600,
  learningRate: 1e-3,
  shots: [1, 2, 3, 5, 8, 10] as readonly number[],
  itemsPerSubject: 8,
  subjectsPerStep: 128,
  hidden: 64,
  seed: 1,
};

/** The minimum the product asks before a subject can teach T. */
export const MIN_CONFIRMED_FOR_REGRESSOR = 10;

type T2 = ReturnType<typeof tf.tensor2d>;

interface Params {
  A: Float32Array; // d × d
  b: Float32Array; // d
  U?: Float32Array; // d × h
  c?: Float32Array; // h
  V?: Float32Array; // h × d
}

export class WeightRegressor implements WeightMap {
  readonly id: string;

  constructor(
    readonly kind: RegressorKind,
    readonly dimension: number,
    readonly hidden: number,
    private readonly p: Params,
  ) {
    const h = createHash('sha256');
    for (const a of [p.A, p.b, p.U, p.c, p.V]) if (a) h.update(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
    this.id = `T-${kind}-${dimension}-${h.digest('hex').slice(0, 12)}`;
  }

  /** T(w): the weights a many-shot model would have, from few-shot weights w. */
  apply(w: Float32Array): Float32Array {
    if (w.length !== this.dimension) throw new Error(`the regressor takes ${this.dimension} values, got ${w.length}`);
    const y = vecMat(w, this.p.A, this.dimension, this.p.b);
    if (this.kind === 'mlp') {
      const z = vecMat(w, this.p.U!, this.hidden, this.p.c);
      for (let i = 0; i < z.length; i++) if (z[i]! < 0) z[i] = 0;
      const r = vecMat(z, this.p.V!, this.dimension);
      for (let i = 0; i < y.length; i++) y[i]! += r[i]!;
    }
    return y;
  }

  model(examples: readonly Float32Array[]): LinearModel {
    return { weights: normalise(this.apply(prototypeWeights(examples))), bias: 0 };
  }

  /** Serialises as a little-endian float32 payload after a length-prefixed JSON header. */
  toBuffer(): Buffer {
    const arrays = [this.p.A, this.p.b, ...(this.kind === 'mlp' ? [this.p.U!, this.p.c!, this.p.V!] : [])];
    const header = Buffer.from(JSON.stringify({ format: 'cartouche-weight-regressor', version: 1, kind: this.kind, dimension: this.dimension, hidden: this.hidden, lengths: arrays.map((a) => a.length) }));
    const body = Buffer.allocUnsafe(arrays.reduce((s, a) => s + a.length * 4, 0));
    let off = 0;
    for (const a of arrays) for (let i = 0; i < a.length; i++, off += 4) body.writeFloatLE(a[i]!, off);
    const len = Buffer.allocUnsafe(4);
    len.writeUInt32LE(header.length, 0);
    return Buffer.concat([len, header, body]);
  }

  static fromBuffer(buf: Buffer): WeightRegressor {
    const map = weightMapFromBuffer(buf);
    if (!(map instanceof WeightRegressor)) throw new Error('the buffer holds an ensemble, not a single regressor');
    return map;
  }

  /** @internal */
  static parse(buf: Buffer): WeightRegressor {
    const hl = buf.readUInt32LE(0);
    const header = JSON.parse(buf.subarray(4, 4 + hl).toString('utf8')) as { format: string; kind: RegressorKind; dimension: number; hidden: number; lengths: number[] };
    if (header.format !== 'cartouche-weight-regressor') throw new Error('not a serialised weight regressor');
    let off = 4 + hl;
    const arrays = header.lengths.map((n) => {
      const a = new Float32Array(n);
      for (let i = 0; i < n; i++, off += 4) a[i] = buf.readFloatLE(off);
      return a;
    });
    const [A, b, U, c, V] = arrays;
    return new WeightRegressor(header.kind, header.dimension, header.hidden, { A: A!, b: b!, U, c, V });
  }
}

/** The mean of its members' unit-length outputs (made unit length again). */
export class RegressorEnsemble implements WeightMap {
  readonly kind = 'ensemble' as const;
  readonly id: string;
  readonly dimension: number;

  constructor(readonly members: readonly WeightRegressor[]) {
    if (members.length === 0) throw new Error('an ensemble needs members');
    this.dimension = members[0]!.dimension;
    if (members.some((m) => m.dimension !== this.dimension)) throw new Error('ensemble members differ in dimension');
    this.id = `T-ensemble-${createHash('sha256').update(members.map((m) => m.id).join(',')).digest('hex').slice(0, 12)}`;
  }

  apply(w: Float32Array): Float32Array {
    const out = new Float32Array(this.dimension);
    for (const m of this.members) {
      const y = normalise(m.apply(w));
      for (let i = 0; i < out.length; i++) out[i]! += y[i]! / this.members.length;
    }
    return out;
  }

  model(examples: readonly Float32Array[]): LinearModel {
    return { weights: normalise(this.apply(prototypeWeights(examples))), bias: 0 };
  }

  /** 'ENS1', member count, then each member's buffer with its byte length. */
  toBuffer(): Buffer {
    const parts: Buffer[] = [Buffer.from('ENS1', 'latin1')];
    const count = Buffer.allocUnsafe(4);
    count.writeUInt32LE(this.members.length, 0);
    parts.push(count);
    for (const m of this.members) {
      const b = m.toBuffer();
      const len = Buffer.allocUnsafe(4);
      len.writeUInt32LE(b.length, 0);
      parts.push(len, b);
    }
    return Buffer.concat(parts);
  }
}

/** Reads a serialised regressor or ensemble. */
export function weightMapFromBuffer(buf: Buffer): WeightMap {
  if (buf.subarray(0, 4).toString('latin1') === 'ENS1') {
    const n = buf.readUInt32LE(4);
    let off = 8;
    const members: WeightRegressor[] = [];
    for (let i = 0; i < n; i++) {
      const len = buf.readUInt32LE(off);
      members.push(WeightRegressor.parse(buf.subarray(off + 4, off + 4 + len)));
      off += 4 + len;
    }
    return new RegressorEnsemble(members);
  }
  return WeightRegressor.parse(buf);
}

function drawInput(task: RegressorTask, shots: readonly number[], rng: Rng): Float32Array {
  if (task.inputs && task.inputs.length > 0) return normalise(task.inputs[Math.floor(rng() * task.inputs.length)]!);
  const k = Math.min(shots[Math.floor(rng() * shots.length)]!, task.examples.length);
  const chosen: Float32Array[] = [];
  const idx = task.examples.map((_, i) => i);
  for (let j = 0; j < k; j++) {
    const r = j + Math.floor(rng() * (idx.length - j));
    [idx[j], idx[r]] = [idx[r]!, idx[j]!];
    chosen.push(task.examples[idx[j]!]!);
  }
  return prototypeWeights(chosen);
}

/** Many-shot targets: one-vs-rest logistic regression over all tasks' confirmed items. */
export async function manyShotTargets(tasks: readonly RegressorTask[], options: LogisticOptions = {}): Promise<LinearModel[]> {
  const rows: Float32Array[] = [];
  const labels: number[] = [];
  tasks.forEach((t, s) => t.items.forEach((x) => (rows.push(x), labels.push(s))));
  const S = tasks.length;
  const d = rows[0]!.length;
  const Y = new Float32Array(rows.length * S);
  labels.forEach((s, i) => (Y[i * S + s] = 1));
  return fitLogisticMany(stackRows(rows, d), d, Y, S, options);
}

/** Trains T on subjects with examples (or fixed inputs) and confirmed items. */
export async function trainRegressor(tasks: readonly RegressorTask[], options: RegressorOptions = {}, precomputedTargets?: readonly LinearModel[]): Promise<WeightRegressor> {
  const o = { ...REGRESSOR_DEFAULTS, ...options };
  if (tasks.length < 2) throw new Error('a regressor needs at least two training subjects');
  for (const [i, t] of tasks.entries()) {
    if (t.items.length === 0) throw new Error(`training subject ${i} has no confirmed items`);
    if ((t.inputs?.length ?? 0) === 0 && t.examples.length === 0) throw new Error(`training subject ${i} has no examples`);
  }
  await ensureBackend();
  const d = tasks[0]!.items[0]!.length;
  const targets = precomputedTargets ?? (await manyShotTargets(tasks, options.target));
  const targetNorm = targets.reduce((s, m) => s + Math.hypot(...m.weights), 0) / targets.length;
  const rng = seededRng(o.seed);
  const S = tasks.length;
  const B = Math.min(S, o.subjectsPerStep);
  const m = o.itemsPerSubject;
  const h = o.hidden;

  // parameters: A starts as (mean target norm)·I, so T begins as a rescaled prototype
  const A0 = new Float32Array(d * d);
  for (let i = 0; i < d; i++) A0[i * d + i] = targetNorm;
  const init: Record<string, { values: Float32Array; shape: [number, number] }> = {
    A: { values: A0, shape: [d, d] },
    b: { values: new Float32Array(d), shape: [1, d] },
  };
  if (o.kind === 'mlp') {
    init.U = { values: Float32Array.from({ length: d * h }, () => gaussian(rng) * Math.sqrt(2 / d)), shape: [d, h] };
    init.c = { values: new Float32Array(h), shape: [1, h] };
    init.V = { values: Float32Array.from({ length: h * d }, () => gaussian(rng) * 0.01 * targetNorm), shape: [h, d] };
  }
  const adam = new Adam(init, o.learningRate);
  const wTargets = targets.map((t) => t.weights);
  const order = tasks.map((_, i) => i);
  const n = B * m;
  const onehotValues = new Float32Array(n * B);
  for (let j = 0; j < B; j++) for (let q = 0; q < m; q++) onehotValues[(j * m + q) * B + j] = 1;
  const onehot = tf.tensor2d(onehotValues, [n, B]);
  try {
    for (let step = 0; step < o.steps; step++) {
      // subjects of this step
      for (let j = 0; j < B; j++) {
        const r = j + Math.floor(rng() * (S - j));
        [order[j], order[r]] = [order[r]!, order[j]!];
      }
      const P = new Float32Array(B * d);
      const Wt = new Float32Array(B * d);
      const X = new Float32Array(n * d);
      for (let j = 0; j < B; j++) {
        const task = tasks[order[j]!]!;
        P.set(drawInput(task, o.shots, rng), j * d);
        Wt.set(wTargets[order[j]!]!, j * d);
        for (let q = 0; q < m; q++) X.set(task.items[Math.floor(rng() * task.items.length)]!, (j * m + q) * d);
      }
      // forward and hand-written gradients (the wasm backend's matMul is slow with transpose flags,
      // so every product is taken on explicitly transposed operands)
      const grads = tf.tidy(() => {
        const v = adam.params;
        const Pt = tf.tensor2d(P, [B, d]);
        const Xt = tf.tensor2d(X, [n, d]);
        let H: T2 | null = null;
        let out = tf.add(tf.matMul(Pt, v.A!), v.b!) as T2;
        if (o.kind === 'mlp') {
          const hidden = tf.relu(tf.add(tf.matMul(Pt, v.U!), v.c!)) as T2;
          H = hidden;
          out = tf.add(out, tf.matMul(hidden, v.V!)) as T2;
        }
        const logits = tf.matMul(Xt, tf.transpose(out)); // n × B
        const G = tf.div(tf.sub(tf.softmax(logits), onehot), n); // dCE/dlogits
        // d/dout of α·mean‖out − W‖² + β·CE
        const dOut = tf.add(tf.mul(tf.sub(out, tf.tensor2d(Wt, [B, d])), (2 * o.alpha) / B), tf.mul(tf.matMul(tf.transpose(G), Xt), o.beta)) as T2;
        const PT = tf.transpose(Pt);
        const g: Record<string, T2> = { A: tf.matMul(PT, dOut), b: tf.sum(dOut, 0, true) };
        if (o.kind === 'mlp' && H) {
          g.V = tf.matMul(tf.transpose(H), dOut);
          const dH = tf.mul(tf.matMul(dOut, tf.transpose(v.V!)), tf.step(H));
          g.U = tf.matMul(PT, dH);
          g.c = tf.sum(dH, 0, true);
        }
        return g;
      });
      adam.update(grads);
    }
    const read = (k: string) => adam.read(k);
    return new WeightRegressor(o.kind, d, o.kind === 'mlp' ? h : 0, { A: read('A')!, b: read('b')!, U: read('U'), c: read('c'), V: read('V') });
  } finally {
    adam.dispose();
    onehot.dispose();
  }
}

/** Adam (Kingma & Ba, ICLR 2015) over named 2-D tensors, with the paper's default β₁ = 0.9, β₂ = 0.999, ε = 1e-8. */
class Adam {
  params: Record<string, T2> = {};
  private m: Record<string, T2> = {};
  private v: Record<string, T2> = {};
  private t = 0;

  constructor(init: Record<string, { values: Float32Array; shape: [number, number] }>, private readonly lr: number) {
    for (const [k, { values, shape }] of Object.entries(init)) {
      this.params[k] = tf.tensor2d(values, shape);
      this.m[k] = tf.zeros(shape);
      this.v[k] = tf.zeros(shape);
    }
  }

  update(grads: Record<string, T2>): void {
    this.t++;
    const b1 = 0.9;
    const b2 = 0.999;
    const lrT = (this.lr * Math.sqrt(1 - b2 ** this.t)) / (1 - b1 ** this.t);
    for (const k of Object.keys(this.params)) {
      const g = grads[k]!;
      const [p, m, v] = tf.tidy(() => {
        const m = tf.add(tf.mul(this.m[k]!, b1), tf.mul(g, 1 - b1));
        const v = tf.add(tf.mul(this.v[k]!, b2), tf.mul(tf.square(g), 1 - b2));
        const p = tf.sub(this.params[k]!, tf.mul(tf.div(m, tf.add(tf.sqrt(v), 1e-8)), lrT));
        return [p, m, v];
      });
      this.params[k]!.dispose();
      this.m[k]!.dispose();
      this.v[k]!.dispose();
      g.dispose();
      this.params[k] = p as T2;
      this.m[k] = m as T2;
      this.v[k] = v as T2;
    }
  }

  read(k: string): Float32Array | undefined {
    const p = this.params[k];
    return p ? (p.dataSync() as Float32Array).slice() : undefined;
  }

  dispose(): void {
    for (const group of [this.params, this.m, this.v]) for (const t of Object.values(group)) t.dispose();
  }
}

/** Trains the weight map of the given kind; `ensemble` = a linear and a residual-MLP regressor sharing their targets. */
export async function trainWeightMap(tasks: readonly RegressorTask[], options: Omit<RegressorOptions, 'kind'> & { kind?: WeightMapKind } = {}): Promise<WeightMap> {
  const kind = options.kind ?? 'ensemble';
  if (kind !== 'ensemble') return trainRegressor(tasks, { ...options, kind });
  await ensureBackend();
  const targets = await manyShotTargets(tasks, options.target);
  const linear = await trainRegressor(tasks, { ...options, kind: 'linear' }, targets);
  const mlp = await trainRegressor(tasks, { ...options, kind: 'mlp' }, targets);
  return new RegressorEnsemble([linear, mlp]);
}

export interface RegressorValidation {
  /** held-out subjects used for the comparison */
  heldOutSubjects: number;
  shots: number;
  episodes: number;
  /** mean one-vs-rest average precision over held-out subjects and episodes */
  prototypeMeanAP: number;
  regressedMeanAP: number;
  /** whether the regressor measured better than the prototype (the product uses it only then) */
  better: boolean;
}

/**
 * Trains T on all subjects and checks it on held-out subjects first: a map trained without a fifth of
 * the subjects is compared with the prototype on those subjects (one-vs-rest AP among all held-out
 * items, `episodes` draws of `shots` examples). The product uses the map only when `better`.
 */
export async function trainWeightMapWithValidation(
  tasks: readonly RegressorTask[],
  options: Omit<RegressorOptions, 'kind'> & { kind?: WeightMapKind; holdOut?: number; validationShots?: number; episodes?: number } = {},
): Promise<{ map: WeightMap; validation: RegressorValidation }> {
  const rng = seededRng((options.seed ?? 1) + 7919);
  const idx = tasks.map((_, i) => i);
  for (let i = idx.length - 1; i > 0; i--) {
    const j = Math.floor(rng() * (i + 1));
    [idx[i], idx[j]] = [idx[j]!, idx[i]!];
  }
  const nHeld = Math.max(2, Math.round(tasks.length * (options.holdOut ?? 0.2)));
  if (tasks.length - nHeld < 2) throw new Error(`validation needs at least ${nHeld + 2} subjects, got ${tasks.length}`);
  const held = idx.slice(0, nHeld).map((i) => tasks[i]!);
  const train = idx.slice(nHeld).map((i) => tasks[i]!);
  const probe = await trainWeightMap(train, options);
  const shots = options.validationShots ?? 5;
  const episodes = options.episodes ?? 5;
  let protoSum = 0;
  let regSum = 0;
  let count = 0;
  const items = held.flatMap((t, s) => t.items.map((x) => ({ x, s })));
  for (let e = 0; e < episodes; e++) {
    held.forEach((t, s) => {
      const p = drawInput(t, [shots], rng);
      const w = probe.apply(p);
      const labels = items.map((it) => (it.s === s ? 1 : 0));
      protoSum += averagePrecision(labels, items.map((it) => dot(p, it.x)));
      regSum += averagePrecision(labels, items.map((it) => dot(w, it.x)));
      count++;
    });
  }
  const map = await trainWeightMap(tasks, options);
  const validation: RegressorValidation = {
    heldOutSubjects: nHeld,
    shots,
    episodes,
    prototypeMeanAP: protoSum / count,
    regressedMeanAP: regSum / count,
    better: regSum > protoSum,
  };
  return { map, validation };
}

/** A subject taking part in a held-out comparison: its training inputs, plus what its AP is measured on. */
export interface HeldOutTask extends RegressorTask {
  /** ids of `items` (same order), so an item confirmed for two subjects counts as positive for both */
  itemIds?: readonly number[];
  /** prepared features of items rejected for this subject: extra negatives when it is held out */
  rejected?: readonly Float32Array[];
}

export interface HeldOutSubjectResult {
  /** index of the task in the input */
  task: number;
  baselineAP: number;
  mapAP: number;
}

export interface HeldOutComparison {
  folds: number;
  subjects: number;
  /** mean AP of the few-shot weights as they are (prototype, or the source model re-centred) */
  baselineMeanAP: number;
  /** mean AP of the map's output, the map trained without the held-out subject */
  mapMeanAP: number;
  perSubject: HeldOutSubjectResult[];
  /** the map measured strictly better on average */
  better: boolean;
}

/** The few-shot weights a held-out task is judged from: its fixed input, else the prototype of all its examples. */
function fewShotWeights(task: RegressorTask): Float32Array {
  if (task.inputs && task.inputs.length > 0) return normalise(task.inputs[0]!);
  return prototypeWeights(task.examples);
}

/**
 * Measures a map against the weights it would replace on subjects it was not trained on: the subjects are
 * split into `folds` (leave-one-subject-out when there are no more subjects than folds); for each fold a map
 * is trained on the other subjects, and every held-out subject is scored both ways over the reviewed items
 * (every task's confirmed items plus the subject's rejected ones), one-vs-rest average precision with the
 * subject's own confirmed items as positives.
 */
export async function compareOnHeldOutSubjects(
  tasks: readonly HeldOutTask[],
  train: (tasks: readonly RegressorTask[]) => Promise<WeightMap>,
  options: { folds?: number; seed?: number } = {},
): Promise<HeldOutComparison> {
  if (tasks.length < 3) throw new Error(`a held-out comparison needs at least 3 subjects, got ${tasks.length}`);
  const folds = Math.min(tasks.length, Math.max(2, options.folds ?? 5));
  const rng = seededRng((options.seed ?? 1) + 104729);
  const order = tasks.map((_, i) => i);
  for (let i = order.length - 1; i > 0; i--) {
    const j = Math.floor(rng() * (i + 1));
    [order[i], order[j]] = [order[j]!, order[i]!];
  }
  // the pool of reviewed items: each distinct item once, with the set of subjects it is confirmed for
  const pool: Array<{ x: Float32Array; subjects: Set<number> }> = [];
  const byId = new Map<number, number>();
  tasks.forEach((t, s) =>
    t.items.forEach((x, q) => {
      const id = t.itemIds?.[q];
      const at = id !== undefined ? byId.get(id) : undefined;
      if (at !== undefined) pool[at]!.subjects.add(s);
      else {
        if (id !== undefined) byId.set(id, pool.length);
        pool.push({ x, subjects: new Set([s]) });
      }
    }),
  );
  const perSubject: HeldOutSubjectResult[] = [];
  for (let f = 0; f < folds; f++) {
    const held = order.filter((_, i) => i % folds === f);
    const heldSet = new Set(held);
    const map = await train(tasks.filter((_, i) => !heldSet.has(i)));
    for (const s of held) {
      const t = tasks[s]!;
      const few = fewShotWeights(t);
      const mapped = map.apply(few);
      const items = [...pool.map((p) => ({ x: p.x, label: p.subjects.has(s) ? 1 : 0 })), ...(t.rejected ?? []).map((x) => ({ x, label: 0 }))];
      const labels = items.map((it) => it.label);
      perSubject.push({
        task: s,
        baselineAP: averagePrecision(labels, items.map((it) => dot(few, it.x))),
        mapAP: averagePrecision(labels, items.map((it) => dot(mapped, it.x))),
      });
    }
  }
  perSubject.sort((a, b) => a.task - b.task);
  const mean = (k: 'baselineAP' | 'mapAP') => perSubject.reduce((acc, r) => acc + r[k], 0) / perSubject.length;
  const baselineMeanAP = mean('baselineAP');
  const mapMeanAP = mean('mapAP');
  return { folds, subjects: tasks.length, baselineMeanAP, mapMeanAP, perSubject, better: mapMeanAP > baselineMeanAP };
}
