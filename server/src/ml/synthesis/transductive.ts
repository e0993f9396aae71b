/**
 * Scoped transductive refinement: soft k-means over a set of scans the archivist says is mostly in
 * scope of the given subjects. Each iteration assigns every scan softly to the subjects (softmax of
 * temperature × cosine), moves each subject's direction to the weighted mean of its scans and anchors
 * it to the original model: w ← normalise(a·ŵ₀ + (1 − a)·ĉ). Temperature 20, 5 iterations, anchor 0.5
 * measured best; it helps a lot when the scope is right and not at all when most scans are out of scope,
 * so it is opt-in per run.
 */
import { normalise } from '../features.ts';

export interface TransductiveOptions {
  temperature?: number;
  iterations?: number;
  anchor?: number;
}

export const TRANSDUCTIVE_DEFAULTS = { temperature: 20, iterations: 5, anchor: 0.5 };

/**
 * @param models weights of the subjects in scope (any scale; compared by cosine)
 * @param scope prepared features of the scans in scope (unit length), row-major, `dimension` per row
 * @returns refined unit weights, one per model
 */
export function transductiveRefine(models: readonly Float32Array[], scope: Float32Array, dimension: number, options: TransductiveOptions = {}): Float32Array[] {
  const { temperature, iterations, anchor } = { ...TRANSDUCTIVE_DEFAULTS, ...options };
  const S = models.length;
  const N = scope.length / dimension;
  if (S === 0) return [];
  if (!Number.isInteger(N)) throw new Error(`scope length ${scope.length} is not a multiple of ${dimension}`);
  const w0 = models.map(normalise);
  let w: Float32Array[] = w0.map((x) => Float32Array.from(x));
  if (N === 0) return w;
  const logits = new Float64Array(S);
  for (let it = 0; it < iterations; it++) {
    const acc = Array.from({ length: S }, () => new Float64Array(dimension));
    for (let r = 0; r < N; r++) {
      const off = r * dimension;
      let max = -Infinity;
      for (let s = 0; s < S; s++) {
        const ws = w[s]!;
        let c = 0;
        for (let i = 0; i < dimension; i++) c += ws[i]! * scope[off + i]!;
        logits[s] = temperature * c;
        if (logits[s]! > max) max = logits[s]!;
      }
      let z = 0;
      for (let s = 0; s < S; s++) z += (logits[s] = Math.exp(logits[s]! - max));
      for (let s = 0; s < S; s++) {
        const p = logits[s]! / z;
        if (p < 1e-6) continue;
        const a = acc[s]!;
        for (let i = 0; i < dimension; i++) a[i]! += p * scope[off + i]!;
      }
    }
    w = acc.map((a, s) => {
      const c = normalise(Float32Array.from(a));
      const out = new Float32Array(dimension);
      const base = w0[s]!;
      for (let i = 0; i < dimension; i++) out[i] = anchor * base[i]! + (1 - anchor) * c[i]!;
      return normalise(out);
    });
  }
  return w;
}
