/**
 * L2-regularised logistic regression, one-vs-rest for several subjects at once, with class-balanced
 * sample weights. Fitted by Nesterov's accelerated gradient with a fixed step: prepared features have
 * unit length, so with the bias column each row has squared norm 2 and the weighted loss's Hessian is
 * bounded by 0.25·2 = 0.5 (plus the penalty), which makes 1/L a safe step (common practice for smooth
 * convex losses). Runs on TF.js (two matrix products per iteration), deterministic.
 */
import { ensureBackend, tf } from '../backbone/tfjs-runtime.ts';
import type { LinearModel } from '../model.ts';

export interface LogisticOptions {
  /** L2 penalty λ on the weights (not the bias): loss = mean weighted log-loss + λ‖w‖² */
  l2?: number;
  iterations?: number;
  /** weight classes so positives and negatives count equally (default true) */
  balanced?: boolean;
}

export const DEFAULT_L2 = 1e-3;

/**
 * Fits S one-vs-rest models on n samples of dimension d.
 * @param X row-major n × d prepared features
 * @param Y row-major n × S targets in {0, 1}
 */
export async function fitLogisticMany(X: Float32Array, d: number, Y: Float32Array, S: number, options: LogisticOptions = {}): Promise<LinearModel[]> {
  await ensureBackend();
  const n = X.length / d;
  if (!Number.isInteger(n) || n < 2) throw new Error('logistic regression needs at least two samples');
  if (Y.length !== n * S) throw new Error(`targets hold ${Y.length} values, expected ${n}×${S}`);
  const l2 = options.l2 ?? DEFAULT_L2;
  const iterations = options.iterations ?? 400;
  const balanced = options.balanced ?? true;
  // sample weights, scaled so that they sum to n per column
  const Wt = new Float32Array(n * S);
  for (let s = 0; s < S; s++) {
    let pos = 0;
    for (let i = 0; i < n; i++) pos += Y[i * S + s]! > 0.5 ? 1 : 0;
    const neg = n - pos;
    if (pos === 0 || neg === 0) throw new Error(`subject ${s} has ${pos} positives and ${neg} negatives; both are needed`);
    for (let i = 0; i < n; i++) {
      const y = Y[i * S + s]! > 0.5;
      Wt[i * S + s] = balanced ? (y ? n / (2 * pos) : n / (2 * neg)) : 1;
    }
  }
  const L = 0.5 + 2 * l2;
  const step = 1 / L;
  const Xt = tf.tidy(() => tf.concat([tf.tensor2d(X, [n, d]), tf.ones([n, 1])], 1)); // n × (d+1)
  const XtT = Xt.transpose();
  const Yt = tf.tensor2d(Y, [n, S]);
  const Om = tf.tidy(() => tf.tensor2d(Wt, [n, S]).div(n));
  const decay = tf.tidy(() => tf.concat([tf.fill([d, S], 2 * l2), tf.zeros([1, S])], 0)); // no penalty on the bias row
  let w = tf.zeros([d + 1, S]);
  let look = w.clone();
  let t = 1;
  let result: Float32Array;
  try {
    for (let it = 0; it < iterations; it++) {
      const tNew = (1 + Math.sqrt(1 + 4 * t * t)) / 2;
      const momentum = (t - 1) / tNew;
      const [wNew, lookNew] = tf.tidy(() => {
        const P = tf.sigmoid(tf.matMul(Xt, look));
        const G = tf.matMul(XtT, P.sub(Yt).mul(Om)).add(look.mul(decay));
        const wn = look.sub(G.mul(step));
        return [wn, wn.add(wn.sub(w).mul(momentum))];
      });
      w.dispose();
      look.dispose();
      w = wNew!;
      look = lookNew!;
      t = tNew;
    }
    result = w.dataSync() as Float32Array;
  } finally {
    for (const x of [Xt, XtT, Yt, Om, decay, w, look]) x.dispose();
  }
  const models: LinearModel[] = [];
  for (let s = 0; s < S; s++) {
    const weights = new Float32Array(d);
    for (let i = 0; i < d; i++) weights[i] = result[i * S + s]!;
    models.push({ weights, bias: result[d * S + s]! });
  }
  return models;
}

/** One binary model from positive and negative prepared features. */
export async function fitLogistic(positives: readonly Float32Array[], negatives: readonly Float32Array[], options: LogisticOptions = {}): Promise<LinearModel> {
  const d = positives[0]?.length ?? negatives[0]?.length ?? 0;
  const n = positives.length + negatives.length;
  const X = new Float32Array(n * d);
  const Y = new Float32Array(n);
  positives.forEach((p, i) => {
    X.set(p, i * d);
    Y[i] = 1;
  });
  negatives.forEach((q, i) => X.set(q, (positives.length + i) * d));
  const [m] = await fitLogisticMany(X, d, Y, 1, options);
  return m!;
}
