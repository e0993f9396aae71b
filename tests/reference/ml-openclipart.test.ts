/**
 * External check on open data: Debian's `openclipart-png` (public-domain clip art from the Open Clip Art
 * Library, measured with package version 1:0.18+dfsg-19), installed under /usr/share/openclipart/png
 * by the test bootstrap. Five of its folders become five subjects; five clip-art images per folder are
 * the examples, six others per folder are the collection's scans. Prototype models (weight imprinting,
 * centred) must rank each folder's held-out clip art well above chance.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createEmbedder, type Embedder } from '../../server/src/ml/backbone/embedder.ts';
import { prepareFeature, RunningMean } from '../../server/src/ml/centring.ts';
import { dot } from '../../server/src/ml/features.ts';
import { accuracy, averagePrecision } from '../../server/src/ml/metrics.ts';
import { seededRng, shuffled } from '../../server/src/ml/random.ts';
import { prototypeWeights } from '../../server/src/ml/synthesis/prototype.ts';

const ROOT = '/usr/share/openclipart/png';
const FOLDERS = ['food/fruit', 'transportation/vehicles', 'recreation/music', 'signs_and_symbols/flags', 'plants/flowers'];
const EXAMPLES = 5;
const HELD_OUT = 6;

let embedder: Embedder;
const examples: Float32Array[][] = [];
const scans: { feature: Float32Array; subject: number }[] = [];

beforeAll(async () => {
  if (!existsSync(ROOT)) {
    throw new Error(`${ROOT} is missing: install the Debian package openclipart-png (apt-get install openclipart-png; the test bootstrap does this on CI)`);
  }
  embedder = await createEmbedder();
  for (const [subject, folder] of FOLDERS.entries()) {
    const files = shuffled(readdirSync(join(ROOT, folder)).filter((f) => f.endsWith('.png')).sort(), seededRng(1)).slice(0, EXAMPLES + HELD_OUT);
    if (files.length < EXAMPLES + HELD_OUT) throw new Error(`${join(ROOT, folder)} holds only ${files.length} PNG files`);
    const features = await embedder.embed(files.map((f) => readFileSync(join(ROOT, folder, f))));
    examples.push(features.slice(0, EXAMPLES));
    for (const feature of features.slice(EXAMPLES)) scans.push({ feature, subject });
  }
}, 120_000);

afterAll(() => embedder?.dispose());

describe('5-shot prototype models over openclipart-png folders', () => {
  it('rank held-out clip art of the right folder well above chance', () => {
    // centring as the product does it: examples by the examples' mean (five subjects), scans by the scans' mean
    const exMean = RunningMean.of(examples.flat()).mean();
    const scanMean = RunningMean.of(scans.map((s) => s.feature)).mean();
    const models = examples.map((xs) => prototypeWeights(xs.map((x) => prepareFeature(x, exMean, embedder.layout))));
    const prepared = scans.map((s) => prepareFeature(s.feature, scanMean, embedder.layout));

    const aps = models.map((w, s) => averagePrecision(scans.map((x) => (x.subject === s ? 1 : 0)), prepared.map((x) => dot(w, x))));
    const meanAP = aps.reduce((a, b) => a + b, 0) / aps.length;
    const predicted = prepared.map((x) => models.map((w) => dot(w, x)).reduce((best, v, s, all) => (v > all[best]! ? s : best), 0));
    const acc = accuracy(scans.map((x) => x.subject), predicted);

    // Chance: AP of a random ranking ≈ the prevalence 6/30 = 0.2; 5-way accuracy 0.2.
    // Measured here (seed 1): mean AP 0.651 (per folder 0.70 0.56 0.38 0.85 0.77), accuracy 0.567 (17/30).
    // Asserted a bit below what was measured:
    expect(meanAP).toBeGreaterThan(0.55);
    expect(acc).toBeGreaterThan(0.45);
    // every folder's ranking beats chance on its own
    for (const ap of aps) expect(ap).toBeGreaterThan(0.3);
  });
});
