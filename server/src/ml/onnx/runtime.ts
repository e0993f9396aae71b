/**
 * Loading onnxruntime-node (its CPU binaries ship inside the npm package; nothing is downloaded). Loading
 * can fail — no binary for this platform, a C library mismatch — and the callers then fall back to
 * TF.js. `CARTOUCHE_DISABLE_ONNXRUNTIME=1` makes loading fail on purpose (to run a site on TF.js only,
 * and to test the fallback).
 */
import type * as Ort from 'onnxruntime-node';

export type OnnxRuntime = typeof Ort;

export const DISABLE_SWITCH = 'CARTOUCHE_DISABLE_ONNXRUNTIME';

let loaded: Promise<OnnxRuntime> | null = null;

/** The onnxruntime-node module, loaded once per thread; rejects with a plain reason when it cannot load. */
export function loadOnnxRuntime(env: NodeJS.ProcessEnv = process.env): Promise<OnnxRuntime> {
  if (env[DISABLE_SWITCH] === '1' || env[DISABLE_SWITCH] === 'true') {
    return Promise.reject(new Error(`onnxruntime-node is switched off (${DISABLE_SWITCH}=${env[DISABLE_SWITCH]})`));
  }
  loaded ??= (async () => {
    try {
      const m = (await import('onnxruntime-node')) as OnnxRuntime & { default?: OnnxRuntime };
      const ort = m.default ?? m;
      if (typeof ort.InferenceSession?.create !== 'function') throw new Error('the module has no InferenceSession');
      return ort;
    } catch (e) {
      throw new Error(`onnxruntime-node could not be loaded: ${(e as Error).message}`);
    }
  })();
  loaded.catch(() => (loaded = null));
  return loaded;
}
