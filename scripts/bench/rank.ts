/**
 * Ranking benchmark: `npx tsx scripts/bench/rank.ts [--items 100000] [--dimension 240] [--repeats 20]`
 *
 * Brute-force cosine ranking of a subject model over a matrix of stored features, as the ranked
 * preview and the night shift do it: prepare (centre + normalise) the matrix once, then score every row
 * and keep the top N with z ≥ 2. Random features, so it runs anywhere.
 */
import { parseArgs } from 'node:util';
import { prepareMatrix, RunningMean } from '../../server/src/ml/centring.ts';
import { normalise } from '../../server/src/ml/features.ts';
import { gaussian, seededRng } from '../../server/src/ml/random.ts';
import { rankItems, scoreAll, scoreMany } from '../../server/src/ml/ranking.ts';

const { values } = parseArgs({ options: { items: { type: 'string', default: '100000' }, dimension: { type: 'string', default: '240' }, repeats: { type: 'string', default: '20' } } });
const N = Number(values.items);
const d = Number(values.dimension);
const R = Number(values.repeats);
const rng = seededRng(1);

const raw = new Float32Array(N * d);
for (let i = 0; i < raw.length; i++) raw[i] = Math.abs(gaussian(rng)) * 3; // non-negative like pooled activations
const layout = { blocks: d % 2 === 0 ? [d / 2, d / 2] : [d] };
const models = Array.from({ length: 25 }, () => ({ weights: normalise(Float32Array.from({ length: d }, () => gaussian(rng))), bias: 0 }));

function time(fn: () => void, repeats: number): { median: number; max: number } {
  fn();
  const t: number[] = [];
  for (let r = 0; r < repeats; r++) {
    const s = performance.now();
    fn();
    t.push(performance.now() - s);
  }
  t.sort((a, b) => a - b);
  return { median: t[Math.floor(t.length / 2)]!, max: t[t.length - 1]! };
}

const rows: [string, string, string][] = [];
let matrix: Float32Array = new Float32Array(0);
const mean = RunningMean.ofMatrix(raw, d).mean();
let r = time(() => void (matrix = prepareMatrix(raw, mean, layout)), Math.min(R, 5));
rows.push([`prepare matrix (centre + normalise blocks), once per collection change`, r.median.toFixed(1), r.max.toFixed(1)]);
r = time(() => void scoreAll(matrix, d, models[0]!), R);
rows.push([`score all rows, one subject`, r.median.toFixed(1), r.max.toFixed(1)]);
r = time(() => void rankItems(matrix, d, models[0]!, { topN: 50, minZ: 2 }), R);
rows.push([`ranked list: score + top 50 with z ≥ 2, one subject`, r.median.toFixed(1), r.max.toFixed(1)]);
const candidates = Array.from({ length: Math.floor(N / 10) }, (_, i) => i * 10);
r = time(() => void rankItems(matrix, d, models[0]!, { topN: 50, candidates }), R);
rows.push([`ranked list among ${candidates.length} candidates (narrower subject)`, r.median.toFixed(1), r.max.toFixed(1)]);
r = time(() => void scoreMany(matrix, d, models), Math.min(R, 5));
rows.push([`score all rows, ${models.length} subjects (night shift)`, r.median.toFixed(1), r.max.toFixed(1)]);

console.log(`bench:rank — ${N} items × ${d} floats (${((N * d * 4) / 2 ** 20).toFixed(0)} MiB matrix), median and max of ${R} runs`);
const header: [string, string, string] = ['operation', 'median ms', 'max ms'];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((x) => x[i]!.length)));
const line = (x: string[]) => '| ' + x.map((c, i) => c.padEnd(widths[i]!)).join(' | ') + ' |';
console.log(line(header));
console.log('|' + widths.map((w) => '-'.repeat(w + 2)).join('|') + '|');
for (const x of rows) console.log(line(x));
console.log(`peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
