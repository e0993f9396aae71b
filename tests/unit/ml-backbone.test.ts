import { execFile } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import net from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { promisify } from 'node:util';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  CENTERNET_FEATURE_NODE,
  createEmbedder,
  defaultEmbedderConfig,
  embedderStatus,
  mirrorAverage,
  TFJS_EMBEDDER_ID,
  type Embedder,
} from '../../server/src/ml/backbone/embedder.ts';
import { makeSpatialDimsDynamic, readModelArtifacts } from '../../server/src/ml/backbone/model-files.ts';
import { toSquareRgb } from '../../server/src/ml/backbone/preprocess.ts';
import { tf } from '../../server/src/ml/backbone/tfjs-runtime.ts';
import { WorkerEmbedder } from '../../server/src/ml/backbone/worker-embedder.ts';
import { cosine } from '../../server/src/ml/features.ts';

const SLOW = { timeout: 60_000 };

/** A small drawing rendered from SVG (nothing fetched, nothing copied from anywhere). */
function drawing(shapes: string, w = 240, h = 200): Promise<Buffer> {
  return sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}"><rect width="100%" height="100%" fill="#fdfcf7"/>${shapes}</svg>`))
    .png()
    .toBuffer();
}

function maxAbsDiff(a: Float32Array, b: Float32Array): number {
  expect(a.length).toBe(b.length);
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]! - b[i]!));
  return m;
}

let tower: Buffer;
let boat: Buffer;
let embedder: Embedder;
const fetchCalls: string[] = [];
const socketCalls: string[] = [];
const realFetch = globalThis.fetch;
const realConnect = net.Socket.prototype.connect;

beforeAll(async () => {
  tower = await drawing('<rect x="100" y="40" width="40" height="140" fill="none" stroke="#222" stroke-width="6"/><polygon points="90,40 150,40 120,10" fill="#222"/><line x1="20" y1="180" x2="220" y2="180" stroke="#222" stroke-width="4"/>');
  boat = await drawing('<path d="M30 130 L210 130 L180 170 L60 170 Z" fill="#333"/><line x1="120" y1="30" x2="120" y2="130" stroke="#333" stroke-width="5"/><polygon points="125,35 125,120 190,120" fill="none" stroke="#333" stroke-width="4"/>');
  // the network is off for the whole file: any fetch or socket is recorded and refused
  globalThis.fetch = ((input: unknown) => {
    fetchCalls.push(String(input));
    throw new Error('network disabled in this test');
  }) as typeof fetch;
  net.Socket.prototype.connect = function (this: net.Socket, ...args: unknown[]) {
    socketCalls.push(JSON.stringify(args[0]));
    throw new Error('network disabled in this test');
  } as typeof net.Socket.prototype.connect;
  // this file is about the TF.js path of the backbone; tests/unit/onnx-embedder.test.ts covers the ONNX one
  embedder = await createEmbedder(defaultEmbedderConfig());
}, 60_000);

afterAll(() => {
  embedder?.dispose();
  globalThis.fetch = realFetch;
  net.Socket.prototype.connect = realConnect;
});

describe('the built-in backbone on TF.js (CenterNet MobileNetV3 from @vladmandic/human)', () => {
  it('loads from node_modules with the network disabled: no fetch, no socket', SLOW, async () => {
    expect(embedder.id).toBe(TFJS_EMBEDDER_ID);
    expect(embedder.id).toBe('centernet-mnv3-b14-ap-mp-320@1');
    expect(embedderStatus(embedder)).toMatchObject({ runtime: 'tfjs', fallbackReason: null });
    expect(embedder.dimension).toBe(240);
    expect(embedder.layout.blocks).toEqual([120, 120]);
    const [f] = await embedder.embed([tower]);
    expect(f).toHaveLength(240);
    expect(f!.every(Number.isFinite)).toBe(true);
    expect(fetchCalls).toEqual([]);
    expect(socketCalls).toEqual([]);
  });

  it('gives the same feature for the same image twice (to 1e-5)', SLOW, async () => {
    const [a] = await embedder.embed([tower]);
    const [b] = await embedder.embed([tower]);
    expect(maxAbsDiff(a!, b!)).toBeLessThanOrEqual(1e-5);
  });

  it('gives the same feature from a fresh embedder instance (to 1e-5)', SLOW, async () => {
    const [a] = await embedder.embed([tower]);
    const fresh = await createEmbedder(defaultEmbedderConfig());
    try {
      const [b] = await fresh.embed([tower]);
      expect(maxAbsDiff(a!, b!)).toBeLessThanOrEqual(1e-5);
    } finally {
      fresh.dispose();
    }
  });

  it('gives the same feature inside a worker thread, with its own TF.js and wasm instance (to 1e-5)', SLOW, async () => {
    const [a] = await embedder.embed([tower]);
    const worker = await WorkerEmbedder.start(defaultEmbedderConfig());
    try {
      expect(worker.id).toBe(embedder.id);
      const [b] = await worker.embed([tower]);
      expect(maxAbsDiff(a!, b!)).toBeLessThanOrEqual(1e-5);
      const [pair] = await worker.embedWithMirror([boat]);
      const [m] = await embedder.embed([boat], { mirrored: true });
      expect(maxAbsDiff(pair!.mirrored, m!)).toBeLessThanOrEqual(1e-5);
    } finally {
      worker.dispose();
    }
  });

  it('gives the same feature after a restart (a new Node process, network off there too)', SLOW, async () => {
    const [a] = await embedder.embed([tower]);
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-ml-'));
    const image = join(dir, 'tower.png');
    writeFileSync(image, tower);
    const script = join(dir, 'embed.mts');
    const embedderModule = pathToFileURL(fileURLToPath(new URL('../../server/src/ml/backbone/embedder.ts', import.meta.url))).href;
    writeFileSync(
      script,
      `import { readFileSync } from 'node:fs';
globalThis.fetch = () => { throw new Error('network disabled'); };
const { createEmbedder, defaultEmbedderConfig } = await import(${JSON.stringify(embedderModule)});
const e = await createEmbedder(defaultEmbedderConfig());
const [f] = await e.embed([readFileSync(${JSON.stringify(image)})]);
process.stdout.write(JSON.stringify(Array.from(f)));
e.dispose();
`,
    );
    const tsx = pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href;
    const { stdout } = await promisify(execFile)(process.execPath, ['--import', tsx, script], { maxBuffer: 1 << 20 });
    const b = Float32Array.from(JSON.parse(stdout) as number[]);
    expect(maxAbsDiff(a!, b)).toBeLessThanOrEqual(1e-5);
  });

  it('tells different drawings apart, and a drawing from its mirror image (and leaks no tensors)', SLOW, async () => {
    const before = tf.memory().numTensors;
    const [t, b] = await embedder.embed([tower, boat]);
    const [pair] = await embedder.embedWithMirror([boat]);
    expect(cosine(t!, b!)).toBeLessThan(0.99);
    expect(maxAbsDiff(pair!.original, b!)).toBeLessThanOrEqual(1e-5);
    expect(maxAbsDiff(pair!.original, pair!.mirrored)).toBeGreaterThan(1e-3);
    expect(tf.memory().numTensors).toBe(before);
    const avg = mirrorAverage(pair!);
    expect(avg[0]).toBeCloseTo((pair!.original[0]! + pair!.mirrored[0]!) / 2, 6);
  });
});

describe('model files', () => {
  it('makes the placeholder spatial dimensions dynamic in the node and the signature', SLOW, async () => {
    const a = await readModelArtifacts(defaultEmbedderConfig().modelJson);
    makeSpatialDimsDynamic(a, 'tower_0/images');
    const node = (a.modelTopology as { node: { name: string; attr: { shape: { shape: { dim: { size: string }[] } } } }[] }).node.find((n) => n.name === 'tower_0/images')!;
    expect(node.attr.shape.shape.dim.map((d) => d.size)).toEqual(['1', '-1', '-1', '3']);
    const sig = a.signature as { inputs: Record<string, { tensorShape: { dim: { size: string }[] } }> };
    expect(sig.inputs['tower_0/images']!.tensorShape.dim.map((d) => d.size)).toEqual(['1', '-1', '-1', '3']);
    expect(() => makeSpatialDimsDynamic(a, 'no/such/node')).toThrow(/no placeholder/);
  });

  it('refuses a configured feature node the graph does not have', async () => {
    await expect(createEmbedder({ ...defaultEmbedderConfig(), featureNode: 'tower_0/nothing', id: undefined })).rejects.toThrow(/no node named/);
  });

  it('the default configuration names the block-14 node of ML-FACTS', () => {
    expect(defaultEmbedderConfig().featureNode).toBe(CENTERNET_FEATURE_NODE);
    expect(CENTERNET_FEATURE_NODE).toBe('tower_0/MobilenetV3/expanded_conv_14/add');
  });
});

describe('preprocessing with sharp', () => {
  it('applies the EXIF orientation (tag 6 = the stored pixels are shown turned 90° clockwise; EXIF 2.3, from memory)', SLOW, async () => {
    const base = await sharp({ create: { width: 200, height: 100, channels: 3, background: '#ffffff' } })
      .composite([{ input: await sharp({ create: { width: 100, height: 100, channels: 3, background: '#c00000' } }).png().toBuffer(), left: 0, top: 0 }])
      .png()
      .toBuffer();
    const tagged = await sharp(base).jpeg({ quality: 95 }).withMetadata({ orientation: 6 }).toBuffer();
    const turned = await sharp(base).rotate(90).jpeg({ quality: 95 }).toBuffer();
    const plain = await sharp(base).jpeg({ quality: 95 }).toBuffer();
    const [a, b, c] = await Promise.all([tagged, turned, plain].map((x) => toSquareRgb(x, { size: 64 })));
    const meanDiff = (x: Uint8Array, y: Uint8Array) => x.reduce((s, v, i) => s + Math.abs(v - y[i]!), 0) / x.length;
    expect(meanDiff(a!.data, b!.data)).toBeLessThan(4);
    expect(meanDiff(a!.data, c!.data)).toBeGreaterThan(30);
  });

  it('flattens transparency on white and letterboxes on white (fit contain)', async () => {
    const clear = await sharp({ create: { width: 50, height: 80, channels: 4, background: { r: 0, g: 0, b: 255, alpha: 0 } } }).png().toBuffer();
    const c = await toSquareRgb(clear, { size: 32 });
    expect(c.data.every((v) => v === 255)).toBe(true);
    const wide = await sharp({ create: { width: 200, height: 50, channels: 3, background: '#000000' } }).png().toBuffer();
    const w = await toSquareRgb(wide, { size: 32 });
    expect(w.data.length).toBe(32 * 32 * 3);
    const px = (x: number, y: number) => w.data[(y * 32 + x) * 3]!;
    expect(px(16, 1)).toBe(255); // white band above
    expect(px(16, 16)).toBe(0); // the image in the middle
    expect(px(16, 30)).toBe(255); // white band below
  });

  it('accepts greyscale images and large scans', async () => {
    const grey = await sharp({ create: { width: 40, height: 40, channels: 3, background: '#808080' } }).toColourspace('b-w').png().toBuffer();
    expect((await sharp(grey).metadata()).channels).toBe(1);
    const g = await toSquareRgb(grey, { size: 16 });
    expect(g.data.length).toBe(16 * 16 * 3);
    const big = await sharp({ create: { width: 6000, height: 4000, channels: 3, background: '#406080' } }).jpeg().toBuffer();
    const b = await toSquareRgb(big, { size: 32 });
    expect(b.data.length).toBe(32 * 32 * 3);
    await expect(toSquareRgb(big, { size: 32, maxInputPixels: 1000 })).rejects.toThrow();
  });
});

describe('configured embedders', () => {
  it('runs a TF.js layers model from a folder, pooled at a named layer, and matches a direct computation', SLOW, async () => {
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-layers-'));
    // initialisers below are seeded; nothing else in this test draws random numbers
    const model = tf.sequential({
      layers: [
        tf.layers.conv2d({ inputShape: [32, 32, 3], filters: 4, kernelSize: 3, strides: 2, padding: 'same', activation: 'relu', name: 'first', kernelInitializer: tf.initializers.glorotUniform({ seed: 3 }) }),
        tf.layers.conv2d({ filters: 6, kernelSize: 3, padding: 'same', name: 'second', kernelInitializer: tf.initializers.glorotUniform({ seed: 4 }) }),
      ],
    });
    await model.save({
      save: async (artifacts) => {
        writeFileSync(join(dir, 'weights.bin'), Buffer.from(artifacts.weightData as ArrayBuffer));
        writeFileSync(join(dir, 'model.json'), JSON.stringify({ modelTopology: artifacts.modelTopology, format: 'layers-model', weightsManifest: [{ paths: ['weights.bin'], weights: artifacts.weightSpecs }] }));
        return { modelArtifactsInfo: { dateSaved: new Date(), modelTopologyType: 'JSON' } };
      },
    });
    const e = await createEmbedder({ kind: 'tfjs-layers', modelJson: dir, featureLayer: 'first', inputSize: 32, pixelRange: '0-1' }); // a model folder
    try {
      expect(e.dimension).toBe(8);
      expect(e.layout.blocks).toEqual([4, 4]);
      expect(e.id).toMatch(/^model-[0-9a-f]{8}-first-ap-mp-32@1$/);
      const [f] = await e.embed([tower]);
      const rgb = await toSquareRgb(tower, { size: 32 });
      const expected = tf.tidy(() => {
        const x = tf.tensor4d(Float32Array.from(rgb.data, (v) => v / 255), [1, 32, 32, 3]);
        const sub = tf.model({ inputs: model.inputs, outputs: model.getLayer('first').output as ReturnType<typeof tf.input> });
        const y = sub.predict(x) as ReturnType<typeof tf.tensor4d>;
        return tf.concat([tf.mean(y, [1, 2]), tf.max(y, [1, 2])], -1).dataSync() as Float32Array;
      });
      expect(maxAbsDiff(f!, Float32Array.from(expected))).toBeLessThanOrEqual(1e-5);
    } finally {
      e.dispose();
      model.dispose();
    }
  });

  it('runs another TF.js graph model by configuration (BlazeFace from the same package, its own node and size)', SLOW, async () => {
    const modelJson = defaultEmbedderConfig().modelJson.replace(/centernet\.json$/, 'blazeface.json');
    const e = await createEmbedder({ kind: 'tfjs-graph', modelJson, inputNode: 'input', featureNode: 'StatefulPartitionedCall/functional_1/add/add', inputSize: 256, pixelRange: '-1-1', dynamicInput: false });
    try {
      expect(e.id).toMatch(/^blazeface-[0-9a-f]{8}-.*add_add-ap-mp-256@1$/);
      expect(e.dimension).toBe(2 * e.layout.blocks[0]!);
      const [a] = await e.embed([tower]);
      const [b] = await e.embed([tower]);
      expect(a).toHaveLength(e.dimension);
      expect(maxAbsDiff(a!, b!)).toBeLessThanOrEqual(1e-5);
      expect(e.id).not.toBe(embedder.id);
    } finally {
      e.dispose();
    }
  });

  it('says plainly when a configured ONNX model file is missing', async () => {
    await expect(createEmbedder({ kind: 'onnx', modelPath: '/nowhere.onnx', inputName: 'x', outputName: 'y', inputSize: 320, id: 'site-model@1' })).rejects.toThrow(/\/nowhere\.onnx does not exist/);
  });

  it('rejects an impossible configuration', async () => {
    await expect(createEmbedder({ ...defaultEmbedderConfig(), inputSize: 3 })).rejects.toThrow(/inputSize/);
  });
});
