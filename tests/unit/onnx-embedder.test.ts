/**
 * The ONNX embedder and the choice between runtimes: the default `createEmbedder()` is the built-in
 * backbone on onnxruntime-node, checked against TF.js; every way that can fail (runtime switched off,
 * a broken cached file, a model that disagrees with TF.js) gives the TF.js embedder with the reason;
 * the worker pool shares one embedder id over its threads; site-supplied ONNX models run by
 * configuration; the settings are validated.
 */
import { execFile } from 'node:child_process';
import { copyFileSync, mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { promisify } from 'node:util';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EmbeddingPool } from '../../jobs/src/embed-pool.ts';
import { createBuiltinEmbedder } from '../../server/src/ml/backbone/builtin.ts';
import {
  CENTERNET_FEATURE_NODE,
  createEmbedder,
  defaultEmbedderConfig,
  embedderStatus,
  ONNX_EMBEDDER_ID,
  PROJECT_ROOT,
  TFJS_EMBEDDER_ID,
  type Embedder,
} from '../../server/src/ml/backbone/embedder.ts';
import { readModelArtifacts } from '../../server/src/ml/backbone/model-files.ts';
import { embedderSelectionFromEnv, parseEmbedderConfig, selectedEmbedderConfig } from '../../server/src/ml/backbone/selection.ts';
import { WorkerEmbedder } from '../../server/src/ml/backbone/worker-embedder.ts';
import { agreement } from '../../server/src/ml/onnx/agreement.ts';
import { backboneCacheKey, ensureBackboneOnnx } from '../../server/src/ml/onnx/backbone-model.ts';
import { convertGraphToOnnx } from '../../server/src/ml/onnx/tfjs-to-onnx.ts';

const SLOW = { timeout: 120_000 };

function drawing(shapes: string, w = 240, h = 200): Promise<Buffer> {
  return sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}"><rect width="100%" height="100%" fill="#fdfcf7"/>${shapes}</svg>`))
    .png()
    .toBuffer();
}

let lighthouse: Buffer;
let anchor: Buffer;
let tfjs: Embedder;
let onnx: Embedder;
/** a private cache folder, so the test converts once and leaves the shared one alone */
const cacheDir = mkdtempSync(join(tmpdir(), 'cartouche-onnx-test-'));

beforeAll(async () => {
  lighthouse = await drawing('<rect x="100" y="40" width="40" height="140" fill="#c33"/><polygon points="90,40 150,40 120,10" fill="#222"/><line x1="20" y1="180" x2="220" y2="180" stroke="#222" stroke-width="4"/>');
  anchor = await drawing('<circle cx="120" cy="40" r="14" fill="none" stroke="#123" stroke-width="6"/><line x1="120" y1="54" x2="120" y2="170" stroke="#123" stroke-width="8"/><path d="M60 130 Q120 200 180 130" fill="none" stroke="#123" stroke-width="8"/>');
  tfjs = await createEmbedder(defaultEmbedderConfig());
  onnx = await createEmbedder({ kind: 'builtin', runtime: 'onnx', cacheDir });
}, 120_000);

afterAll(() => {
  tfjs?.dispose();
  onnx?.dispose();
});

describe('the built-in backbone on onnxruntime-node', () => {
  it('has its own id, the same dimension and layout as TF.js, and the start-up check recorded', () => {
    expect(onnx.id).toBe(ONNX_EMBEDDER_ID);
    expect(onnx.id).not.toBe(TFJS_EMBEDDER_ID);
    expect(onnx.dimension).toBe(240);
    expect(onnx.layout).toEqual({ blocks: [120, 120] });
    const s = embedderStatus(onnx);
    expect(s).toMatchObject({ runtime: 'onnx', requested: 'onnx', fallbackReason: null });
    expect(s.verification!.images).toBe(2);
    expect(s.verification!.relativeL2).toBeLessThan(1e-4);
  });

  it('agrees with TF.js on drawings, their mirror images and a batch (relative L2 < 1e-4)', SLOW, async () => {
    const a = await onnx.embed([lighthouse, anchor]);
    const b = await tfjs.embed([lighthouse, anchor]);
    expect(agreement(a, b).relativeL2).toBeLessThan(1e-4);
    const [pa] = await onnx.embedWithMirror([anchor]);
    const [pb] = await tfjs.embedWithMirror([anchor]);
    expect(agreement([pa!.original, pa!.mirrored], [pb!.original, pb!.mirrored]).relativeL2).toBeLessThan(1e-4);
    const [m] = await onnx.embed([anchor], { mirrored: true });
    expect(agreement([m!], [pa!.mirrored]).relativeL2).toBeLessThan(1e-6);
    // different drawings stay apart
    expect(agreement([a[0]!], [a[1]!]).relativeL2).toBeGreaterThan(0.05);
  });

  it('runs in a worker thread with the same features (one single-threaded session there)', SLOW, async () => {
    const worker = await WorkerEmbedder.start({ kind: 'builtin', runtime: 'onnx', cacheDir, verify: false });
    try {
      expect(worker.id).toBe(ONNX_EMBEDDER_ID);
      expect(worker.status.runtime).toBe('onnx');
      expect(worker.status.verification).toBeNull();
      const [a] = await worker.embed([lighthouse]);
      const [b] = await onnx.embed([lighthouse]);
      expect(agreement([a!], [b!]).relativeL2).toBeLessThan(1e-6);
    } finally {
      worker.dispose();
    }
  });

  it('the pool checks once, then every thread runs the same ONNX embedder; examples are split over threads in order', SLOW, async () => {
    const pool = await EmbeddingPool.start(2, { kind: 'builtin', runtime: 'onnx', cacheDir });
    try {
      expect(pool.size).toBe(2);
      expect(pool.embedder.id).toBe(ONNX_EMBEDDER_ID);
      expect(pool.status.runtime).toBe('onnx');
      expect(pool.status.verification).not.toBeNull();
      const images = [lighthouse, anchor, lighthouse];
      const features = await pool.embedExamples(images);
      const pairs = await onnx.embedWithMirror(images);
      const expected = pairs.map((p) => p.original.map((v, i) => (v + p.mirrored[i]!) / 2));
      expect(agreement(features, expected).relativeL2).toBeLessThan(1e-6);
      const done: { job: number; feature: Float32Array }[] = [];
      await pool.embedAll([0, 1, 2, 3, 4], async (j) => images[j % 3]!, async (batch) => void done.push(...batch), { batch: 2 });
      expect(done.map((d) => d.job).sort()).toEqual([0, 1, 2, 3, 4]);
    } finally {
      pool.dispose();
    }
  });
});

describe('falling back to TF.js, with the reason', () => {
  it('when onnxruntime-node is switched off, also for every thread of the pool', SLOW, async () => {
    process.env.CARTOUCHE_DISABLE_ONNXRUNTIME = '1'; // worker threads inherit the environment
    try {
      const e = await createEmbedder({ kind: 'builtin', runtime: 'onnx', cacheDir });
      try {
        expect(e.id).toBe(TFJS_EMBEDDER_ID);
        expect(embedderStatus(e)).toMatchObject({ runtime: 'tfjs', requested: 'onnx', fallbackReason: expect.stringMatching(/onnxruntime-node is switched off/) });
      } finally {
        e.dispose();
      }
      const pool = await EmbeddingPool.start(2, { kind: 'builtin', runtime: 'onnx', cacheDir });
      try {
        expect(pool.embedder.id).toBe(TFJS_EMBEDDER_ID);
        expect(pool.status.fallbackReason).toMatch(/switched off/);
        const [f] = await pool.embedExamples([lighthouse]);
        expect(f).toHaveLength(240);
      } finally {
        pool.dispose();
      }
    } finally {
      delete process.env.CARTOUCHE_DISABLE_ONNXRUNTIME;
    }
  });

  it('when onnxruntime-node cannot be loaded at all (a fresh process where the package fails to import)', SLOW, async () => {
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-no-ort-'));
    // a loader hook that makes `import('onnxruntime-node')` throw, as a missing native binary would
    writeFileSync(join(dir, 'hooks.mjs'), `export async function resolve(spec, ctx, next) { if (spec === 'onnxruntime-node') throw new Error('native binding not found (test)'); return next(spec, ctx); }\n`);
    writeFileSync(join(dir, 'register.mjs'), `import { register } from 'node:module'; register(${JSON.stringify(pathToFileURL(join(dir, 'hooks.mjs')).href)});\n`);
    const embedderModule = pathToFileURL(fileURLToPath(new URL('../../server/src/ml/backbone/embedder.ts', import.meta.url))).href;
    const script = join(dir, 'embed.mts');
    writeFileSync(
      script,
      `const { createEmbedder, embedderStatus } = await import(${JSON.stringify(embedderModule)});
const e = await createEmbedder({ kind: 'builtin', runtime: 'onnx', cacheDir: ${JSON.stringify(cacheDir)} });
const [f] = await e.embed([Buffer.from(${JSON.stringify(lighthouse.toString('base64'))}, 'base64')]);
process.stdout.write(JSON.stringify({ id: e.id, status: embedderStatus(e), length: f.length }));
e.dispose();
`,
    );
    const tsx = pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href;
    const { stdout } = await promisify(execFile)(process.execPath, ['--import', pathToFileURL(join(dir, 'register.mjs')).href, '--import', tsx, script], {
      maxBuffer: 1 << 20,
      env: { ...process.env, CARTOUCHE_LOG_LEVEL: 'silent' },
    });
    const out = JSON.parse(stdout) as { id: string; status: { runtime: string; fallbackReason: string }; length: number };
    expect(out.id).toBe(TFJS_EMBEDDER_ID);
    expect(out.length).toBe(240);
    expect(out.status.runtime).toBe('tfjs');
    expect(out.status.fallbackReason).toMatch(/onnxruntime-node could not be loaded: .*native binding not found/);
  });

  it('when the cached ONNX file is damaged', SLOW, async () => {
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-onnx-bad-'));
    const { key } = await backboneCacheKey();
    const good = await ensureBackboneOnnx(cacheDir);
    writeFileSync(join(dir, `${key}.onnx`), Buffer.from('not an onnx model'));
    copyFileSync(good.path.replace(/\.onnx$/, '.json'), join(dir, `${key}.json`));
    const e = await createBuiltinEmbedder({ kind: 'builtin', runtime: 'onnx', cacheDir: dir }, PROJECT_ROOT);
    try {
      expect(e.id).toBe(TFJS_EMBEDDER_ID);
      expect(embedderStatus(e).fallbackReason).toMatch(/protobuf|parsing|Load model|failed/i);
    } finally {
      e.dispose();
    }
  });

  it('when the ONNX model disagrees with TF.js on the probe image (here: the block before the feature node)', SLOW, async () => {
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-onnx-wrong-'));
    const { key } = await backboneCacheKey();
    const good = await ensureBackboneOnnx(cacheDir);
    const config = defaultEmbedderConfig();
    const artifacts = await readModelArtifacts(config.modelJson);
    const wrongNode = CENTERNET_FEATURE_NODE.replace('expanded_conv_14', 'expanded_conv_13');
    const wrong = convertGraphToOnnx(artifacts as Parameters<typeof convertGraphToOnnx>[0], { inputNode: config.inputNode, featureNode: wrongNode, pooling: ['avg', 'max'] });
    expect(wrong.channels).toBe(120); // same shape, different features
    writeFileSync(join(dir, `${key}.onnx`), wrong.bytes);
    copyFileSync(good.path.replace(/\.onnx$/, '.json'), join(dir, `${key}.json`));
    const e = await createBuiltinEmbedder({ kind: 'builtin', runtime: 'onnx', cacheDir: dir }, PROJECT_ROOT);
    try {
      expect(e.id).toBe(TFJS_EMBEDDER_ID);
      expect(embedderStatus(e).fallbackReason).toMatch(/disagrees with TF\.js on the probe image: relative L2 .* limit 1e-4/);
    } finally {
      e.dispose();
    }
  });
});

describe('site-supplied ONNX models (kind onnx)', () => {
  it('runs a model whose output is a feature map, pooled here, equal to TF.js at that node', SLOW, async () => {
    const config = defaultEmbedderConfig();
    const artifacts = await readModelArtifacts(config.modelJson);
    const converted = convertGraphToOnnx(artifacts as Parameters<typeof convertGraphToOnnx>[0], { inputNode: config.inputNode, featureNode: config.featureNode });
    const modelPath = join(mkdtempSync(join(tmpdir(), 'cartouche-site-')), 'site.onnx');
    writeFileSync(modelPath, converted.bytes);
    const site = await createEmbedder({ kind: 'onnx', modelPath, inputName: converted.inputName, outputName: converted.outputName, inputSize: 320, outputLayout: 'NCHW', id: 'site-backbone@1' });
    try {
      expect(site.id).toBe('site-backbone@1');
      expect(site.layout).toEqual({ blocks: [120, 120] });
      expect(embedderStatus(site)).toMatchObject({ runtime: 'onnx', requested: 'onnx model file' });
      const [a] = await site.embed([anchor]);
      const [b] = await tfjs.embed([anchor]);
      expect(agreement([a!], [b!]).relativeL2).toBeLessThan(1e-4);
    } finally {
      site.dispose();
    }
  });

  it('runs a model with pooled output split into the configured blocks, and refuses wrong blocks', SLOW, async () => {
    const built = await ensureBackboneOnnx(cacheDir);
    const base = { kind: 'onnx' as const, modelPath: built.path, inputName: built.inputName, outputName: built.outputName, inputSize: 320, id: 'site-pooled@1' };
    const site = await createEmbedder({ ...base, blocks: [120, 120] });
    try {
      expect(site.dimension).toBe(240);
      const [a] = await site.embed([lighthouse]);
      const [b] = await onnx.embed([lighthouse]);
      expect(agreement([a!], [b!]).relativeL2).toBeLessThan(1e-6);
    } finally {
      site.dispose();
    }
    await expect(createEmbedder({ ...base, blocks: [100, 100] })).rejects.toThrow(/do not add up to the output's 240 values/);
    await expect(createEmbedder({ ...base, outputName: 'nope' })).rejects.toThrow(/has no output nope/);
  });
});

describe('settings', () => {
  it('reads CARTOUCHE_EMBEDDER (onnx by default, tfjs) and refuses anything else', async () => {
    expect(embedderSelectionFromEnv({}).runtime).toBe('onnx');
    expect(embedderSelectionFromEnv({ CARTOUCHE_EMBEDDER: 'TFJS' }).runtime).toBe('tfjs');
    expect(() => embedderSelectionFromEnv({ CARTOUCHE_EMBEDDER: 'gpu' })).toThrow(/CARTOUCHE_EMBEDDER must be onnx or tfjs, got "gpu"/);
    expect(embedderSelectionFromEnv({ CARTOUCHE_DATA_DIR: '/srv/cartouche' }).modelCacheDir).toBe('/srv/cartouche/models');
    expect(embedderSelectionFromEnv({ CARTOUCHE_MODEL_CACHE_DIR: '/var/cache/m' }).modelCacheDir).toBe('/var/cache/m');
    expect(await selectedEmbedderConfig(embedderSelectionFromEnv({ CARTOUCHE_EMBEDDER: 'tfjs', CARTOUCHE_DATA_DIR: '/d' }))).toEqual({ kind: 'builtin', runtime: 'tfjs', cacheDir: '/d/models' });
  });

  it('CARTOUCHE_EMBEDDER_CONFIG still names another model, validated field by field', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-embedder-config-'));
    const good = join(dir, 'good.json');
    writeFileSync(good, JSON.stringify({ kind: 'tfjs-graph', modelJson: 'node_modules/@vladmandic/human/models/blazeface.json', inputNode: 'input', featureNode: 'x', inputSize: 256 }));
    const chosen = await selectedEmbedderConfig(embedderSelectionFromEnv({ CARTOUCHE_EMBEDDER_CONFIG: good, CARTOUCHE_EMBEDDER: 'onnx' }));
    expect(chosen.kind).toBe('tfjs-graph');
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify({ kind: 'onnx', modelPath: 'm.onnx', inputName: 'x', outputName: 'y', inputSize: 3, inputLayout: 'HWC' }));
    const refused = await selectedEmbedderConfig(embedderSelectionFromEnv({ CARTOUCHE_EMBEDDER_CONFIG: bad })).catch((e: Error) => e.message);
    expect(refused).toMatch(/bad\.json is not a valid embedder configuration — /);
    for (const field of ['inputSize: ', 'inputLayout: ', 'id: ']) expect(refused).toContain(field);
    expect(() => parseEmbedderConfig({ kind: 'pytorch' })).toThrow(/not a valid embedder configuration/);
    writeFileSync(join(dir, 'broken.json'), '{');
    await expect(selectedEmbedderConfig(embedderSelectionFromEnv({ CARTOUCHE_EMBEDDER_CONFIG: join(dir, 'broken.json') }))).rejects.toThrow(/is not JSON/);
    await expect(selectedEmbedderConfig(embedderSelectionFromEnv({ CARTOUCHE_EMBEDDER_CONFIG: join(dir, 'missing.json') }))).rejects.toThrow(/cannot be read/);
  });
});
