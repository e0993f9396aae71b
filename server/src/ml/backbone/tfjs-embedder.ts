/**
 * Embedders running a TF.js model (graph or layers format) read from files, pooled at one node.
 */
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import type { FeatureLayout } from '../centring.ts';
import type { EmbedOptions, Embedder, MirrorPair, PixelRange, Pooling } from './embedder.ts';
import { fileModelHandler, graphNodeNames, makeSpatialDimsDynamic } from './model-files.ts';
import { PREPROCESSING_VERSION, toSquareRgb, type RgbImage } from './preprocess.ts';
import { ensureBackend, tf, type BackendName } from './tfjs-runtime.ts';

type Tensor = ReturnType<typeof tf.tensor>;
type Tensor4D = ReturnType<typeof tf.tensor4d>;

export interface TfjsModelOptions {
  modelJson: string;
  inputSize: number;
  pixelRange: PixelRange;
  pooling: readonly Pooling[];
  id?: string;
  backend?: BackendName;
  maxInputPixels?: number;
}

function pixelsToTensor(img: RgbImage, range: PixelRange): Tensor4D {
  const n = img.data.length;
  const f = new Float32Array(n);
  const src = img.data;
  if (range === '0-255') for (let i = 0; i < n; i++) f[i] = src[i]!;
  else if (range === '0-1') for (let i = 0; i < n; i++) f[i] = src[i]! / 255;
  else for (let i = 0; i < n; i++) f[i] = src[i]! / 127.5 - 1;
  return tf.tensor4d(f, [1, img.size, img.size, 3], 'float32');
}

function slug(s: string): string {
  return s.replace(/[^A-Za-z0-9]+/g, '_').replace(/^_|_$/g, '').slice(-40);
}

/** Shared decode → run → pool loop; subclasses say how the model maps an input tensor to a feature map. */
abstract class TfjsEmbedder implements Embedder {
  abstract readonly id: string;
  abstract readonly dimension: number;
  abstract readonly layout: FeatureLayout;
  protected disposed = false;

  constructor(protected readonly options: TfjsModelOptions) {}

  /** Runs the model on one NHWC batch and returns the rank-4 feature map (caller disposes). */
  protected abstract featureMap(input: Tensor4D): Tensor;

  private pool(map: Tensor): Float32Array {
    return tf.tidy(() => {
      if (map.rank !== 4) throw new Error(`the feature node gives a rank-${map.rank} tensor, expected NHWC rank 4`);
      const parts = this.options.pooling.map((p) => (p === 'avg' ? tf.mean(map, [1, 2]) : tf.max(map, [1, 2])));
      return (parts.length === 1 ? parts[0]! : tf.concat(parts, -1)).dataSync() as Float32Array;
    });
  }

  private run(img: RgbImage, mirrored: boolean): Float32Array {
    const map = tf.tidy(() => {
      let x = pixelsToTensor(img, this.options.pixelRange);
      if (mirrored) x = tf.reverse(x, 2);
      return this.featureMap(x);
    });
    try {
      const f = this.pool(map);
      if (f.length !== this.dimension) throw new Error(`the embedder gave ${f.length} values, expected ${this.dimension}`);
      return Float32Array.from(f);
    } finally {
      map.dispose();
    }
  }

  private decode(image: Buffer): Promise<RgbImage> {
    return toSquareRgb(image, { size: this.options.inputSize, maxInputPixels: this.options.maxInputPixels });
  }

  /** Decodes image i+1 (in sharp's thread pool) while the backbone runs on image i. */
  private async each<T>(images: readonly Buffer[], fn: (img: RgbImage) => T): Promise<T[]> {
    if (this.disposed) throw new Error('this embedder has been disposed');
    const out: T[] = [];
    let next = images.length > 0 ? this.decode(images[0]!) : null;
    for (let i = 0; i < images.length; i++) {
      const img = await next!;
      next = i + 1 < images.length ? this.decode(images[i + 1]!) : null;
      next?.catch(() => undefined); // surfaced when awaited
      out.push(fn(img));
    }
    return out;
  }

  embed(images: readonly Buffer[], options: EmbedOptions = {}): Promise<Float32Array[]> {
    return this.each(images, (img) => this.run(img, options.mirrored === true));
  }

  embedWithMirror(images: readonly Buffer[]): Promise<MirrorPair[]> {
    return this.each(images, (img) => ({ original: this.run(img, false), mirrored: this.run(img, true) }));
  }

  abstract dispose(): void;
}

type GraphModel = Awaited<ReturnType<typeof tf.loadGraphModel>>;
type LayersModel = Awaited<ReturnType<typeof tf.loadLayersModel>>;

export interface TfjsGraphOptions extends TfjsModelOptions {
  inputNode: string;
  featureNode: string;
  /** channels at the feature node (checked on load) */
  channels?: number;
  dynamicInput: boolean;
}

export class TfjsGraphEmbedder extends TfjsEmbedder {
  readonly id: string;
  readonly dimension: number;
  readonly layout: FeatureLayout;

  private constructor(
    private readonly model: GraphModel,
    private readonly graph: TfjsGraphOptions,
    id: string,
    channels: number,
  ) {
    super(graph);
    this.id = id;
    this.dimension = channels * graph.pooling.length;
    this.layout = { blocks: graph.pooling.map(() => channels) };
  }

  static async load(options: TfjsGraphOptions): Promise<TfjsGraphEmbedder> {
    await ensureBackend(options.backend ?? 'wasm');
    const handler = fileModelHandler(options.modelJson, (a) => {
      const names = new Set(graphNodeNames(a));
      if (!names.has(options.featureNode)) throw new Error(`${options.modelJson} has no node named ${options.featureNode}`);
      return options.dynamicInput ? makeSpatialDimsDynamic(a, options.inputNode) : a;
    });
    const model = await tf.loadGraphModel(handler);
    // one probe run tells the channel count and checks the node is a feature map
    const probe = tf.tidy(() => {
      const x = tf.zeros([1, options.inputSize, options.inputSize, 3]);
      const y = model.execute({ [options.inputNode]: x }, options.featureNode) as Tensor;
      return y.shape;
    });
    if (probe.length !== 4) {
      model.dispose();
      throw new Error(`node ${options.featureNode} gives shape [${probe.join(',')}], expected NHWC`);
    }
    const channels = probe[3]!;
    if (options.channels !== undefined && channels !== options.channels) {
      model.dispose();
      throw new Error(`node ${options.featureNode} has ${channels} channels, expected ${options.channels}`);
    }
    const id = options.id ?? (await derivedId(options.modelJson, options.featureNode, options.pooling, options.inputSize));
    return new TfjsGraphEmbedder(model, options, id, channels);
  }

  protected featureMap(input: Tensor4D): Tensor {
    return this.model.execute({ [this.graph.inputNode]: input }, this.graph.featureNode) as Tensor;
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    this.model.dispose();
  }
}

export interface TfjsLayersOptions extends TfjsModelOptions {
  /** layer whose output is pooled; the model's output when absent */
  featureLayer?: string;
}

export class TfjsLayersEmbedder extends TfjsEmbedder {
  readonly id: string;
  readonly dimension: number;
  readonly layout: FeatureLayout;

  private constructor(
    private readonly model: LayersModel,
    private readonly source: LayersModel,
    options: TfjsLayersOptions,
    id: string,
    channels: number,
  ) {
    super(options);
    this.id = id;
    this.dimension = channels * options.pooling.length;
    this.layout = { blocks: options.pooling.map(() => channels) };
  }

  static async load(options: TfjsLayersOptions): Promise<TfjsLayersEmbedder> {
    await ensureBackend(options.backend ?? 'wasm');
    const source = await tf.loadLayersModel(fileModelHandler(options.modelJson));
    let model = source;
    if (options.featureLayer) {
      const layer = source.getLayer(options.featureLayer);
      const output = layer.output;
      if (Array.isArray(output)) throw new Error(`layer ${options.featureLayer} has several outputs`);
      model = tf.model({ inputs: source.inputs, outputs: output });
    }
    const shape = model.outputs[0]?.shape;
    if (!shape || shape.length !== 4 || typeof shape[3] !== 'number') {
      source.dispose();
      throw new Error(`the feature layer gives shape [${shape?.join(',')}], expected NHWC with known channels`);
    }
    const channels = shape[3];
    const id = options.id ?? (await derivedId(options.modelJson, options.featureLayer ?? 'output', options.pooling, options.inputSize));
    return new TfjsLayersEmbedder(model, source, options, id, channels);
  }

  protected featureMap(input: Tensor4D): Tensor {
    const y = this.model.predict(input);
    if (Array.isArray(y)) throw new Error('the feature model has several outputs');
    return y as Tensor;
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    this.source.dispose();
  }
}

/** An id for a configured model: file name, node, pooling, size, preprocessing version and a hash of model.json. */
async function derivedId(modelJson: string, node: string, pooling: readonly Pooling[], size: number): Promise<string> {
  const hash = createHash('sha256').update(await readFile(modelJson)).digest('hex').slice(0, 8);
  return `${slug(basename(modelJson, '.json'))}-${hash}-${slug(node)}-${pooling.map((p) => (p === 'avg' ? 'ap' : 'mp')).join('-')}-${size}@${PREPROCESSING_VERSION}`;
}
