/**
 * An embedder running in a worker_thread: the same configured embedder, built inside the worker (each
 * thread has its own TF.js and wasm instance, or its own single-threaded onnxruntime session), driven by
 * messages. Both runtimes block the thread they run on, so the API process and the night-shift pool
 * embed here, never on their main thread; N workers are how one machine uses N cores.
 *
 * The worker thread does not keep the process alive while it is idle (it is referenced only while a
 * request is pending).
 *
 * This file is both the client (main thread) and the worker entry (when started with the marker in
 * `workerData`).
 */
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads';
import type { FeatureLayout } from '../centring.ts';
import { createEmbedder, embedderStatus, recordEmbedderStatus, type EmbedOptions, type Embedder, type EmbedderConfig, type EmbedderStatus, type MirrorPair } from './embedder.ts';

const MARKER = 'cartouche-embed-worker';

type Request = { id: number; op: 'embed'; images: Uint8Array[]; mirrored: boolean } | { id: number; op: 'pairs'; images: Uint8Array[] };
type RequestBody = Request extends infer R ? (R extends Request ? Omit<R, 'id'> : never) : never;
type Reply =
  | { id: number; ok: true; features?: Float32Array[]; pairs?: { original: Float32Array; mirrored: Float32Array }[] }
  | { id: number; ok: false; error: string };
type Ready = { ready: true; id: string; dimension: number; layout: FeatureLayout; status: EmbedderStatus } | { ready: false; error: string };

/** tsx's ESM register API (the package's `./esm/api` import entry). */
function tsxEsmApi(): string {
  const pkg = createRequire(import.meta.url).resolve('tsx/package.json');
  return pathToFileURL(join(dirname(pkg), 'dist', 'esm', 'api', 'index.mjs')).href;
}

export class WorkerEmbedder implements Embedder {
  private nextId = 1;
  private readonly pending = new Map<number, { resolve: (r: Reply) => void; reject: (e: Error) => void }>();
  private closed = false;

  private constructor(
    private readonly worker: Worker,
    readonly id: string,
    readonly dimension: number,
    readonly layout: FeatureLayout,
    /** what the worker built: runtime, and after a fallback the reason */
    readonly status: EmbedderStatus,
  ) {
    recordEmbedderStatus(this, status);
    worker.unref();
    worker.on('message', (r: Reply) => {
      const p = this.pending.get(r.id);
      if (!p) return;
      this.pending.delete(r.id);
      if (this.pending.size === 0) worker.unref();
      p.resolve(r);
    });
    worker.on('error', (e) => this.failAll(e));
    worker.on('exit', (code) => this.failAll(new Error(`the embedding worker exited (code ${code})`)));
  }

  /** Starts a worker thread and builds the configured embedder inside it (default: the built-in backbone on ONNX, TF.js fallback). */
  static async start(config?: EmbedderConfig): Promise<WorkerEmbedder> {
    const url = new URL(import.meta.url);
    const options = { workerData: { marker: MARKER, config } };
    // running from TypeScript sources: the worker registers tsx's loader first, then imports this file
    const worker = url.pathname.endsWith('.ts')
      ? new Worker(
          `import(${JSON.stringify(tsxEsmApi())}).then((m) => { m.register(); return import(${JSON.stringify(url.href)}); });`,
          { ...options, eval: true },
        )
      : new Worker(url, options);
    const ready = await new Promise<Ready>((resolve, reject) => {
      worker.once('message', resolve);
      worker.once('error', reject);
      worker.once('exit', (code) => reject(new Error(`the embedding worker exited while starting (code ${code})`)));
    });
    if (!ready.ready) {
      await worker.terminate();
      throw new Error(`the embedding worker could not start: ${ready.error}`);
    }
    return new WorkerEmbedder(worker, ready.id, ready.dimension, ready.layout, ready.status);
  }

  private failAll(e: Error): void {
    this.closed = true;
    for (const p of this.pending.values()) p.reject(e);
    this.pending.clear();
  }

  private call(req: RequestBody): Promise<Reply> {
    if (this.closed) return Promise.reject(new Error('this embedder has been disposed'));
    const id = this.nextId++;
    return new Promise<Reply>((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      this.worker.ref();
      this.worker.postMessage({ ...req, id });
    });
  }

  async embed(images: readonly Buffer[], options: EmbedOptions = {}): Promise<Float32Array[]> {
    const r = await this.call({ op: 'embed', images: images.map((b) => new Uint8Array(b)), mirrored: options.mirrored === true });
    if (!r.ok) throw new Error(r.error);
    return r.features!;
  }

  async embedWithMirror(images: readonly Buffer[]): Promise<MirrorPair[]> {
    const r = await this.call({ op: 'pairs', images: images.map((b) => new Uint8Array(b)) });
    if (!r.ok) throw new Error(r.error);
    return r.pairs!;
  }

  dispose(): void {
    if (this.closed) return;
    this.closed = true;
    void this.worker.terminate();
  }
}

/**
 * Starts `count` worker embedders for one configuration, all with the same embedder id. For the built-in
 * ONNX backbone the start-up check against TF.js runs in a thread of its own that then exits, taking
 * TF.js's wasm heap with it (about 150 MB, measured); the serving threads start ONNX without loading
 * TF.js and report the check's result — or, when the check fell back, start TF.js with its reason (the
 * checking thread, already on TF.js, becomes the first of them).
 */
export async function startWorkerEmbedders(config: EmbedderConfig, count: number): Promise<WorkerEmbedder[]> {
  const n = Math.max(1, Math.floor(count));
  const starts = (c: EmbedderConfig, k: number) => Promise.all(Array.from({ length: k }, () => WorkerEmbedder.start(c)));
  const dispose = (ws: WorkerEmbedder[]) => ws.forEach((w) => w.dispose());
  if (config.kind !== 'builtin' || config.runtime !== 'onnx' || config.verify === false || config.fallbackReason) {
    return settleAll(Array.from({ length: n }, () => WorkerEmbedder.start(config)), dispose);
  }
  const checker = await WorkerEmbedder.start(config);
  const s = checker.status;
  if (s.runtime !== 'onnx') {
    const rest = await starts({ ...config, runtime: 'tfjs', fallbackReason: s.fallbackReason ?? 'the ONNX embedder did not start' }, n - 1).catch((e: unknown) => {
      checker.dispose();
      throw e;
    });
    return [checker, ...rest];
  }
  checker.dispose();
  return settleAll(
    Array.from({ length: n }, () => WorkerEmbedder.start({ ...config, verify: false, verified: s.verification ?? undefined })),
    dispose,
  );
}

/** All of the starts, or — when one fails — none: the ones that did start are stopped. */
async function settleAll(starts: Promise<WorkerEmbedder>[], dispose: (ws: WorkerEmbedder[]) => void): Promise<WorkerEmbedder[]> {
  const results = await Promise.allSettled(starts);
  const ok = results.flatMap((r) => (r.status === 'fulfilled' ? [r.value] : []));
  const failed = results.find((r): r is PromiseRejectedResult => r.status === 'rejected');
  if (failed) {
    dispose(ok);
    throw failed.reason;
  }
  return ok;
}

async function serve(): Promise<void> {
  const port = parentPort!;
  let embedder: Embedder;
  try {
    embedder = await createEmbedder((workerData as { config?: EmbedderConfig }).config);
  } catch (e) {
    port.postMessage({ ready: false, error: (e as Error).message } satisfies Ready);
    return;
  }
  port.postMessage({ ready: true, id: embedder.id, dimension: embedder.dimension, layout: embedder.layout, status: embedderStatus(embedder) } satisfies Ready);
  // one request at a time, in order (the backbone is synchronous anyway)
  let chain = Promise.resolve();
  port.on('message', (req: Request) => {
    chain = chain.then(async () => {
      try {
        const images = req.images.map((u) => Buffer.from(u.buffer, u.byteOffset, u.byteLength));
        if (req.op === 'embed') {
          const features = await embedder.embed(images, { mirrored: req.mirrored });
          port.postMessage({ id: req.id, ok: true, features } satisfies Reply, features.map((f) => f.buffer as ArrayBuffer));
        } else {
          const pairs = await embedder.embedWithMirror(images);
          port.postMessage({ id: req.id, ok: true, pairs } satisfies Reply);
        }
      } catch (e) {
        port.postMessage({ id: req.id, ok: false, error: (e as Error).message } satisfies Reply);
      }
    });
  });
}

if (!isMainThread && (workerData as { marker?: string } | null)?.marker === MARKER) void serve();
