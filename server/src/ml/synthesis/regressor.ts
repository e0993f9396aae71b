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
 * Two forms: linear (T(p) = pA + b) and a one-hidden-layer residual MLP (T(p) = pA + b + relu(pU + c)V).
 * Applying T needs no TF.js (a few thousand multiply-adds in plain TypeScript).
 */
import { createHash } from 'node:crypto';
import { ensureBackend, tf } from '../backbone/tfjs-runtime.ts';
import { dot, stackRows } from '../features.ts';
import { vecMat } from '../linalg.ts';
import type { LinearModel } from '../model.ts';
import { gaussian, seededRng, type Rng } from '../random.ts';
import { averagePrecision } from '../metrics.ts';
import { fitLogisticMany, type LogisticOptions } from './logistic.ts';
import { prototypeWeights } from './prototype.ts';

export type RegressorKind = 'linear' | 'mlp';

/** One training subject: where its few-shot input comes from, and its confirmed items. */
export interface RegressorTask {
  /** prepared example features; few-shot prototypes are drawn from k of them */
  examples: readonly Float32Array[];
  /** prepared features of the subject's confirmed items (at least a few; ≥ 10 is the product rule) */
  items: readonly Float32Array[];
  /**
   * fixed inputs instead of drawn prototypes (used when carrying models across collections: the
   * source collection's model weights); one is picked at random each step
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
  steps: 1200,
  learningRate: 1e-3,
  shots: [1, 2, 3, 5, 8, 10] as readonly number[],
  itemsPerSubject: 8,
  subjectsPerStep: 128,
  hidden: 256,
  seed: 1,
};

/** The minimum the product asks before a subject can teach T. */
export const MIN_CONFIRMED_FOR_REGRESSOR = 10;

interface Params {
  A: Float32Array; // d × d
  b: Float32Array; // d
  U?: Float32Array; // d × h
  c?: Float32Array; // h
  V?: Float32Array; // h × d
}

export class WeightRegressor {
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

  /** Regressed model for a subject: T(prototype of its examples). */
  model(examples: readonly Float32Array[]): LinearModel {
    return { weights: this.apply(prototypeWeights(examples)), bias: 0 };
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

function drawInput(task: RegressorTask, shots: readonly number[], rng: Rng): Float32Array {
  if (task.inputs && task.inputs.length > 0) return task.inputs[Math.floor(rng() * task.inputs.length)]!;
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
export async function trainRegressor(tasks: readonly RegressorTask[], options: RegressorOptions = {}): Promise<WeightRegressor> {
  const o = { ...REGRESSOR_DEFAULTS, ...options };
  if (tasks.length < 2) throw new Error('a regressor needs at least two training subjects');
  for (const [i, t] of tasks.entries()) {
    if (t.items.length === 0) throw new Error(`training subject ${i} has no confirmed items`);
    if ((t.inputs?.length ?? 0) === 0 && t.examples.length === 0) throw new Error(`training subject ${i} has no examples`);
  }
  await ensureBackend();
  const d = tasks[0]!.items[0]!.length;
  const targets = await manyShotTargets(tasks, options.target);
  const targetNorm = targets.reduce((s, m) => s + Math.hypot(...m.weights), 0) / targets.length;
  const rng = seededRng(o.seed);
  const S = tasks.length;
  const B = Math.min(S, o.subjectsPerStep);
  const m = o.itemsPerSubject;
  const h = o.hidden;

  // parameters: A starts as (mean target norm)·I, so T begins as a rescaled prototype
  const A0 = new Float32Array(d * d);
  for (let i = 0; i < d; i++) A0[i * d + i] = targetNorm;
  const vars: Record<string, ReturnType<typeof tf.variable>> = {
    A: tf.variable(tf.tensor2d(A0, [d, d])),
    b: tf.variable(tf.zeros([d])),
  };
  if (o.kind === 'mlp') {
    vars.U = tf.variable(tf.tensor2d(Float32Array.from({ length: d * h }, () => gaussian(rng) * Math.sqrt(2 / d)), [d, h]));
    vars.c = tf.variable(tf.zeros([h]));
    vars.V = tf.variable(tf.tensor2d(Float32Array.from({ length: h * d }, () => gaussian(rng) * 0.01 * targetNorm), [h, d]));
  }
  const optimizer = tf.train.adam(o.learningRate);
  const wTargets = targets.map((t) => t.weights);
  const order = tasks.map((_, i) => i);
  try {
    for (let step = 0; step < o.steps; step++) {
      // subjects of this step
      for (let j = 0; j < B; j++) {
        const r = j + Math.floor(rng() * (S - j));
        [order[j], order[r]] = [order[r]!, order[j]!];
      }
      const batch = order.slice(0, B);
      const P = new Float32Array(B * d);
      const Wt = new Float32Array(B * d);
      const X = new Float32Array(B * m * d);
      const labels = new Int32Array(B * m);
      batch.forEach((s, j) => {
        const task = tasks[s]!;
        P.set(drawInput(task, o.shots, rng), j * d);
        Wt.set(wTargets[s]!, j * d);
        for (let q = 0; q < m; q++) {
          X.set(task.items[Math.floor(rng() * task.items.length)]!, (j * m + q) * d);
          labels[j * m + q] = j;
        }
      });
      const lossT = optimizer.minimize(() => {
        const Pt = tf.tensor2d(P, [B, d]);
        let out = tf.add(tf.matMul(Pt, vars.A!), vars.b!);
        if (o.kind === 'mlp') out = tf.add(out, tf.matMul(tf.relu(tf.add(tf.matMul(Pt, vars.U!), vars.c!)), vars.V!));
        const reg = tf.mean(tf.sum(tf.square(tf.sub(out, tf.tensor2d(Wt, [B, d]))), 1));
        const logits = tf.matMul(tf.tensor2d(X, [B * m, d]), out, false, true);
        const ce = tf.losses.softmaxCrossEntropy(tf.oneHot(tf.tensor1d(labels, 'int32'), B), logits);
        return tf.add(tf.mul(o.alpha, reg), tf.mul(o.beta, ce)) as ReturnType<typeof tf.scalar>;
      }, false);
      lossT?.dispose();
    }
    const read = (k: string) => (vars[k] ? (vars[k].dataSync() as Float32Array).slice() : undefined);
    return new WeightRegressor(o.kind, d, o.kind === 'mlp' ? h : 0, { A: read('A')!, b: read('b')!, U: read('U'), c: read('c'), V: read('V') });
  } finally {
    for (const v of Object.values(vars)) v.dispose();
    optimizer.dispose();
  }
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
 * Trains T on all subjects and checks it on held-out subjects first: a regressor trained without a fifth
 * of the subjects is compared with the prototype on those subjects (one-vs-rest AP among all held-out
 * items, `episodes` draws of `shots` examples). The product uses the regressor only when `better`.
 */
export async function trainRegressorWithValidation(
  tasks: readonly RegressorTask[],
  options: RegressorOptions & { holdOut?: number; validationShots?: number; episodes?: number } = {},
): Promise<{ regressor: WeightRegressor; validation: RegressorValidation }> {
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
  const probe = await trainRegressor(train, options);
  const shots = options.validationShots ?? 5;
  const episodes = options.episodes ?? 5;
  let protoSum = 0;
  let regSum = 0;
  let count = 0;
  const items = held.flatMap((t, s) => t.items.map((x) => ({ x, s })));
  for (let e = 0; e < episodes; e++) {
    held.forEach((t, s) => {
      const p = drawInput({ examples: t.examples, items: t.items, inputs: t.inputs }, [shots], rng);
      const w = probe.apply(p);
      const labels = items.map((it) => (it.s === s ? 1 : 0));
      protoSum += averagePrecision(labels, items.map((it) => dot(p, it.x)));
      regSum += averagePrecision(labels, items.map((it) => dot(w, it.x)));
      count++;
    });
  }
  const regressor = await trainRegressor(tasks, options);
  const validation: RegressorValidation = {
    heldOutSubjects: nHeld,
    shots,
    episodes,
    prototypeMeanAP: protoSum / count,
    regressedMeanAP: regSum / count,
    better: regSum > protoSum,
  };
  return { regressor, validation };
}

