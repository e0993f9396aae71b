import { cpus } from 'node:os';
import { logger } from '../../server/src/logger.ts';
import { startWorkerEmbedders, type WorkerEmbedder } from '../../server/src/ml/backbone/worker-embedder.ts';
import { selectedEmbedderConfig } from '../../server/src/ml/backbone/selection.ts';
import { mirrorAverage, type Embedder, type EmbedderConfig, type EmbedderStatus } from '../../server/src/ml/index.ts';

/**
 * A pool of embedding worker threads, one embedder each: a single-threaded onnxruntime session (the
 * default) or a TF.js wasm backend. Both block the thread they run on, and neither uses more than one
 * core, so each thread gets its own and the pool hands batches to whichever thread is free. Memory stays
 * bounded: at most `threads × batch` decoded images are in flight.
 *
 * For the built-in ONNX backbone the conversion (first start) and the check against TF.js happen once, in
 * a thread that then exits; every serving thread starts the same runtime — ONNX, or TF.js with the same
 * reason after a fallback — so all threads share one embedder id (see `startWorkerEmbedders`).
 */
export class EmbeddingPool {
  private constructor(private readonly workers: WorkerEmbedder[]) {}

  static async start(threads = Math.max(1, Math.min(cpus().length, Number(process.env.CARTOUCHE_EMBED_THREADS ?? 2))), config?: EmbedderConfig): Promise<EmbeddingPool> {
    const workers = await startWorkerEmbedders(config ?? (await selectedEmbedderConfig()), threads);
    const first = workers[0]!;
    const ids = new Set(workers.map((w) => w.id));
    if (ids.size !== 1) {
      for (const w of workers) w.dispose();
      throw new Error(`embedding workers disagree on the embedder: ${[...ids].join(', ')}`);
    }
    const s = first.status;
    const log = { embedder: s.id, runtime: s.runtime, threads: workers.length, fallbackReason: s.fallbackReason ?? undefined, relativeL2: s.verification?.relativeL2 };
    if (s.fallbackReason) logger.warn(log, 'embedding pool started on the fallback runtime');
    else logger.info(log, 'embedding pool started');
    return new EmbeddingPool(workers);
  }

  get embedder(): Pick<Embedder, 'id' | 'dimension' | 'layout'> {
    return this.workers[0]!;
  }

  /** Which runtime the threads use and, after a fallback, why. */
  get status(): EmbedderStatus {
    return this.workers[0]!.status;
  }

  get size(): number {
    return this.workers.length;
  }

  /**
   * Embeds jobs in batches spread over the threads; `onBatch` receives each finished batch in the order
   * it finished (store it there, so an interrupted run keeps what it has done).
   */
  async embedAll<T>(jobs: readonly T[], load: (job: T) => Promise<Buffer>, onBatch: (done: Array<{ job: T; feature: Float32Array }>) => Promise<void>, opts: { batch?: number; shouldStop?: () => Promise<boolean> } = {}): Promise<number> {
    const batch = opts.batch ?? 8;
    let next = 0;
    let embedded = 0;
    const runWorker = async (worker: WorkerEmbedder) => {
      while (next < jobs.length) {
        if (await opts.shouldStop?.()) return;
        const slice = jobs.slice(next, next + batch);
        next += slice.length;
        const images = await Promise.all(slice.map(load));
        const features = await worker.embed(images);
        await onBatch(slice.map((job, i) => ({ job, feature: features[i]! })));
        embedded += slice.length;
      }
    };
    await Promise.all(this.workers.map(runWorker));
    return embedded;
  }

  /** Features of examples: each image and its mirror image, averaged (mirrored copies are free and help slightly). */
  async embedExamples(images: readonly Buffer[]): Promise<Float32Array[]> {
    if (images.length === 0) return [];
    // split into one contiguous share per thread, so the order of the result is the order of the images
    const per = Math.ceil(images.length / this.workers.length);
    const shares = this.workers.map((w, k) => ({ w, part: images.slice(k * per, (k + 1) * per) })).filter((s) => s.part.length > 0);
    const done = await Promise.all(shares.map(({ w, part }) => w.embedWithMirror(part)));
    return done.flat().map(mirrorAverage);
  }

  dispose(): void {
    for (const w of this.workers) w.dispose();
  }
}
