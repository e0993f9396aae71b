/**
 * Feature vectors: float32 arrays, their BLOB encoding (little-endian, as the `embeddings.vector` and
 * `subject_models.weights` columns store them), and the small vector algebra the synthesis methods share.
 */

/** Encodes a float32 vector as little-endian bytes (4 bytes per value), whatever the host's byte order. */
export function featureToBuffer(vector: Float32Array): Buffer {
  const out = Buffer.allocUnsafe(vector.length * 4);
  for (let i = 0; i < vector.length; i++) out.writeFloatLE(vector[i]!, i * 4);
  return out;
}

/**
 * Decodes little-endian float32 bytes. Copies, so the result is aligned and independent of the buffer
 * (a driver may hand out a slice of a larger, unaligned pool). Checks the length against `dimension`
 * when given.
 */
export function featureFromBuffer(bytes: Buffer | Uint8Array, dimension?: number): Float32Array {
  if (bytes.byteLength % 4 !== 0) throw new Error(`a float32 vector needs a multiple of 4 bytes, got ${bytes.byteLength}`);
  const n = bytes.byteLength / 4;
  if (dimension !== undefined && n !== dimension) throw new Error(`expected ${dimension} floats, the BLOB holds ${n}`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) out[i] = view.getFloat32(i * 4, true);
  return out;
}

/** Stacks vectors of one dimension into a row-major matrix (rows × dimension). */
export function stackRows(rows: readonly Float32Array[], dimension?: number): Float32Array {
  const d = dimension ?? rows[0]?.length ?? 0;
  const out = new Float32Array(rows.length * d);
  rows.forEach((r, i) => {
    if (r.length !== d) throw new Error(`row ${i} has ${r.length} values, expected ${d}`);
    out.set(r, i * d);
  });
  return out;
}

/** Views row `i` of a row-major matrix without copying. */
export function rowOf(matrix: Float32Array, dimension: number, i: number): Float32Array {
  return matrix.subarray(i * dimension, (i + 1) * dimension);
}

export function dot(a: Float32Array, b: Float32Array): number {
  if (a.length !== b.length) throw new Error(`dimension mismatch: ${a.length} vs ${b.length}`);
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! * b[i]!;
  return s;
}

export function norm(a: Float32Array): number {
  return Math.sqrt(dot(a, a));
}

/** Returns a / ‖a‖ (a zero vector stays zero). */
export function normalise(a: Float32Array): Float32Array {
  const n = norm(a);
  const out = new Float32Array(a.length);
  if (n > 0) for (let i = 0; i < a.length; i++) out[i] = a[i]! / n;
  return out;
}

/** Element-wise mean of vectors of one dimension. */
export function meanOf(vectors: readonly Float32Array[]): Float32Array {
  const first = vectors[0];
  if (!first) throw new Error('the mean of no vectors is undefined');
  const acc = new Float64Array(first.length);
  for (const v of vectors) {
    if (v.length !== first.length) throw new Error(`dimension mismatch: ${v.length} vs ${first.length}`);
    for (let i = 0; i < v.length; i++) acc[i]! += v[i]!;
  }
  return Float32Array.from(acc, (x) => x / vectors.length);
}

/** a + s·b as a new vector. */
export function addScaled(a: Float32Array, b: Float32Array, s: number): Float32Array {
  if (a.length !== b.length) throw new Error(`dimension mismatch: ${a.length} vs ${b.length}`);
  const out = new Float32Array(a.length);
  for (let i = 0; i < a.length; i++) out[i] = a[i]! + s * b[i]!;
  return out;
}

export function scale(a: Float32Array, s: number): Float32Array {
  return Float32Array.from(a, (x) => x * s);
}

export function cosine(a: Float32Array, b: Float32Array): number {
  const d = norm(a) * norm(b);
  return d > 0 ? dot(a, b) / d : 0;
}

/** Checks that every vector has the expected dimension and only finite values. */
export function assertFeatures(vectors: readonly Float32Array[], dimension: number, what = 'feature'): void {
  vectors.forEach((v, i) => {
    if (v.length !== dimension) throw new Error(`${what} ${i} has ${v.length} values, expected ${dimension}`);
    for (let j = 0; j < v.length; j++) if (!Number.isFinite(v[j]!)) throw new Error(`${what} ${i} has a non-finite value at ${j}`);
  });
}
