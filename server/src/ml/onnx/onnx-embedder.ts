/**
 * An embedder running an ONNX model with onnxruntime-node: the same preprocessing as the TF.js
 * embedders (sharp, fitted into a white square), then one session run per image (or per batch, by configuration).
 *
 * The session is single-threaded by default (`intraOpNumThreads = 1`): one session per worker thread is
 * how the machine's cores are used, and ORT's `run` blocks the JS thread it is called on, so in the
 * product it always runs inside a worker thread (see ../backbone/worker-embedder.ts). Decoding of the
 * next image (sharp, in libuv's thread pool) overlaps the run of the current one.
 *
 * Outputs: a rank-2 output [N, D] is taken as the pooled features (split into `blocks`); a rank-4
 * output is a feature map (NCHW or NHWC, `outputLayout`) pooled here as `pooling` lists.
 */
import type { FeatureLayout } from '../centring.ts';
import type { EmbedOptions, Embedder, MirrorPair, PixelRange, Pooling } from '../backbone/embedder.ts';
import { toSquareRgb, type RgbImage } from '../backbone/preprocess.ts';
import type { OnnxRuntime } from './runtime.ts';

type Session = Awaited<ReturnType<OnnxRuntime['InferenceSession']['create']>>;

export interface OnnxEmbedderOptions {
  /** an .onnx file or its bytes */
  model: string | Uint8Array;
  inputName: string;
  outputName: string;
  inputSize: number;
  inputLayout: 'NHWC' | 'NCHW';
  pixelRange: PixelRange;
  /** pooling of a rank-4 output */
  pooling: readonly Pooling[];
  /** layout of a rank-4 output */
  outputLayout: 'NCHW' | 'NHWC';
  /** blocks of a rank-2 output (default: one block) */
  blocks?: readonly number[];
  id: string;
  /** ORT intra-op threads (default 1) */
  threads?: number;
  /** images per session run (default 1: on the 2-core test machine a run over 8 images cost more per image than 8 runs of one) */
  batch?: number;
  maxInputPixels?: number;
}

/** The NHWC or NCHW float input of a batch of decoded images, each optionally mirrored left–right. */
export function imagesToInput(images: readonly { img: RgbImage; mirrored: boolean }[], layout: 'NHWC' | 'NCHW', range: PixelRange): Float32Array {
  const size = images[0]!.img.size;
  const plane = size * size;
  const out = new Float32Array(images.length * plane * 3);
  const scale = range === '0-255' ? 1 : range === '0-1' ? 1 / 255 : 1 / 127.5;
  const shift = range === '-1-1' ? -1 : 0;
  images.forEach(({ img, mirrored }, n) => {
    if (img.size !== size) throw new Error('every image of a batch must have the same size');
    const src = img.data;
    const base = n * plane * 3;
    for (let y = 0; y < size; y++) {
      for (let x = 0; x < size; x++) {
        const from = (y * size + (mirrored ? size - 1 - x : x)) * 3;
        const p = y * size + x;
        for (let c = 0; c < 3; c++) {
          const v = src[from + c]! * scale + shift;
          if (layout === 'NHWC') out[base + p * 3 + c] = v;
          else out[base + c * plane + p] = v;
        }
      }
    }
  });
  return out;
}

/** Average and/or max pooling of one image's feature map (rank 4 output row). */
function poolMap(data: Float32Array, offset: number, channels: number, spatial: number, layout: 'NCHW' | 'NHWC', pooling: readonly Pooling[]): Float32Array {
  const out = new Float32Array(channels * pooling.length);
  pooling.forEach((p, k) => {
    for (let c = 0; c < channels; c++) {
      let acc = p === 'avg' ? 0 : Number.NEGATIVE_INFINITY;
      for (let s = 0; s < spatial; s++) {
        const v = data[offset + (layout === 'NCHW' ? c * spatial + s : s * channels + c)]!;
        acc = p === 'avg' ? acc + v : Math.max(acc, v);
      }
      out[k * channels + c] = p === 'avg' ? acc / spatial : acc;
    }
  });
  return out;
}

export class OnnxEmbedder implements Embedder {
  readonly dimension: number;
  readonly layout: FeatureLayout;
  private disposed = false;
  private readonly batch: number;

  private constructor(
    private readonly ort: OnnxRuntime,
    private readonly session: Session,
    private readonly options: OnnxEmbedderOptions,
    private readonly rank: number,
    readonly id: string,
    dimension: number,
    layout: FeatureLayout,
  ) {
    this.dimension = dimension;
    this.layout = layout;
    this.batch = Math.max(1, options.batch ?? 1);
  }

  static async load(ort: OnnxRuntime, options: OnnxEmbedderOptions): Promise<OnnxEmbedder> {
    const sessionOptions = {
      intraOpNumThreads: options.threads ?? 1,
      interOpNumThreads: 1,
      executionMode: 'sequential' as const,
      graphOptimizationLevel: 'all' as const,
      logSeverityLevel: 3 as const,
    };
    const session = typeof options.model === 'string' ? await ort.InferenceSession.create(options.model, sessionOptions) : await ort.InferenceSession.create(options.model, sessionOptions);
    try {
      if (!session.inputNames.includes(options.inputName)) throw new Error(`the ONNX model has no input ${options.inputName} (it has ${session.inputNames.join(', ')})`);
      if (!session.outputNames.includes(options.outputName)) throw new Error(`the ONNX model has no output ${options.outputName} (it has ${session.outputNames.join(', ')})`);
      // one probe run tells the output's shape
      const s = options.inputSize;
      const dims = options.inputLayout === 'NHWC' ? [1, s, s, 3] : [1, 3, s, s];
      const probe = await session.run({ [options.inputName]: new ort.Tensor('float32', new Float32Array(3 * s * s), dims) }, [options.outputName]);
      const shape = probe[options.outputName]!.dims;
      let dimension: number;
      let layout: FeatureLayout;
      if (shape.length === 2) {
        dimension = shape[1]!;
        const blocks = options.blocks ?? [dimension];
        if (blocks.reduce((a, b) => a + b, 0) !== dimension) throw new Error(`blocks [${blocks.join(', ')}] do not add up to the output's ${dimension} values`);
        layout = { blocks: [...blocks] };
      } else if (shape.length === 4) {
        const channels = options.outputLayout === 'NCHW' ? shape[1]! : shape[3]!;
        dimension = channels * options.pooling.length;
        layout = { blocks: options.pooling.map(() => channels) };
      } else {
        throw new Error(`output ${options.outputName} has shape [${shape.join(', ')}]; expected [N, D] features or a rank-4 feature map`);
      }
      return new OnnxEmbedder(ort, session, options, shape.length, options.id, dimension, layout);
    } catch (e) {
      await session.release();
      throw e;
    }
  }

  private decode(image: Buffer): Promise<RgbImage> {
    return toSquareRgb(image, { size: this.options.inputSize, maxInputPixels: this.options.maxInputPixels });
  }

  /** One session run over decoded images; features in the same order. */
  private async run(images: readonly { img: RgbImage; mirrored: boolean }[]): Promise<Float32Array[]> {
    const { inputLayout, pixelRange, inputName, outputName, inputSize: s } = this.options;
    const dims = inputLayout === 'NHWC' ? [images.length, s, s, 3] : [images.length, 3, s, s];
    const input = new this.ort.Tensor('float32', imagesToInput(images, inputLayout, pixelRange), dims);
    const result = await this.session.run({ [inputName]: input }, [outputName]);
    const out = result[outputName]!;
    try {
      const data = out.data as Float32Array;
      if (this.rank === 2) return images.map((_, n) => data.slice(n * this.dimension, (n + 1) * this.dimension));
      const [, a, b, c] = out.dims as [number, number, number, number];
      const channels = this.options.outputLayout === 'NCHW' ? a : c;
      const spatial = this.options.outputLayout === 'NCHW' ? b * c : a * b;
      const per = channels * spatial;
      return images.map((_, n) => poolMap(data, n * per, channels, spatial, this.options.outputLayout, this.options.pooling));
    } finally {
      input.dispose();
      out.dispose();
    }
  }

  /** Decodes batch k+1 while the session runs on batch k; `expand` turns a decoded image into the runs it needs. */
  private async each<T>(images: readonly Buffer[], perImage: number, expand: (img: RgbImage) => { img: RgbImage; mirrored: boolean }[], collect: (features: Float32Array[]) => T): Promise<T[]> {
    if (this.disposed) throw new Error('this embedder has been disposed');
    const per = Math.max(1, Math.floor(this.batch / perImage));
    const chunks: Buffer[][] = [];
    for (let i = 0; i < images.length; i += per) chunks.push(images.slice(i, i + per));
    const out: T[] = [];
    const decodeChunk = (chunk: Buffer[]) => {
      const p = Promise.all(chunk.map((b) => this.decode(b)));
      p.catch(() => undefined); // surfaced when awaited
      return p;
    };
    let next = chunks.length ? decodeChunk(chunks[0]!) : null;
    for (let k = 0; k < chunks.length; k++) {
      const decoded = await next!;
      next = k + 1 < chunks.length ? decodeChunk(chunks[k + 1]!) : null;
      const features = await this.run(decoded.flatMap(expand));
      for (let i = 0; i < decoded.length; i++) out.push(collect(features.slice(i * perImage, (i + 1) * perImage)));
    }
    return out;
  }

  embed(images: readonly Buffer[], options: EmbedOptions = {}): Promise<Float32Array[]> {
    const mirrored = options.mirrored === true;
    return this.each(images, 1, (img) => [{ img, mirrored }], ([f]) => f!);
  }

  embedWithMirror(images: readonly Buffer[]): Promise<MirrorPair[]> {
    return this.each(
      images,
      2,
      (img) => [
        { img, mirrored: false },
        { img, mirrored: true },
      ],
      ([original, mirrored]) => ({ original: original!, mirrored: mirrored! }),
    );
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    void this.session.release();
  }
}
