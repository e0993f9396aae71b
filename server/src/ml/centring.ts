/**
 * Centring and normalisation of stored features.
 *
 * Stored embeddings are the raw pooled backbone outputs. A collection keeps two running means: one over
 * its scans (the photo side) and one over its examples (the drawing side). Before synthesis or scoring a
 * feature is "prepared": the mean of its side is subtracted, then each pooled block (average pool, max
 * pool) is L2-normalised on its own, and the whole is scaled by 1/√blocks so that a prepared feature has
 * unit length and a dot product between prepared features is their cosine. Because the mean is applied
 * at scoring time, a new scan moves the mean without re-embedding anything.
 */
import { stackRows } from './features.ts';

/** How a feature vector splits into pooled blocks, e.g. [120, 120] for [average pool, max pool]. */
export interface FeatureLayout {
  blocks: readonly number[];
}

export function layoutDimension(layout: FeatureLayout): number {
  return layout.blocks.reduce((a, b) => a + b, 0);
}

/** A single block covering the whole vector (for embedders that pool once). */
export function singleBlock(dimension: number): FeatureLayout {
  return { blocks: [dimension] };
}

export interface RunningMeanJSON {
  count: number;
  mean: number[];
}

/** A running mean of feature vectors that supports adding and removing members and merging. */
export class RunningMean {
  private readonly sum: Float64Array;
  private n = 0;

  constructor(readonly dimension: number) {
    this.sum = new Float64Array(dimension);
  }

  static of(vectors: readonly Float32Array[], dimension = vectors[0]?.length ?? 0): RunningMean {
    const m = new RunningMean(dimension);
    for (const v of vectors) m.add(v);
    return m;
  }

  /** Adds every row of a row-major matrix. */
  static ofMatrix(matrix: Float32Array, dimension: number): RunningMean {
    const m = new RunningMean(dimension);
    const rows = matrix.length / dimension;
    for (let r = 0; r < rows; r++) {
      const off = r * dimension;
      for (let i = 0; i < dimension; i++) m.sum[i]! += matrix[off + i]!;
    }
    m.n = rows;
    return m;
  }

  get count(): number {
    return this.n;
  }

  add(v: Float32Array): this {
    this.check(v);
    for (let i = 0; i < v.length; i++) this.sum[i]! += v[i]!;
    this.n++;
    return this;
  }

  /** Removes a vector that was added before (a deleted scan or example). */
  remove(v: Float32Array): this {
    this.check(v);
    if (this.n === 0) throw new Error('cannot remove from an empty mean');
    for (let i = 0; i < v.length; i++) this.sum[i]! -= v[i]!;
    this.n--;
    if (this.n === 0) this.sum.fill(0);
    return this;
  }

  merge(other: RunningMean): this {
    if (other.dimension !== this.dimension) throw new Error(`dimension mismatch: ${other.dimension} vs ${this.dimension}`);
    for (let i = 0; i < this.dimension; i++) this.sum[i]! += other.sum[i]!;
    this.n += other.n;
    return this;
  }

  mean(): Float32Array {
    if (this.n === 0) throw new Error('the mean of no features is undefined');
    return Float32Array.from(this.sum, (s) => s / this.n);
  }

  toJSON(): RunningMeanJSON {
    return { count: this.n, mean: this.n === 0 ? Array.from(this.sum) : Array.from(this.sum, (s) => s / this.n) };
  }

  static fromJSON(json: RunningMeanJSON): RunningMean {
    const m = new RunningMean(json.mean.length);
    m.n = json.count;
    json.mean.forEach((x, i) => (m.sum[i] = x * json.count));
    return m;
  }

  private check(v: Float32Array): void {
    if (v.length !== this.dimension) throw new Error(`expected ${this.dimension} values, got ${v.length}`);
  }
}

/** The two means a collection keeps, and how many subjects have examples (for the fallback rule). */
export interface CollectionCentres {
  scans: RunningMean;
  examples: RunningMean;
  /** subjects of the collection that have at least one example */
  subjectsWithExamples: number;
}

/** Below this many subjects with examples the example mean is too narrow; use the scan mean instead. */
export const MIN_SUBJECTS_FOR_EXAMPLE_MEAN = 5;

/**
 * The centre to subtract from example features: the mean of all the collection's example features, or the
 * scan mean when fewer than about five subjects have examples (a handful of subjects' drawings would pull
 * the mean toward themselves and centring would erase what they share).
 */
export function exampleCentre(c: CollectionCentres, minSubjects = MIN_SUBJECTS_FOR_EXAMPLE_MEAN): Float32Array {
  if (c.examples.count > 0 && c.subjectsWithExamples >= minSubjects) return c.examples.mean();
  return c.scans.mean();
}

export function scanCentre(c: CollectionCentres): Float32Array {
  return c.scans.mean();
}

function prepareInto(raw: Float32Array, rawOffset: number, centre: Float32Array | null, layout: FeatureLayout, out: Float32Array, outOffset: number): void {
  const nBlocks = layout.blocks.length;
  const overall = 1 / Math.sqrt(nBlocks);
  let start = 0;
  for (const size of layout.blocks) {
    let ss = 0;
    for (let i = start; i < start + size; i++) {
      const v = raw[rawOffset + i]! - (centre ? centre[i]! : 0);
      out[outOffset + i] = v;
      ss += v * v;
    }
    const k = ss > 0 ? overall / Math.sqrt(ss) : 0;
    for (let i = start; i < start + size; i++) out[outOffset + i]! *= k;
    start += size;
  }
}

/**
 * Prepares one raw feature: subtracts `centre` (pass null to skip centring), L2-normalises each block, and
 * scales by 1/√blocks so the result has unit length.
 */
export function prepareFeature(raw: Float32Array, centre: Float32Array | null, layout: FeatureLayout): Float32Array {
  const d = layoutDimension(layout);
  if (raw.length !== d) throw new Error(`feature has ${raw.length} values, the layout ${d}`);
  if (centre && centre.length !== d) throw new Error(`centre has ${centre.length} values, the layout ${d}`);
  const out = new Float32Array(d);
  prepareInto(raw, 0, centre, layout, out, 0);
  return out;
}

export function prepareFeatures(raw: readonly Float32Array[], centre: Float32Array | null, layout: FeatureLayout): Float32Array[] {
  return raw.map((r) => prepareFeature(r, centre, layout));
}

/** Prepares a row-major matrix of raw features (rows × dimension) into a new matrix. */
export function prepareMatrix(raw: Float32Array | readonly Float32Array[], centre: Float32Array | null, layout: FeatureLayout): Float32Array {
  const d = layoutDimension(layout);
  const matrix = raw instanceof Float32Array ? raw : stackRows(raw, d);
  if (matrix.length % d !== 0) throw new Error(`matrix length ${matrix.length} is not a multiple of ${d}`);
  if (centre && centre.length !== d) throw new Error(`centre has ${centre.length} values, the layout ${d}`);
  const out = new Float32Array(matrix.length);
  for (let off = 0; off < matrix.length; off += d) prepareInto(matrix, off, centre, layout, out, off);
  return out;
}
