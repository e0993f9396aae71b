/**
 * Calibration of subject-model scores, and the auto-accept rule.
 *
 * - Platt scaling (Platt, "Probabilistic Outputs for Support Vector Machines and Comparisons to
 *   Regularized Likelihood Methods", 1999): p(s) = 1 / (1 + exp(A·s + B)), fitted on held-out decisions
 *   (confirmations = 1, rejections = 0) with Platt's smoothed targets, by the Newton method with
 *   backtracking of Lin, Lin & Weng ("A note on Platt's probabilistic outputs for support vector
 *   machines", Machine Learning 2007).
 * - Without enough decisions: no probability is claimed; the score is reported with its z-score against
 *   the collection's score distribution.
 * - Auto-accept only from a Platt calibration resting on enough confirmations, at p ≥ 0.8.
 */

export interface PlattCalibration {
  kind: 'platt';
  /** p = 1 / (1 + exp(a·score + b)) */
  a: number;
  b: number;
  positives: number;
  negatives: number;
}

export interface ScoreStats {
  mean: number;
  std: number;
  count: number;
}

export interface ZScoreCalibration extends ScoreStats {
  kind: 'zscore';
}

export type Calibration = PlattCalibration | ZScoreCalibration;

/** Decisions needed before Platt scaling replaces the z-score (each side). */
export const MIN_DECISIONS_FOR_PLATT = { positives: 10, negatives: 10 };

function objective(scores: ArrayLike<number>, t: Float64Array, a: number, b: number): number {
  let f = 0;
  for (let i = 0; i < t.length; i++) {
    const z = scores[i]! * a + b;
    f += z >= 0 ? t[i]! * z + Math.log1p(Math.exp(-z)) : (t[i]! - 1) * z + Math.log1p(Math.exp(z));
  }
  return f;
}

/** Fits Platt's sigmoid to scores and binary labels (1 = confirmed, 0 = rejected). */
export function fitPlatt(scores: ArrayLike<number>, labels: readonly number[], options: { maxIterations?: number } = {}): PlattCalibration {
  const n = labels.length;
  if (scores.length !== n) throw new Error(`${scores.length} scores but ${labels.length} labels`);
  const prior1 = labels.filter((y) => y > 0).length;
  const prior0 = n - prior1;
  if (prior1 === 0 || prior0 === 0) throw new Error('Platt scaling needs both confirmations and rejections');
  const hi = (prior1 + 1) / (prior1 + 2);
  const lo = 1 / (prior0 + 2);
  const t = Float64Array.from(labels, (y) => (y > 0 ? hi : lo));
  let a = 0;
  let b = Math.log((prior0 + 1) / (prior1 + 1));
  let f = objective(scores, t, a, b);
  const sigma = 1e-12;
  const minStep = 1e-10;
  for (let it = 0; it < (options.maxIterations ?? 100); it++) {
    let h11 = sigma;
    let h22 = sigma;
    let h21 = 0;
    let g1 = 0;
    let g2 = 0;
    for (let i = 0; i < n; i++) {
      const s = scores[i]!;
      const z = s * a + b;
      let p: number;
      let q: number;
      if (z >= 0) {
        const e = Math.exp(-z);
        p = e / (1 + e);
        q = 1 / (1 + e);
      } else {
        const e = Math.exp(z);
        p = 1 / (1 + e);
        q = e / (1 + e);
      }
      const d2 = p * q;
      h11 += s * s * d2;
      h22 += d2;
      h21 += s * d2;
      const d1 = t[i]! - p;
      g1 += s * d1;
      g2 += d1;
    }
    if (Math.abs(g1) < 1e-5 && Math.abs(g2) < 1e-5) break;
    const det = h11 * h22 - h21 * h21;
    const dA = -(h22 * g1 - h21 * g2) / det;
    const dB = -(-h21 * g1 + h11 * g2) / det;
    const gd = g1 * dA + g2 * dB;
    let step = 1;
    while (step >= minStep) {
      const na = a + step * dA;
      const nb = b + step * dB;
      const nf = objective(scores, t, na, nb);
      if (nf < f + 1e-4 * step * gd) {
        a = na;
        b = nb;
        f = nf;
        break;
      }
      step /= 2;
    }
    if (step < minStep) break;
  }
  return { kind: 'platt', a, b, positives: prior1, negatives: prior0 };
}

export function plattProbability(c: PlattCalibration, score: number): number {
  const z = c.a * score + c.b;
  return z >= 0 ? Math.exp(-z) / (1 + Math.exp(-z)) : 1 / (1 + Math.exp(z));
}

export function scoreStats(scores: ArrayLike<number>): ScoreStats {
  const n = scores.length;
  if (n === 0) return { mean: 0, std: 0, count: 0 };
  let s = 0;
  for (let i = 0; i < n; i++) s += scores[i]!;
  const mean = s / n;
  let v = 0;
  for (let i = 0; i < n; i++) v += (scores[i]! - mean) ** 2;
  return { mean, std: Math.sqrt(v / n), count: n };
}

export function zScore(stats: ScoreStats, score: number): number {
  return stats.std > 0 ? (score - stats.mean) / stats.std : 0;
}

/**
 * The calibration a subject model gets: Platt scaling on held-out decision scores when there are enough
 * confirmations and rejections, otherwise the z-score against the collection's scores.
 */
export function calibrate(
  decisions: { scores: ArrayLike<number>; labels: readonly number[] } | null,
  collectionScores: ScoreStats,
  minimum = MIN_DECISIONS_FOR_PLATT,
): Calibration {
  if (decisions) {
    const pos = decisions.labels.filter((y) => y > 0).length;
    const neg = decisions.labels.length - pos;
    if (pos >= minimum.positives && neg >= minimum.negatives) return fitPlatt(decisions.scores, decisions.labels);
  }
  return { kind: 'zscore', ...collectionScores };
}

/** The calibrated probability, or null when the calibration claims none (z-score fallback). */
export function probabilityOf(c: Calibration, score: number): number | null {
  return c.kind === 'platt' ? plattProbability(c, score) : null;
}

export interface AutoAcceptPolicy {
  minProbability: number;
  /** confirmations (and rejections) the Platt fit must rest on */
  minConfirmations: number;
  minRejections: number;
}

export const DEFAULT_AUTO_ACCEPT: AutoAcceptPolicy = { minProbability: 0.8, minConfirmations: 30, minRejections: 30 };

/** Whether this calibration may auto-accept at all (a Platt fit on enough decisions). */
export function autoAcceptAvailable(c: Calibration, policy: AutoAcceptPolicy = DEFAULT_AUTO_ACCEPT): boolean {
  return c.kind === 'platt' && c.positives >= policy.minConfirmations && c.negatives >= policy.minRejections;
}

/** Whether a suggestion with this score may be accepted without an editor. */
export function autoAccepts(c: Calibration, score: number, policy: AutoAcceptPolicy = DEFAULT_AUTO_ACCEPT): boolean {
  return autoAcceptAvailable(c, policy) && plattProbability(c as PlattCalibration, score) >= policy.minProbability;
}
