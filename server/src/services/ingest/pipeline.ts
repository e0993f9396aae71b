/**
 * Overlapping intake and embedding inside one night-shift run: the files are ingested by a few lanes at once
 * (sharp decodes on libuv's thread pool, one image per lane), and each item ingested hands its small embedding
 * input to a feeder that keeps the embedding pool's threads busy meanwhile, instead of waiting for the whole
 * drop folder before the first feature is computed.
 */

/** What the feeder needs of an embedding pool (jobs/src/embed-pool.ts's EmbeddingPool has it). */
export interface PoolLike {
  readonly size: number;
  embedAll<T>(
    jobs: readonly T[],
    load: (job: T) => Promise<Buffer>,
    onBatch: (done: Array<{ job: T; feature: Float32Array }>) => Promise<void>,
    opts?: { batch?: number; shouldStop?: () => Promise<boolean> },
  ): Promise<number>;
}

export interface FeederOptions {
  /** images per thread per hand-over (the wasm backend gains nothing from larger batches, measured) */
  batch?: number;
  /** hand-overs in flight at once, so no thread waits for the next while one is being stored */
  inFlight?: number;
  /** most jobs waiting; `push` waits while the queue is this long (bounds the memory) */
  maxQueued?: number;
  shouldStop?: () => Promise<boolean>;
}

/**
 * Feeds jobs to the pool as they arrive, in hand-overs of `pool.size × batch` jobs (`embedAll` spreads one
 * over the threads). `push` returns at once unless the queue is full; `finish` embeds what is left and waits
 * for everything, then throws the first failure, if there was one (the jobs of a failed hand-over stay
 * unembedded, for the next attempt to find).
 */
export class EmbedFeeder<T> {
  private readonly queue: T[] = [];
  private running = 0;
  private finishing = false;
  private failure: Error | null = null;
  private waiters: Array<() => void> = [];
  private readonly batch: number;
  private readonly inFlight: number;
  private readonly maxQueued: number;
  private readonly chunk: number;

  constructor(
    private readonly pool: PoolLike,
    private readonly load: (job: T) => Promise<Buffer>,
    private readonly onBatch: (done: Array<{ job: T; feature: Float32Array }>) => Promise<void>,
    private readonly opts: FeederOptions = {},
  ) {
    this.batch = Math.max(1, opts.batch ?? 2);
    this.inFlight = Math.max(1, opts.inFlight ?? 2);
    this.chunk = pool.size * this.batch;
    this.maxQueued = Math.max(this.chunk, opts.maxQueued ?? 64);
  }

  get failed(): Error | null {
    return this.failure;
  }

  /** Queues one job; waits only while the queue is full. */
  async push(job: T): Promise<void> {
    while (this.queue.length >= this.maxQueued && !this.failure) await this.changed();
    if (this.failure) return;
    this.queue.push(job);
    this.pump();
  }

  /** Embeds what is queued, waits for every hand-over in flight, and throws the first failure. */
  async finish(): Promise<void> {
    this.finishing = true;
    this.pump();
    while (this.running > 0 || (this.queue.length > 0 && !this.failure)) await this.changed();
    if (this.failure) throw this.failure;
  }

  private changed(): Promise<void> {
    return new Promise((resolve) => this.waiters.push(resolve));
  }

  private wake(): void {
    const w = this.waiters;
    this.waiters = [];
    for (const f of w) f();
  }

  private pump(): void {
    while (!this.failure && this.running < this.inFlight && (this.queue.length >= this.chunk || (this.finishing && this.queue.length > 0))) {
      const jobs = this.queue.splice(0, this.chunk);
      this.running++;
      this.pool
        .embedAll(jobs, this.load, this.onBatch, { batch: this.batch, shouldStop: this.opts.shouldStop })
        .catch((err: unknown) => {
          this.failure ??= err instanceof Error ? err : new Error(String(err));
        })
        .finally(() => {
          this.running--;
          this.pump();
          this.wake();
        });
    }
    this.wake();
  }
}

/** Runs `work` over `items` with at most `lanes` at once, in order of `items`; one item's failure is its own business. */
export async function inLanes<T>(items: readonly T[], lanes: number, work: (item: T, index: number) => Promise<void>, shouldStop?: () => Promise<boolean>): Promise<void> {
  let next = 0;
  let stopped = false;
  const lane = async () => {
    while (!stopped && next < items.length) {
      if (shouldStop && (await shouldStop())) {
        stopped = true;
        return;
      }
      const i = next++;
      await work(items[i]!, i);
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(lanes, items.length)) }, lane));
}
