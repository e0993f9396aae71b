/**
 * Ranking a collection by a subject model: brute-force scoring of a row-major matrix of prepared features
 * (see centring.ts — prepared rows have unit length, so w·x/‖w‖ is the cosine), then the ranked list
 * for review: the top N among the items whose z-score against the collection is at least `minZ`.
 */
import { probabilityOf, scoreStats, zScore, type Calibration, type ScoreStats } from './calibration.ts';
import type { LinearModel } from './model.ts';

/** Scores every row (or only the rows listed in `candidates`): s = w·x + b. */
export function scoreAll(matrix: Float32Array, dimension: number, model: LinearModel, candidates?: ArrayLike<number>): Float32Array {
  const w = model.weights;
  if (w.length !== dimension) throw new Error(`model has ${w.length} weights, features ${dimension}`);
  if (matrix.length % dimension !== 0) throw new Error(`matrix length ${matrix.length} is not a multiple of ${dimension}`);
  const rows = candidates ? candidates.length : matrix.length / dimension;
  const out = new Float32Array(rows);
  const b = model.bias;
  for (let r = 0; r < rows; r++) {
    const off = (candidates ? candidates[r]! : r) * dimension;
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    let i = 0;
    for (; i + 3 < dimension; i += 4) {
      s0 += w[i]! * matrix[off + i]!;
      s1 += w[i + 1]! * matrix[off + i + 1]!;
      s2 += w[i + 2]! * matrix[off + i + 2]!;
      s3 += w[i + 3]! * matrix[off + i + 3]!;
    }
    for (; i < dimension; i++) s0 += w[i]! * matrix[off + i]!;
    out[r] = s0 + s1 + s2 + s3 + b;
  }
  return out;
}

export interface RankOptions {
  /** at most this many items (default 50) */
  topN?: number;
  /** only items at least this many standard deviations above the collection's mean score (default 2) */
  minZ?: number;
  /** score only these rows (e.g. the items carrying the broader subject, for a narrower subject) */
  candidates?: ArrayLike<number>;
  /** rows never listed (items already judged for this subject) */
  exclude?: ReadonlySet<number>;
  /** adds the calibrated probability to each entry */
  calibration?: Calibration;
}

export interface RankedItem {
  /** row in the matrix */
  row: number;
  score: number;
  z: number;
  /** calibrated probability when the calibration supports one, else null */
  probability: number | null;
}

export interface RankedList {
  items: RankedItem[];
  /** distribution of the scores over the scored rows (the z-score reference) */
  stats: ScoreStats;
}

export const DEFAULT_TOP_N = 50;
export const DEFAULT_MIN_Z = 2;

/** Min-heap of (score, row) keeping the n largest. */
class TopN {
  private readonly scores: Float32Array;
  private readonly rows: Int32Array;
  size = 0;
  constructor(private readonly n: number) {
    this.scores = new Float32Array(n);
    this.rows = new Int32Array(n);
  }
  get min(): number {
    return this.size < this.n ? -Infinity : this.scores[0]!;
  }
  push(score: number, row: number): void {
    if (this.n === 0) return;
    if (this.size < this.n) {
      let i = this.size++;
      while (i > 0) {
        const p = (i - 1) >> 1;
        if (this.scores[p]! <= score) break;
        this.scores[i] = this.scores[p]!;
        this.rows[i] = this.rows[p]!;
        i = p;
      }
      this.scores[i] = score;
      this.rows[i] = row;
      return;
    }
    if (score <= this.scores[0]!) return;
    let i = 0;
    for (;;) {
      const l = 2 * i + 1;
      if (l >= this.n) break;
      const r = l + 1;
      const c = r < this.n && this.scores[r]! < this.scores[l]! ? r : l;
      if (this.scores[c]! >= score) break;
      this.scores[i] = this.scores[c]!;
      this.rows[i] = this.rows[c]!;
      i = c;
    }
    this.scores[i] = score;
    this.rows[i] = row;
  }
  sorted(): { score: number; row: number }[] {
    const out: { score: number; row: number }[] = [];
    for (let i = 0; i < this.size; i++) out.push({ score: this.scores[i]!, row: this.rows[i]! });
    return out.sort((a, b) => b.score - a.score || a.row - b.row);
  }
}

/** The ranked list for review: top N by score among items with z ≥ minZ (both configurable). */
export function rankItems(matrix: Float32Array, dimension: number, model: LinearModel, options: RankOptions = {}): RankedList {
  const topN = options.topN ?? DEFAULT_TOP_N;
  const minZ = options.minZ ?? DEFAULT_MIN_Z;
  const scores = scoreAll(matrix, dimension, model, options.candidates);
  const stats = scoreStats(scores);
  const threshold = stats.std > 0 ? stats.mean + minZ * stats.std : -Infinity;
  const heap = new TopN(topN);
  const cand = options.candidates;
  const exclude = options.exclude;
  for (let r = 0; r < scores.length; r++) {
    const s = scores[r]!;
    if (s < threshold || s <= heap.min) continue;
    const row = cand ? cand[r]! : r;
    if (exclude?.has(row)) continue;
    heap.push(s, row);
  }
  const items = heap.sorted().map(({ score, row }) => ({
    row,
    score,
    z: zScore(stats, score),
    probability: options.calibration ? probabilityOf(options.calibration, score) : null,
  }));
  return { items, stats };
}

/** Scores of many models over one matrix: result[s] holds subject s's scores for every row. */
export function scoreMany(matrix: Float32Array, dimension: number, models: readonly LinearModel[], candidates?: ArrayLike<number>): Float32Array[] {
  return models.map((m) => scoreAll(matrix, dimension, m, candidates));
}
