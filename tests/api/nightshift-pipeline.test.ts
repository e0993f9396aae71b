/**
 * Intake and embedding overlapping inside a run: the feeder hands scans to the real embedding pool while
 * intake goes on, keeps the memory bounded, and a hand-over that fails leaves its scans for the embed stage
 * without stopping the rest. And the small embedding input made at intake gives the feature the scan itself
 * gives, closely (it is the thumbnail's pixels, made from the one decode of the scan).
 */
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EmbeddingPool } from '../../jobs/src/embed-pool.ts';
import { cosine } from '../../server/src/ml/index.ts';
import { makeDerivatives } from '../../server/src/services/ingest/derivatives.ts';
import { EmbedFeeder, inLanes } from '../../server/src/services/ingest/pipeline.ts';
import { buildDemoScenario, renderItemImage } from '../../scripts/demo/index.ts';

let pool: EmbeddingPool;
const plates = buildDemoScenario().collections[0]!;
let scans: Buffer[];

beforeAll(async () => {
  pool = await EmbeddingPool.start(2);
  scans = await Promise.all(plates.items.slice(0, 10).map(async (it) => (await renderItemImage(it, plates.medium, { width: 1200 })).data));
}, 120_000);
afterAll(() => pool?.dispose());

describe('the intake → embedding feeder', () => {
  it('embeds every job once while they arrive, with a bounded number waiting', { timeout: 120_000 }, async () => {
    const stored = new Map<number, Float32Array>();
    let pushed = 0;
    let peakWaiting = 0;
    const feeder = new EmbedFeeder<{ id: number; input: Buffer }>(
      pool,
      async (job) => job.input,
      async (batch) => {
        for (const { job, feature } of batch) {
          expect(stored.has(job.id)).toBe(false);
          stored.set(job.id, feature);
        }
      },
      { batch: 1, inFlight: 2, maxQueued: 3 },
    );
    await inLanes(scans, 2, async (bytes, i) => {
      const d = await makeDerivatives(bytes, 1e8, undefined, { embedInput: true });
      await feeder.push({ id: i, input: d.embedInput! });
      pushed++;
      peakWaiting = Math.max(peakWaiting, pushed - stored.size);
    });
    await feeder.finish();
    expect([...stored.keys()].sort((a, b) => a - b)).toEqual(scans.map((_, i) => i));
    // at most maxQueued waiting plus inFlight hand-overs of pool.size × batch jobs each
    expect(peakWaiting).toBeLessThanOrEqual(3 + 2 * pool.size * 1);
  });

  it('a failed hand-over is reported at the end; the other jobs are embedded and stored', { timeout: 120_000 }, async () => {
    const stored: number[] = [];
    const feeder = new EmbedFeeder<{ id: number; input: Buffer }>(pool, async (job) => job.input, async (batch) => void stored.push(...batch.map((b) => b.job.id)), { batch: 1, inFlight: 1 });
    const inputs = await Promise.all(scans.slice(0, 6).map(async (b) => (await makeDerivatives(b, 1e8, undefined, { embedInput: true })).embedInput!));
    for (const [i, input] of inputs.entries()) await feeder.push({ id: i, input: i === 2 ? Buffer.from('not an image at all') : input });
    await expect(feeder.finish()).rejects.toThrow();
    // the hand-over with job 2 (jobs 2 and 3 with two threads) failed; after a failure nothing new is sent
    expect(stored).not.toContain(2);
    expect(stored).toEqual(expect.arrayContaining([0, 1]));
  });

  it('the small input embeds like the scan itself (the thumbnail pixels, losslessly)', { timeout: 120_000 }, async () => {
    const d = await Promise.all(scans.slice(0, 4).map((b) => makeDerivatives(b, 1e8, undefined, { embedInput: true })));
    expect((await sharp(d[0]!.embedInput!).metadata()).format).toBe('png');
    const features = new Map<string, Float32Array>();
    await pool.embedAll(
      [...scans.slice(0, 4).map((b, i) => ({ key: `scan-${i}`, b })), ...d.map((x, i) => ({ key: `small-${i}`, b: x.embedInput! }))],
      async (j) => j.b,
      async (batch) => void batch.forEach(({ job, feature }) => features.set(job.key, feature)),
    );
    for (let i = 0; i < 4; i++) {
      // same picture, two resampling paths (scan → 320 px directly, or scan → review size → thumbnail): measured
      // here 0.991–0.997 on raw (uncentred) features, where two different scans give 0.91–0.93
      expect(cosine(features.get(`scan-${i}`)!, features.get(`small-${i}`)!)).toBeGreaterThan(0.98);
      // and clearly closer to its own scan than to another scan
      expect(cosine(features.get(`scan-${i}`)!, features.get(`small-${i}`)!)).toBeGreaterThan(cosine(features.get(`scan-${(i + 1) % 4}`)!, features.get(`small-${i}`)!));
    }
  });
});
