import { cpus } from 'node:os';
import { WorkerEmbedder } from '../../server/src/ml/backbone/worker-embedder.ts';
import { mirrorAverage, type Embedder, type EmbedderConfig } from '../../server/src/ml/index.ts';

/**
 * A pool of embedding worker threads. TF.js's wasm backend runs single-threaded inside Node, so each thread
 * gets its own backend and the pool hands batches to whichever thread is free. Memory stays bounded: at most
 * `threads × batch` decoded images are in flight.
 */
export class EmbeddingPool {
  private constructor(private readonly workers: WorkerEmbedder[]) {}

  static async start(threads = Math.max(1, Math.min(cpus().length, Number(process.env.CARTOUCHE_EMBED_THREADS ?? 2))), config?: EmbedderConfig): Promise<EmbeddingPool> {
    const workers = await Promise.all(Array.from({ length: threads }, () => WorkerEmbedder.start(config)));
    const ids = new Set(workers.map((w) => w.id));
    if (ids.size !== 1) throw new Error(`embedding workers disagree on the embedder: ${[...ids].join(', ')}`);
    return new EmbeddingPool(workers);
  }

  get embedder(): Pick<Embedder, 'id' | 'dimension' | 'layout'> {
    return this.workers[0]!;
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
    return (await this.workers[0]!.embedWithMirror(images)).map(mirrorAverage);
  }

  dispose(): void {
    for (const w of this.workers) w.dispose();
  }
}
