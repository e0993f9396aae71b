/**
 * The embedder: turns image files into feature vectors. Pluggable by configuration; every stored
 * embedding records the `id` of the embedder that made it, and features of different ids are never mixed.
 * The built-in backbone runs on onnxruntime-node (converted from its TF.js graph, see ../onnx/) or on
 * TF.js wasm; the two have distinct ids.
 *
 * The built-in one is the backbone of the CenterNet detector (MobileNetV3-Large, width 0.75, trained on COCO)
 * that ships in the npm package `@vladmandic/human` (MIT), read at 320 × 320 px up to the output of
 * block 14, average- and max-pooled: 2 × 120 = 240 floats. What is returned (and stored) are the raw pooled
 * values; centring and normalisation happen at synthesis and scoring time (see ../centring.ts).
 */
import { existsSync, statSync } from 'node:fs';
import { dirname, isAbsolute, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { FeatureLayout } from '../centring.ts';
import type { BackendName } from './tfjs-runtime.ts';

export type PixelRange = '0-255' | '0-1' | '-1-1';
export type Pooling = 'avg' | 'max';

export interface EmbedOptions {
  /** embed the horizontally mirrored images instead */
  mirrored?: boolean;
}

export interface MirrorPair {
  original: Float32Array;
  mirrored: Float32Array;
}

export interface Embedder {
  /** records model, node, pooling, input size and preprocessing version, e.g. `centernet-mnv3-b14-ap-mp-320@1` */
  readonly id: string;
  readonly dimension: number;
  /** how the vector splits into pooled blocks (each block is centred and normalised on its own) */
  readonly layout: FeatureLayout;
  /** raw pooled features, one per image, in order; images are encoded files (JPEG, PNG, WebP, TIFF, …) */
  embed(images: readonly Buffer[], options?: EmbedOptions): Promise<Float32Array[]>;
  /** features of each image and of its mirror image, decoding each file once */
  embedWithMirror(images: readonly Buffer[]): Promise<MirrorPair[]>;
  dispose(): void;
}

/** A TF.js graph model (model.json + shards), run up to `featureNode`. */
export interface TfjsGraphEmbedderConfig {
  kind: 'tfjs-graph';
  /** model.json path or the folder holding it; relative paths resolve against the project root */
  modelJson: string;
  inputNode: string;
  featureNode: string;
  inputSize: number;
  pixelRange?: PixelRange;
  pooling?: Pooling[];
  /** make the input placeholder's height and width dynamic (needed when the graph declares another size) */
  dynamicInput?: boolean;
  /** expected channels at the feature node (checked on load) */
  channels?: number;
  /** fixed id; derived from file name, content hash, node, pooling and size when absent */
  id?: string;
  backend?: BackendName;
  maxInputPixels?: number;
}

/** A TF.js layers model, pooled at `featureLayer` (or its output). */
export interface TfjsLayersEmbedderConfig {
  kind: 'tfjs-layers';
  /** model.json path or the folder holding it */
  modelJson: string;
  featureLayer?: string;
  inputSize: number;
  pixelRange?: PixelRange;
  pooling?: Pooling[];
  id?: string;
  backend?: BackendName;
  maxInputPixels?: number;
}

/**
 * A site-supplied ONNX model run by onnxruntime-node (one single-threaded session per worker thread).
 * A rank-2 output [N, D] is taken as pooled features (split into `blocks`); a rank-4 output is a feature
 * map pooled as `pooling` lists. There is no TF.js twin to fall back to: when onnxruntime-node cannot
 * load, creating it fails with the reason.
 */
export interface OnnxEmbedderConfig {
  kind: 'onnx';
  /** .onnx file; relative paths resolve against the project root */
  modelPath: string;
  inputName: string;
  outputName: string;
  inputSize: number;
  /** the ONNX graph's input layout (default NHWC) */
  inputLayout?: 'NHWC' | 'NCHW';
  /** a rank-4 output's layout (default: the input layout) */
  outputLayout?: 'NHWC' | 'NCHW';
  pixelRange?: PixelRange;
  /** pooling of a rank-4 output (default avg, max) */
  pooling?: Pooling[];
  /** block sizes of a rank-2 output (default one block) */
  blocks?: number[];
  id: string;
  /** ORT intra-op threads per session (default 1) */
  threads?: number;
  /** images per session run (default 1) */
  batch?: number;
  maxInputPixels?: number;
}

/**
 * The built-in backbone (CenterNet's MobileNetV3, block 14, [avg, max], 320 px) on either runtime.
 * `onnx`: converted from the TF.js graph at first start and cached, checked against TF.js on a probe
 * image, and replaced by the TF.js embedder (with the reason recorded) when onnxruntime-node cannot load
 * or the check fails. `tfjs`: the TF.js wasm embedder.
 */
export interface BuiltinEmbedderConfig {
  kind: 'builtin';
  runtime: EmbedderRuntime;
  /** folder for the converted .onnx file (default <project>/.data/models) */
  cacheDir?: string;
  /** compare ONNX with TF.js on the probe image before use (default true) */
  verify?: boolean;
  /** with `verify: false`: the agreement an earlier check in this process measured, reported as this embedder's */
  verified?: { images: number; maxAbs: number; relativeL2: number; lowestCosine: number };
  /** an earlier attempt in this process already fell back for this reason: start on TF.js, report it */
  fallbackReason?: string;
  /** images per ONNX session run (default 1) */
  batch?: number;
}

export type EmbedderRuntime = 'onnx' | 'tfjs';

export type EmbedderConfig = TfjsGraphEmbedderConfig | TfjsLayersEmbedderConfig | OnnxEmbedderConfig | BuiltinEmbedderConfig;
export type EmbedderKind = EmbedderConfig['kind'];

/** Looks for `relative` inside a node_modules folder, from this file's folder upward. */
export function findInNodeModules(relative: string, from = dirname(fileURLToPath(import.meta.url))): string {
  for (let dir = from; ; dir = dirname(dir)) {
    const candidate = join(dir, 'node_modules', relative);
    if (existsSync(candidate)) return candidate;
    if (dirname(dir) === dir) break;
  }
  throw new Error(`${relative} is not installed (looked in every node_modules folder above ${from})`);
}

export const CENTERNET_FEATURE_NODE = 'tower_0/MobilenetV3/expanded_conv_14/add';

/** The built-in backbone as a TF.js graph embedder: CenterNet's MobileNetV3 from @vladmandic/human, block 14, [avg, max] pool, 320 px. */
export function defaultEmbedderConfig(): TfjsGraphEmbedderConfig {
  return {
    kind: 'tfjs-graph',
    modelJson: findInNodeModules('@vladmandic/human/models/centernet.json'),
    inputNode: 'tower_0/images',
    featureNode: CENTERNET_FEATURE_NODE,
    inputSize: 320,
    // the graph has no normalisation op; it is fed raw resized pixels
    pixelRange: '0-255',
    pooling: ['avg', 'max'],
    dynamicInput: true,
    channels: 120,
    id: TFJS_EMBEDDER_ID,
  };
}

/** The built-in backbone on TF.js (wasm). */
export const TFJS_EMBEDDER_ID = 'centernet-mnv3-b14-ap-mp-320@1';
/**
 * The built-in backbone converted to ONNX, on onnxruntime-node. Its features agree with TF.js's to well
 * under 1e-4 relative (checked at every start) but are not bit-identical, so they are stored apart. The
 * converter version is in the cache key, not here: a converter change must stay within the start-up
 * tolerance; one that changes the features on purpose must bump this id.
 */
export const ONNX_EMBEDDER_ID = 'centernet-mnv3-b14-ap-mp-320-onnx@1';
/** The id of the default configuration (`CARTOUCHE_EMBEDDER=onnx`) when onnxruntime-node works; the id in use is always `embedder.id`. */
export const DEFAULT_EMBEDDER_ID = ONNX_EMBEDDER_ID;

/** What an embedder is and, after a fallback, why it is not the one asked for. */
export interface EmbedderStatus {
  id: string;
  /** the runtime doing the work */
  runtime: EmbedderRuntime;
  /** what the configuration asked for: the built-in backbone on a runtime, or a configured model kind */
  requested: string;
  /** why the requested runtime is not in use (null when it is) */
  fallbackReason: string | null;
  /** ONNX against TF.js on the start-up probe image (built-in ONNX only) */
  verification: { images: number; maxAbs: number; relativeL2: number; lowestCosine: number } | null;
  /** e.g. the cached ONNX file */
  detail?: string;
}

const statuses = new WeakMap<Embedder, EmbedderStatus>();

/** Records how an embedder came to be (factories call this; `createEmbedder` fills in a plain status otherwise). */
export function recordEmbedderStatus(embedder: Embedder, status: EmbedderStatus): void {
  statuses.set(embedder, status);
}

/** How an embedder came to be: runtime, what was asked for, the fallback reason. */
export function embedderStatus(embedder: Embedder): EmbedderStatus {
  return statuses.get(embedder) ?? { id: embedder.id, runtime: 'tfjs', requested: 'unknown', fallbackReason: null, verification: null };
}

type Factory = (config: EmbedderConfig, projectRoot: string) => Promise<Embedder>;
const factories = new Map<string, Factory>();

/** Adds (or replaces) the implementation of an embedder kind, e.g. an onnxruntime-node embedder for `onnx`. */
export function registerEmbedderKind(kind: EmbedderKind, factory: Factory): void {
  factories.set(kind, factory);
}

function resolvePath(p: string, root: string): string {
  return isAbsolute(p) ? p : resolve(root, p);
}

/** A model.json path, or a folder holding model.json. */
function resolveModelJson(p: string, root: string): string {
  const full = resolvePath(p, root);
  return existsSync(full) && statSync(full).isDirectory() ? join(full, 'model.json') : full;
}

function checkCommon(c: { inputSize: number; pooling?: Pooling[] }): void {
  if (!Number.isInteger(c.inputSize) || c.inputSize < 16 || c.inputSize > 4096) throw new Error(`inputSize must be an integer in 16..4096, got ${c.inputSize}`);
  if (c.pooling && (c.pooling.length === 0 || c.pooling.some((p) => p !== 'avg' && p !== 'max'))) throw new Error(`pooling must list 'avg' and/or 'max', got ${JSON.stringify(c.pooling)}`);
}

registerEmbedderKind('tfjs-graph', async (config, root) => {
  const c = config as TfjsGraphEmbedderConfig;
  checkCommon(c);
  const { TfjsGraphEmbedder } = await import('./tfjs-embedder.ts');
  return TfjsGraphEmbedder.load({
    modelJson: resolveModelJson(c.modelJson, root),
    inputNode: c.inputNode,
    featureNode: c.featureNode,
    inputSize: c.inputSize,
    pixelRange: c.pixelRange ?? '0-255',
    pooling: c.pooling ?? ['avg', 'max'],
    dynamicInput: c.dynamicInput ?? true,
    channels: c.channels,
    id: c.id,
    backend: c.backend,
    maxInputPixels: c.maxInputPixels,
  });
});

registerEmbedderKind('tfjs-layers', async (config, root) => {
  const c = config as TfjsLayersEmbedderConfig;
  checkCommon(c);
  const { TfjsLayersEmbedder } = await import('./tfjs-embedder.ts');
  return TfjsLayersEmbedder.load({
    modelJson: resolveModelJson(c.modelJson, root),
    featureLayer: c.featureLayer,
    inputSize: c.inputSize,
    pixelRange: c.pixelRange ?? '0-1',
    pooling: c.pooling ?? ['avg', 'max'],
    id: c.id,
    backend: c.backend,
    maxInputPixels: c.maxInputPixels,
  });
});

registerEmbedderKind('onnx', async (config, root) => {
  const c = config as OnnxEmbedderConfig;
  checkCommon(c);
  if (!c.id) throw new Error('an onnx embedder needs an id (it is recorded on every stored feature)');
  if (c.blocks && (c.blocks.length === 0 || c.blocks.some((b) => !Number.isInteger(b) || b < 1))) throw new Error(`blocks must list positive integers, got ${JSON.stringify(c.blocks)}`);
  const [{ loadOnnxRuntime }, { OnnxEmbedder }] = await Promise.all([import('../onnx/runtime.ts'), import('../onnx/onnx-embedder.ts')]);
  const ort = await loadOnnxRuntime();
  const modelPath = resolvePath(c.modelPath, root);
  if (!existsSync(modelPath)) throw new Error(`the ONNX model ${modelPath} does not exist`);
  const inputLayout = c.inputLayout ?? 'NHWC';
  const embedder = await OnnxEmbedder.load(ort, {
    model: modelPath,
    inputName: c.inputName,
    outputName: c.outputName,
    inputSize: c.inputSize,
    inputLayout,
    outputLayout: c.outputLayout ?? inputLayout,
    pixelRange: c.pixelRange ?? '0-255',
    pooling: c.pooling ?? ['avg', 'max'],
    blocks: c.blocks,
    id: c.id,
    threads: c.threads,
    batch: c.batch,
    maxInputPixels: c.maxInputPixels,
  });
  recordEmbedderStatus(embedder, { id: embedder.id, runtime: 'onnx', requested: 'onnx model file', fallbackReason: null, verification: null, detail: modelPath });
  return embedder;
});

registerEmbedderKind('builtin', async (config, root) => {
  const { createBuiltinEmbedder } = await import('./builtin.ts');
  return createBuiltinEmbedder(config as BuiltinEmbedderConfig, root);
});

export const PROJECT_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', '..', '..');

/** The built-in backbone on onnxruntime-node, falling back to TF.js: what `createEmbedder()` builds without a configuration. */
export function builtinEmbedderConfig(runtime: EmbedderRuntime = 'onnx'): BuiltinEmbedderConfig {
  return { kind: 'builtin', runtime };
}

/**
 * Builds the configured embedder; without a configuration the built-in backbone on onnxruntime-node
 * (checked against TF.js, TF.js wasm when that is not possible). `defaultEmbedderConfig()` is the same
 * backbone on TF.js alone.
 */
export async function createEmbedder(config: EmbedderConfig = builtinEmbedderConfig(), projectRoot = PROJECT_ROOT): Promise<Embedder> {
  const factory = factories.get(config.kind);
  if (!factory) throw new Error(`unknown embedder kind ${JSON.stringify((config as { kind: unknown }).kind)}`);
  const embedder = await factory(config, projectRoot);
  if (!statuses.has(embedder)) recordEmbedderStatus(embedder, { id: embedder.id, runtime: 'tfjs', requested: config.kind, fallbackReason: null, verification: null });
  return embedder;
}

/** Averages the raw features of an image and its mirror image (mirror-flip averaging for examples). */
export function mirrorAverage(pair: MirrorPair): Float32Array {
  const out = new Float32Array(pair.original.length);
  for (let i = 0; i < out.length; i++) out[i] = (pair.original[i]! + pair.mirrored[i]!) / 2;
  return out;
}
