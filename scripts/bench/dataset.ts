/**
 * Bench data sets: a folder laid out `<domain>/<category>/<image>` (optional `manifest.csv` with
 * `path,domain,category,instance_group`), embedded with the product's embedder. Features are cached
 * under `.data/bench-cache/` (git-ignored, never part of the repository or a build).
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { projectRoot } from '../../server/src/config.ts';
import { createEmbedder, type Embedder } from '../../server/src/ml/backbone/embedder.ts';
import { featureFromBuffer, featureToBuffer } from '../../server/src/ml/features.ts';

export interface BenchImage {
  path: string;
  domain: string;
  category: string;
  /** images sharing a group must not be used against each other (a sketch and the photo it was drawn from) */
  group: string;
}

export interface EmbeddedSet {
  dir: string;
  embedderId: string;
  dimension: number;
  blocks: number[];
  images: BenchImage[];
  /** raw features, one per image */
  features: Float32Array[];
  /** raw features of the mirrored image (non-photo domains only; photo rows are null) */
  mirrored: (Float32Array | null)[];
  /** measured while embedding (cache misses only); null when everything came from the cache */
  timing: { ms: number; images: number; passes: number } | null;
}

const IMAGE = /\.(jpe?g|png|webp|tiff?|gif)$/i;

export function benchRoot(): string {
  return resolve(projectRoot, '..', 'shared', 'bench');
}

export function listImages(dir: string): BenchImage[] {
  const manifest = join(dir, 'manifest.csv');
  const groups = new Map<string, string>();
  if (existsSync(manifest)) {
    const [header, ...lines] = readFileSync(manifest, 'utf8').split(/\r?\n/).filter((l) => l.trim() !== '');
    const cols = (header ?? '').split(',');
    const pi = cols.indexOf('path');
    const gi = cols.indexOf('instance_group');
    if (pi >= 0 && gi >= 0) for (const l of lines) {
      const cells = l.split(',');
      groups.set(cells[pi]!, cells[gi]!);
    }
  }
  const out: BenchImage[] = [];
  for (const domain of readdirSync(dir).sort()) {
    const dd = join(dir, domain);
    if (!statSync(dd).isDirectory()) continue;
    for (const category of readdirSync(dd).sort()) {
      const cd = join(dd, category);
      if (!statSync(cd).isDirectory()) continue;
      for (const f of readdirSync(cd).sort()) {
        if (!IMAGE.test(f)) continue;
        const path = `${domain}/${category}/${f}`;
        out.push({ path, domain, category, group: groups.get(path) ?? path });
      }
    }
  }
  return out;
}

function cacheFile(dir: string, images: BenchImage[], embedderId: string): string {
  const h = createHash('sha256');
  h.update(resolve(dir)).update('\n').update(embedderId).update('\n');
  for (const im of images) h.update(`${im.path}:${statSync(join(dir, im.path)).size}\n`);
  const folder = join(projectRoot, '.data', 'bench-cache');
  mkdirSync(folder, { recursive: true });
  return join(folder, `${h.digest('hex').slice(0, 24)}.bin`);
}

/** Embeds every image (and mirror images of non-photo domains), reading and writing the cache. */
export async function embedSet(dir: string, options: { embedder?: Embedder; log?: (s: string) => void } = {}): Promise<EmbeddedSet> {
  const log = options.log ?? ((s: string) => process.stderr.write(s));
  const images = listImages(dir);
  if (images.length === 0) throw new Error(`no images under ${dir} (expected <domain>/<category>/<image>)`);
  const embedder = options.embedder ?? (await createEmbedder());
  try {
    const file = cacheFile(dir, images, embedder.id);
    const d = embedder.dimension;
    if (existsSync(file)) {
      const buf = readFileSync(file);
      const rows = buf.byteLength / (4 * d);
      const expected = images.length + images.filter((im) => im.domain !== 'photo').length;
      if (rows === expected) {
        const features: Float32Array[] = [];
        const mirrored: (Float32Array | null)[] = [];
        let r = 0;
        const next = () => featureFromBuffer(buf.subarray(4 * d * r, 4 * d * ++r), d);
        for (const im of images) {
          features.push(next());
          mirrored.push(im.domain === 'photo' ? null : next());
        }
        log(`features of ${images.length} images from the cache ${relative(projectRoot, file)}\n`);
        return { dir, embedderId: embedder.id, dimension: d, blocks: [...embedder.layout.blocks], images, features, mirrored, timing: null };
      }
    }
    const features: Float32Array[] = [];
    const mirrored: (Float32Array | null)[] = [];
    const chunks: Buffer[] = [];
    const t0 = performance.now();
    let passes = 0;
    for (let i = 0; i < images.length; i++) {
      const im = images[i]!;
      const bytes = readFileSync(join(dir, im.path));
      if (im.domain === 'photo') {
        const [f] = await embedder.embed([bytes]);
        features.push(f!);
        mirrored.push(null);
        chunks.push(featureToBuffer(f!));
        passes += 1;
      } else {
        const [p] = await embedder.embedWithMirror([bytes]);
        features.push(p!.original);
        mirrored.push(p!.mirrored);
        chunks.push(featureToBuffer(p!.original), featureToBuffer(p!.mirrored));
        passes += 2;
      }
      if ((i + 1) % 250 === 0 || i + 1 === images.length) {
        const ms = (performance.now() - t0) / passes;
        log(`embedded ${i + 1}/${images.length} (${ms.toFixed(1)} ms per backbone pass)\n`);
      }
    }
    const timing = { ms: performance.now() - t0, images: images.length, passes };
    writeFileSync(file, Buffer.concat(chunks));
    return { dir, embedderId: embedder.id, dimension: d, blocks: [...embedder.layout.blocks], images, features, mirrored, timing };
  } finally {
    if (!options.embedder) embedder.dispose();
  }
}
