/**
 * The embedder: turns image files into feature vectors. Pluggable by configuration; every stored
 * embedding records the `id` of the embedder that made it, and features of different ids are never mixed.
 *
 * The default is the backbone of the CenterNet detector (MobileNetV3-Large, width 0.75, trained on COCO)
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
 * An ONNX model run by onnxruntime-node. The configuration shape is fixed here so sites can already name
 * it; the implementation registers itself with `registerEmbedderKind('onnx', …)` once the package
 * onnxruntime-node is a dependency.
 */
export interface OnnxEmbedderConfig {
  kind: 'onnx';
  modelPath: string;
  inputName: string;
  outputName: string;
  inputSize: number;
  /** the ONNX graph's input layout */
  inputLayout?: 'NHWC' | 'NCHW';
  pixelRange?: PixelRange;
  pooling?: Pooling[];
  id: string;
  threads?: number;
}

export type EmbedderConfig = TfjsGraphEmbedderConfig | TfjsLayersEmbedderConfig | OnnxEmbedderConfig;
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

/** The default embedder: CenterNet's MobileNetV3 backbone from @vladmandic/human, block 14, [avg, max] pool, 320 px. */
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
    id: 'centernet-mnv3-b14-ap-mp-320@1',
  };
}

export const DEFAULT_EMBEDDER_ID = 'centernet-mnv3-b14-ap-mp-320@1';

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

const projectRootGuess = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', '..', '..');

/**
 * Builds the configured embedder (the default CenterNet backbone when no configuration is given).
 * The `onnx` kind needs onnxruntime-node; until an implementation is registered it fails with a clear message.
 */
export async function createEmbedder(config: EmbedderConfig = defaultEmbedderConfig(), projectRoot = projectRootGuess): Promise<Embedder> {
  const factory = factories.get(config.kind);
  if (!factory) {
    if (config.kind === 'onnx') {
      throw new Error('the onnx embedder needs the npm package onnxruntime-node, which is not a dependency yet; use a tfjs-graph or tfjs-layers embedder');
    }
    throw new Error(`unknown embedder kind ${JSON.stringify((config as { kind: unknown }).kind)}`);
  }
  return factory(config, projectRoot);
}

/** Averages the raw features of an image and its mirror image (mirror-flip averaging for examples). */
export function mirrorAverage(pair: MirrorPair): Float32Array {
  const out = new Float32Array(pair.original.length);
  for (let i = 0; i < out.length; i++) out[i] = (pair.original[i]! + pair.mirrored[i]!) / 2;
  return out;
}
