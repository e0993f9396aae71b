/**
 * Embedding benchmark: `npm run bench:embed -- [--images 40] [--workers 2] [--repeat 3]`
 *
 * The built-in backbone on both runtimes — TF.js wasm and the ONNX conversion on onnxruntime-node — on
 * the same images in one run:
 * 1. in-process, one image per call: sharp decode + resize alone, then the whole embed, per image set
 *    (a small JPEG, a drawing PNG with transparency, a 12 MP JPEG scan; plus a sample of the bench
 *    photographs when ../shared/bench/ is present, read there, never copied);
 * 2. through the product's worker pool (`EmbeddingPool`, one embedder per thread) at batch 1 and 8 with
 *    1 … `--workers` threads: aggregate ms/image and the TF.js / ONNX ratio;
 * 3. agreement of the two runtimes on every image: max abs difference, relative L2, lowest cosine.
 * Each timing is the median of `--repeat` passes over the set (the machine may be shared: the median
 * is steadier than one pass). Peak resident memory per phase, and the machine's load average.
 */
import { existsSync, readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import sharp from 'sharp';
import { EmbeddingPool } from '../../jobs/src/embed-pool.ts';
import { logger } from '../../server/src/logger.ts';
import { createEmbedder, defaultEmbedderConfig, embedderStatus, type EmbedderConfig, type EmbedderRuntime } from '../../server/src/ml/backbone/embedder.ts';
import { toSquareRgb } from '../../server/src/ml/backbone/preprocess.ts';
import { agreement } from '../../server/src/ml/onnx/agreement.ts';
import { benchRoot, listImages } from './dataset.ts';

const { values } = parseArgs({ options: { images: { type: 'string', default: '40' }, workers: { type: 'string', default: '2' }, repeat: { type: 'string', default: '3' } } });
const N = Number(values.images);
const MAX_WORKERS = Number(values.workers);
const REPEAT = Math.max(1, Number(values.repeat));

/** Median ms per image of `REPEAT` passes of `pass` over `images` images. */
async function medianMs(images: number, pass: () => Promise<void>): Promise<number> {
  const times: number[] = [];
  for (let r = 0; r < REPEAT; r++) {
    const t = performance.now();
    await pass();
    times.push((performance.now() - t) / images);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)]!;
}
sharp.cache(false); // libvips' operation cache would hold the generated scans and blur the embedder's memory
// the pool logs when it starts; keep the output to the tables (worker threads read the same variable)
process.env.CARTOUCHE_LOG_LEVEL ??= 'warn';
logger.level = process.env.CARTOUCHE_LOG_LEVEL;

const mb = (bytes: number) => `${(bytes / 2 ** 20).toFixed(0)} MB`;
let phasePeak = 0;
const sampleRss = () => (phasePeak = Math.max(phasePeak, process.memoryUsage().rss));
const load = () => loadavg().map((x) => x.toFixed(1)).join(' ');

function svg(w: number, h: number, seed: number): Buffer {
  const shapes = Array.from({ length: 12 }, (_, i) => {
    const x = ((seed * 37 + i * 53) % 90) / 100;
    const y = ((seed * 17 + i * 29) % 90) / 100;
    return `<circle cx="${x * w}" cy="${y * h}" r="${((i % 4) + 1) * w * 0.03}" fill="none" stroke="#${(((seed + i) * 2654435761) >>> 8).toString(16).padStart(6, '0').slice(0, 6)}" stroke-width="${w / 100}"/>`;
  }).join('');
  return Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}"><rect width="100%" height="100%" fill="#f4efe3"/>${shapes}</svg>`);
}

type SetName = 'small JPEG 224 px' | 'drawing PNG 800 px, alpha' | 'scan JPEG 12 MP';
async function makeSet(kind: SetName): Promise<Buffer[]> {
  const out: Buffer[] = [];
  for (let i = 0; i < N; i++) {
    if (kind === 'small JPEG 224 px') out.push(await sharp(svg(224, 224, i)).jpeg({ quality: 85 }).toBuffer());
    else if (kind === 'drawing PNG 800 px, alpha') out.push(await sharp(svg(800, 600, i)).ensureAlpha().png().toBuffer());
    else out.push(await sharp(svg(4000, 3000, i)).jpeg({ quality: 85 }).toBuffer());
  }
  return out;
}

function table(header: string[], rows: string[][]): void {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (r: string[]) => '| ' + r.map((c, i) => c.padEnd(widths[i]!)).join(' | ') + ' |';
  console.log(line(header));
  console.log('|' + widths.map((w) => '-'.repeat(w + 2)).join('|') + '|');
  for (const r of rows) console.log(line(r));
  console.log('');
}

console.log(`bench:embed — ${N} images per set, up to ${MAX_WORKERS} worker threads, median of ${REPEAT} passes; load average at start ${load()}`);
const sets: [string, Buffer[]][] = [];
for (const kind of ['small JPEG 224 px', 'drawing PNG 800 px, alpha', 'scan JPEG 12 MP'] as const) sets.push([kind, await makeSet(kind)]);
const bench = join(benchRoot(), 'sketch-photo-125');
if (existsSync(bench)) {
  const photos = listImages(bench).filter((im) => im.domain === 'photo');
  const pick = Array.from({ length: Math.min(N, photos.length) }, (_, i) => photos[Math.floor((i * photos.length) / N)]!);
  sets.push(['bench photographs (../shared/bench)', pick.map((im) => readFileSync(join(bench, im.path)))]);
}

// ---- 1. in-process, one image per call -----------------------------------------------------------------
const inProcess: string[][] = [];
const features: Record<EmbedderRuntime, Float32Array[][]> = { tfjs: [], onnx: [] };
for (const [kind, images] of sets) {
  phasePeak = 0;
  const ms = await medianMs(images.length, async () => {
    for (const im of images) {
      await toSquareRgb(im, { size: 320 });
      sampleRss();
    }
  });
  inProcess.push(['decode + resize only (sharp)', kind, ms.toFixed(1), '', mb(phasePeak)]);
}
const runtimes: EmbedderRuntime[] = ['tfjs', 'onnx'];
const ids: Record<string, string> = {};
for (const runtime of runtimes) {
  const t0 = performance.now();
  const embedder = await createEmbedder(runtime === 'tfjs' ? defaultEmbedderConfig() : { kind: 'builtin', runtime: 'onnx' });
  const status = embedderStatus(embedder);
  if (status.runtime !== runtime) throw new Error(`asked for ${runtime}, got ${status.runtime}: ${status.fallbackReason}`);
  ids[runtime] = embedder.id;
  console.log(`${runtime}: ${embedder.id}, ready in ${(performance.now() - t0).toFixed(0)} ms${status.verification ? ` (start-up check against TF.js included: relative L2 ${status.verification.relativeL2.toExponential(2)})` : ''}`);
  await embedder.embed([sets[0]![1][0]!]); // warm-up
  for (const [kind, images] of sets) {
    phasePeak = 0;
    let out: Float32Array[] = [];
    const ms = await medianMs(images.length, async () => {
      out = [];
      for (const im of images) {
        out.push((await embedder.embed([im]))[0]!);
        sampleRss();
      }
    });
    features[runtime].push(out);
    inProcess.push([`embed on ${runtime}, one image per call`, kind, ms.toFixed(1), '', mb(phasePeak)]);
  }
  embedder.dispose();
}
for (let k = 0; k < inProcess.length; k++) {
  const r = inProcess[k]!;
  if (!r[0]!.startsWith('embed on onnx')) continue;
  const twin = inProcess.find((x) => x[0]!.startsWith('embed on tfjs') && x[1] === r[1])!;
  r[3] = `${(Number(twin[2]) / Number(r[2])).toFixed(1)}×`;
}
console.log('\n1. In-process (main thread), one image per call');
table(['path', 'images', 'ms/image', 'TF.js / ONNX', 'RSS (max in phase)'], inProcess);

// ---- 2. through the worker pool --------------------------------------------------------------------------
const pooled: string[][] = [];
const poolSets = [sets[0]!, sets[2]!];
const perSet = new Map<string, Map<string, number>>();
for (let workers = 1; workers <= MAX_WORKERS; workers++) {
  for (const runtime of runtimes) {
    const config: EmbedderConfig = runtime === 'tfjs' ? { kind: 'builtin', runtime: 'tfjs' } : { kind: 'builtin', runtime: 'onnx', verify: false };
    const pool = await EmbeddingPool.start(workers, config);
    if (pool.status.runtime !== runtime) throw new Error(`pool asked for ${runtime}, got ${pool.status.runtime}: ${pool.status.fallbackReason}`);
    await pool.embedAll([0, 1], async (i) => sets[0]![1][i]!, async () => undefined, { batch: 1 }); // warm-up every thread
    for (const [kind, images] of poolSets) {
      for (const batch of [1, 8]) {
        phasePeak = 0;
        const timer = setInterval(sampleRss, 20);
        const ms = await medianMs(images.length, async () => {
          await pool.embedAll(
            images.map((_, i) => i),
            async (i) => images[i]!,
            async () => undefined,
            { batch },
          );
        });
        clearInterval(timer);
        sampleRss();
        const key = `${kind}|${workers}|${batch}`;
        if (!perSet.has(key)) perSet.set(key, new Map());
        perSet.get(key)!.set(runtime, ms);
        pooled.push([runtime, kind, String(workers), String(batch), ms.toFixed(1), '', mb(phasePeak)]);
      }
    }
    pool.dispose();
  }
}
for (const r of pooled) {
  if (r[0] !== 'onnx') continue;
  const m = perSet.get(`${r[1]}|${r[2]}|${r[3]}`)!;
  r[5] = `${(m.get('tfjs')! / m.get('onnx')!).toFixed(1)}×`;
}
console.log('2. Worker pool (EmbeddingPool, one embedder per thread), aggregate over the set');
table(['runtime', 'images', 'threads', 'batch', 'ms/image', 'TF.js / ONNX', 'RSS (max in phase)'], pooled);

// ---- 3. agreement -------------------------------------------------------------------------------------------
const agreeRows = sets.map(([kind], k) => {
  const a = agreement(features.onnx[k]!, features.tfjs[k]!);
  return [kind, String(a.images), a.maxAbs.toExponential(2), a.relativeL2.toExponential(2), (1 - a.lowestCosine).toExponential(2)];
});
const all = agreement(features.onnx.flat(), features.tfjs.flat());
agreeRows.push(['all images', String(all.images), all.maxAbs.toExponential(2), all.relativeL2.toExponential(2), (1 - all.lowestCosine).toExponential(2)]);
console.log(`3. Agreement of ${ids.onnx} with ${ids.tfjs} (TF.js is the reference)`);
table(['images', 'n', 'max abs', 'relative L2 (worst image)', '1 − lowest cosine'], agreeRows);

console.log(`peak RSS of the process: ${mb(process.resourceUsage().maxRSS * 1024)} (includes generating the test images); load average at the end ${load()} on a machine that may be shared`);
