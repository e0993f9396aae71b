/** Dense linear algebra the synthesis methods need, in plain TypeScript over Float32Array / Float64Array. */
import { gaussian, seededRng } from './random.ts';

/** Orthonormalises the columns of Q (d × k, column j at Q[j]) in place by modified Gram–Schmidt; returns the rank kept. */
function orthonormalise(cols: Float64Array[]): number {
  let kept = 0;
  for (let j = 0; j < cols.length; j++) {
    const v = cols[j]!;
    for (let i = 0; i < kept; i++) {
      const u = cols[i]!;
      let p = 0;
      for (let t = 0; t < v.length; t++) p += u[t]! * v[t]!;
      for (let t = 0; t < v.length; t++) v[t]! -= p * u[t]!;
    }
    let n = 0;
    for (let t = 0; t < v.length; t++) n += v[t]! * v[t]!;
    n = Math.sqrt(n);
    if (n < 1e-10) continue;
    for (let t = 0; t < v.length; t++) v[t]! /= n;
    cols[kept++] = v;
  }
  cols.length = kept;
  return kept;
}

export interface PrincipalDirections {
  mean: Float32Array;
  /** unit directions, by decreasing variance */
  directions: Float32Array[];
  /** variance along each direction */
  variances: number[];
}

/**
 * Top-k principal directions of a set of vectors (covariance about their mean), by subspace iteration
 * with a seeded start — deterministic for the same input.
 */
export function principalDirections(vectors: readonly Float32Array[], k: number, iterations = 60, seed = 1): PrincipalDirections {
  const n = vectors.length;
  const first = vectors[0];
  if (!first || n < 2) throw new Error('principal directions need at least two vectors');
  const d = first.length;
  const mean = new Float64Array(d);
  for (const v of vectors) for (let i = 0; i < d; i++) mean[i]! += v[i]! / n;
  // covariance C = (1/n) Σ (x−m)(x−m)ᵀ
  const C = new Float64Array(d * d);
  const c = new Float64Array(d);
  for (const v of vectors) {
    for (let i = 0; i < d; i++) c[i] = v[i]! - mean[i]!;
    for (let i = 0; i < d; i++) {
      const ci = c[i]! / n;
      if (ci === 0) continue;
      const row = i * d;
      for (let j = i; j < d; j++) C[row + j]! += ci * c[j]!;
    }
  }
  for (let i = 0; i < d; i++) for (let j = 0; j < i; j++) C[i * d + j] = C[j * d + i]!;
  const kk = Math.min(k, d, n - 1);
  const rng = seededRng(seed);
  let Q: Float64Array[] = Array.from({ length: kk }, () => Float64Array.from({ length: d }, () => gaussian(rng)));
  orthonormalise(Q);
  const mul = (v: Float64Array): Float64Array => {
    const out = new Float64Array(d);
    for (let i = 0; i < d; i++) {
      let s = 0;
      const row = i * d;
      for (let j = 0; j < d; j++) s += C[row + j]! * v[j]!;
      out[i] = s;
    }
    return out;
  };
  for (let it = 0; it < iterations; it++) {
    Q = Q.map(mul);
    orthonormalise(Q);
  }
  // Rayleigh–Ritz: order by variance
  const withVar = Q.map((q) => {
    const cq = mul(q);
    let s = 0;
    for (let t = 0; t < d; t++) s += q[t]! * cq[t]!;
    return { q, v: s };
  });
  withVar.sort((a, b) => b.v - a.v);
  return {
    mean: Float32Array.from(mean),
    directions: withVar.map((x) => Float32Array.from(x.q)),
    variances: withVar.map((x) => x.v),
  };
}

/** Orthogonal projection of w onto the span of orthonormal directions. */
export function projectOnto(w: Float32Array, directions: readonly Float32Array[]): Float32Array {
  const out = new Float32Array(w.length);
  for (const u of directions) {
    let p = 0;
    for (let i = 0; i < w.length; i++) p += u[i]! * w[i]!;
    for (let i = 0; i < w.length; i++) out[i]! += p * u[i]!;
  }
  return out;
}

/** y = x·A + b for a row vector x (length m), A row-major m × n, b length n. */
export function vecMat(x: Float32Array, A: Float32Array, n: number, b?: Float32Array): Float32Array {
  const m = x.length;
  if (A.length !== m * n) throw new Error(`matrix is ${A.length} values, expected ${m}×${n}`);
  const y = b ? Float32Array.from(b) : new Float32Array(n);
  for (let i = 0; i < m; i++) {
    const xi = x[i]!;
    if (xi === 0) continue;
    const row = i * n;
    for (let j = 0; j < n; j++) y[j]! += xi * A[row + j]!;
  }
  return y;
}
