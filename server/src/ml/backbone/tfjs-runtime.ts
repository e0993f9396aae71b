/**
 * TensorFlow.js runtime for the backbone: the WebAssembly backend, its binaries read from the installed
 * `@tensorflow/tfjs-backend-wasm` package (never fetched). Works in the main thread and inside a
 * worker_thread (each thread gets its own wasm instance).
 *
 * How the binaries are found: in Node the wasm factory reads files with `fs` when given a plain file path
 * prefix and `usePlatformFetch` is false, so `setWasmPaths(<package>/dist/)` loads
 * `tfjs-backend-wasm-simd.wasm` (or the plain one without SIMD) from disk. The threaded build is not used
 * in Node (the backend reports no multithreading support there).
 */
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import * as tf from '@tensorflow/tfjs';
import { setWasmPaths } from '@tensorflow/tfjs-backend-wasm';

export type BackendName = 'wasm' | 'cpu';

const require = createRequire(import.meta.url);

/** The folder holding the wasm binaries of the installed backend package (ends with a separator). */
export function wasmBinaryFolder(): string {
  // the package's main entry is dist/tf-backend-wasm.node.js, next to the .wasm files
  return join(dirname(require.resolve('@tensorflow/tfjs-backend-wasm')), '/');
}

let pending: Promise<BackendName> | null = null;
let pathsSet = false;

/**
 * Selects the TF.js backend once per thread (wasm by default; `cpu` is the pure-JS fallback, ~25× slower).
 * Later calls return the backend already chosen.
 */
export function ensureBackend(preferred: BackendName = 'wasm'): Promise<BackendName> {
  if (!pending) {
    pending = (async () => {
      if (preferred === 'wasm' && !pathsSet) {
        setWasmPaths(wasmBinaryFolder(), false);
        pathsSet = true;
      }
      const ok = await tf.setBackend(preferred);
      if (!ok) throw new Error(`the TF.js ${preferred} backend could not be initialised`);
      await tf.ready();
      return preferred;
    })();
    pending.catch(() => (pending = null));
  }
  return pending;
}

export { tf };
