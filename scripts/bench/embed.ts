/**
 * Embedding benchmark: `npm run bench:embed -- [--images 40] [--workers 2]`
 *
 * Prints ms per image for the default embedder (decode + resize alone, then the whole embed) on
 * generated images — a small JPEG, a drawing PNG with transparency, a 12 MP JPEG scan — in-process and
 * with worker threads, plus peak resident memory. When ../shared/bench/ is present, also on a sample of
 * its photographs (read there, never copied).
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import sharp from 'sharp';
import { createEmbedder } from '../../server/src/ml/backbone/embedder.ts';
import { toSquareRgb } from '../../server/src/ml/backbone/preprocess.ts';
import { WorkerEmbedder } from '../../server/src/ml/backbone/worker-embedder.ts';
import { benchRoot, listImages } from './dataset.ts';

const { values } = parseArgs({ options: { images: { type: 'string', default: '40' }, workers: { type: 'string', default: '2' } } });
const N = Number(values.images);
sharp.cache(false); // libvips' operation cache would hold the generated scans and blur the embedder's memory
const WORKERS = Number(values.workers);

const mb = (bytes: number) => `${(bytes / 2 ** 20).toFixed(0)} MB`;
/** resident memory of the whole process (worker threads included), sampled between images */
let phasePeak = 0;
const sampleRss = () => (phasePeak = Math.max(phasePeak, process.memoryUsage().rss));

function svg(w: number, h: number, seed: number): Buffer {
  const shapes = Array.from({ length: 12 }, (_, i) => {
    const x = ((seed * 37 + i * 53) % 90) / 100;
    const y = ((seed * 17 + i * 29) % 90) / 100;
    return `<circle cx="${x * w}" cy="${y * h}" r="${((i % 4) + 1) * w * 0.03}" fill="none" stroke="#${(((seed + i) * 2654435761) >>> 8).toString(16).padStart(6, '0').slice(0, 6)}" stroke-width="${w / 100}"/>`;
  }).join('');
  return Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}"><rect width="100%" height="100%" fill="#f4efe3"/>${shapes}</svg>`);
}

async function makeSet(kind: 'small JPEG 224 px' | 'drawing PNG 800 px, alpha' | 'scan JPEG 12 MP'): Promise<Buffer[]> {
  const out: Buffer[] = [];
  for (let i = 0; i < N; i++) {
    if (kind === 'small JPEG 224 px') out.push(await sharp(svg(224, 224, i)).jpeg({ quality: 85 }).toBuffer());
    else if (kind === 'drawing PNG 800 px, alpha') out.push(await sharp(svg(800, 600, i)).ensureAlpha().png().toBuffer());
    else out.push(await sharp(svg(4000, 3000, i)).jpeg({ quality: 85 }).toBuffer());
  }
  return out;
}

const rows: string[][] = [];
function row(what: string, ms: number, images: number, note = ''): void {
  rows.push([what, (ms / images).toFixed(1), String(images), mb(phasePeak), note]);
  phasePeak = 0;
}

const t0 = performance.now();
const embedder = await createEmbedder();
const loadMs = performance.now() - t0;
console.log(`bench:embed — embedder ${embedder.id} (${embedder.dimension} floats), loaded in ${loadMs.toFixed(0)} ms, RSS after loading ${mb(process.memoryUsage().rss)}`);

const sets: [string, Buffer[]][] = [];
for (const kind of ['small JPEG 224 px', 'drawing PNG 800 px, alpha', 'scan JPEG 12 MP'] as const) sets.push([kind, await makeSet(kind)]);
const bench = join(benchRoot(), 'sketch-photo-125');
if (existsSync(bench)) {
  const photos = listImages(bench).filter((im) => im.domain === 'photo');
  const pick = Array.from({ length: Math.min(N, photos.length) }, (_, i) => photos[Math.floor((i * photos.length) / N)]!);
  sets.push(['bench photographs 224 px (../shared/bench)', pick.map((im) => readFileSync(join(bench, im.path)))]);
}

await embedder.embed([sets[0]![1][0]!]); // warm-up
for (const [kind, images] of sets) {
  let t = performance.now();
  phasePeak = 0;
  for (const im of images) {
    await toSquareRgb(im, { size: 320 });
    sampleRss();
  }
  row(`decode + resize only: ${kind}`, performance.now() - t, images.length, 'sharp');
  t = performance.now();
  for (const im of images) {
    await embedder.embed([im]);
    sampleRss();
  }
  row(`embed, one at a time: ${kind}`, performance.now() - t, images.length, '1 thread');
}
{
  const images = sets[0]![1];
  let t = performance.now();
  await embedder.embed(images);
  sampleRss();
  row('embed, one call for all (decode overlaps the backbone)', performance.now() - t, images.length, '1 thread');
  t = performance.now();
  await embedder.embedWithMirror(images);
  sampleRss();
  row('embed with mirror image (examples)', performance.now() - t, images.length, '2 passes/image');
}
embedder.dispose();

if (WORKERS > 0) {
  const workers = await Promise.all(Array.from({ length: WORKERS }, () => WorkerEmbedder.start()));
  const images = sets[0]![1];
  await Promise.all(workers.map((w) => w.embed([images[0]!])));
  const t = performance.now();
  const share = workers.map((_, k) => images.filter((_, i) => i % WORKERS === k));
  const timer = setInterval(sampleRss, 20);
  await Promise.all(workers.map((w, k) => w.embed(share[k]!)));
  clearInterval(timer);
  sampleRss();
  row(`embed, ${WORKERS} worker threads (aggregate)`, performance.now() - t, images.length, `${WORKERS} threads`);
  for (const w of workers) w.dispose();
}

const header = ['path', 'ms/image', 'images', 'RSS (max in phase)', 'note'];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
const line = (r: string[]) => '| ' + r.map((c, i) => c.padEnd(widths[i]!)).join(' | ') + ' |';
console.log(line(header));
console.log('|' + widths.map((w) => '-'.repeat(w + 2)).join('|') + '|');
for (const r of rows) console.log(line(r));
console.log(`peak RSS of the process: ${mb(process.resourceUsage().maxRSS * 1024)} (includes generating the test images; load average ${(await import('node:os')).loadavg().map((x) => x.toFixed(1)).join(' ')})`);
