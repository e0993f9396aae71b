/**
 * The built-in backbone converted to ONNX against the same graph run by TF.js (the reference: the
 * npm-shipped model `@vladmandic/human/models/centernet.json` executed by TF.js's wasm backend) on open
 * images: clip art from Debian's `openclipart-png` (public domain, /usr/share/openclipart/png, installed
 * by the test bootstrap), plus their mirror images. Features must agree within 1e-4 relative L2 (the
 * start-up check's limit); the conversion is faithful to about 1e-6.
 */
import { existsSync, mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBuiltinEmbedder } from '../../server/src/ml/backbone/builtin.ts';
import { createEmbedder, defaultEmbedderConfig, embedderStatus, ONNX_EMBEDDER_ID, PROJECT_ROOT, TFJS_EMBEDDER_ID, type Embedder } from '../../server/src/ml/backbone/embedder.ts';
import { agreement, AGREEMENT_TOLERANCE } from '../../server/src/ml/onnx/agreement.ts';
import { backboneCacheKey, ensureBackboneOnnx } from '../../server/src/ml/onnx/backbone-model.ts';

const ROOT = '/usr/share/openclipart/png';
const FOLDERS = ['food/fruit', 'transportation/vehicles', 'animals/birds', 'buildings', 'plants/flowers'];

let images: Buffer[] = [];
let onnxEmbedder: Embedder;
let tfjsEmbedder: Embedder;
const cacheDir = mkdtempSync(join(tmpdir(), 'cartouche-onnx-cache-'));

beforeAll(async () => {
  if (!existsSync(ROOT)) throw new Error(`${ROOT} is missing: install the Debian package openclipart-png (the test bootstrap does this)`);
  for (const folder of FOLDERS) {
    const dir = join(ROOT, folder);
    if (!existsSync(dir)) continue;
    const files = readdirSync(dir, { recursive: true }).map(String).filter((f) => f.endsWith('.png')).sort().slice(0, 2);
    images.push(...files.map((f) => readFileSync(join(dir, f))));
  }
  images = images.slice(0, 8);
  onnxEmbedder = await createBuiltinEmbedder({ kind: 'builtin', runtime: 'onnx', cacheDir }, PROJECT_ROOT);
  tfjsEmbedder = await createEmbedder(defaultEmbedderConfig());
}, 120_000);

afterAll(() => {
  onnxEmbedder?.dispose();
  tfjsEmbedder?.dispose();
});

describe('the ONNX backbone against TF.js', () => {
  it('is the ONNX runtime, checked at start against TF.js on the probe image', () => {
    const status = embedderStatus(onnxEmbedder);
    expect(status.runtime).toBe('onnx');
    expect(status.fallbackReason).toBeNull();
    expect(onnxEmbedder.id).toBe(ONNX_EMBEDDER_ID);
    expect(onnxEmbedder.id).not.toBe(TFJS_EMBEDDER_ID);
    expect(status.verification!.relativeL2).toBeLessThan(AGREEMENT_TOLERANCE);
    expect(onnxEmbedder.dimension).toBe(tfjsEmbedder.dimension);
    expect(onnxEmbedder.layout).toEqual(tfjsEmbedder.layout);
  });

  it('agrees within 1e-4 relative L2 on open clip art and on its mirror images', { timeout: 120_000 }, async () => {
    expect(images.length).toBeGreaterThanOrEqual(6);
    const a = await onnxEmbedder.embedWithMirror(images);
    const b = await tfjsEmbedder.embedWithMirror(images);
    const plain = agreement(
      a.map((p) => p.original),
      b.map((p) => p.original),
    );
    const mirrored = agreement(
      a.map((p) => p.mirrored),
      b.map((p) => p.mirrored),
    );
    for (const r of [plain, mirrored]) {
      expect(r.relativeL2).toBeLessThan(1e-4);
      expect(r.lowestCosine).toBeGreaterThan(1 - 1e-8);
    }
    // the same images one call at a time and as one batch give the same ONNX features
    const batched = await onnxEmbedder.embed(images);
    const single = [];
    for (const im of images) single.push((await onnxEmbedder.embed([im]))[0]!);
    expect(agreement(batched, single).relativeL2).toBeLessThan(1e-6);
    expect(agreement(batched, a.map((p) => p.original)).relativeL2).toBeLessThan(1e-6);
  });

  it('reuses the cached conversion on the next start (same key: package version, content, converter version)', async () => {
    const { key } = await backboneCacheKey();
    const again = await ensureBackboneOnnx(cacheDir);
    expect(again.built).toBe(false);
    expect(again.key).toBe(key);
    expect(key).toMatch(/^centernet-b14-ap-mp_human-\d+\.\d+\.\d+-[0-9a-f]{10}_c\d+-op\d+$/);
    expect(again.channels).toBe(120);
  });
});
