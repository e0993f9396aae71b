/**
 * The built-in backbone on the runtime the configuration asks for. On `onnx`: load onnxruntime-node,
 * convert (or reuse the cached) ONNX file, start a session, and check its features of the probe image
 * against TF.js's (relative L2 below 1e-4) — any failure on that way gives the TF.js wasm embedder
 * instead, with the reason logged and recorded in its status (shown by /api/health).
 */
import { logger } from '../../logger.ts';
import { AGREEMENT_TOLERANCE, agreement, probeImage, type Agreement } from '../onnx/agreement.ts';
import { ensureBackboneOnnx } from '../onnx/backbone-model.ts';
import { OnnxEmbedder } from '../onnx/onnx-embedder.ts';
import { loadOnnxRuntime } from '../onnx/runtime.ts';
import {
  ONNX_EMBEDDER_ID,
  createEmbedder,
  defaultEmbedderConfig,
  recordEmbedderStatus,
  type BuiltinEmbedderConfig,
  type Embedder,
} from './embedder.ts';
import { defaultModelCacheDir } from './selection.ts';

/** ONNX against TF.js on the probe image and its mirror image. */
export async function checkAgainstTfjs(onnxEmbedder: Embedder): Promise<Agreement> {
  const probe = await probeImage();
  const tfjs = await createEmbedder(defaultEmbedderConfig());
  try {
    const [reference] = await tfjs.embedWithMirror([probe]);
    const [candidate] = await onnxEmbedder.embedWithMirror([probe]);
    return agreement([candidate!.original, candidate!.mirrored], [reference!.original, reference!.mirrored]);
  } finally {
    tfjs.dispose();
  }
}

async function tfjsEmbedder(requested: string, fallbackReason: string | null): Promise<Embedder> {
  const embedder = await createEmbedder(defaultEmbedderConfig());
  recordEmbedderStatus(embedder, { id: embedder.id, runtime: 'tfjs', requested, fallbackReason, verification: null });
  return embedder;
}

export async function createBuiltinEmbedder(config: BuiltinEmbedderConfig, projectRoot: string): Promise<Embedder> {
  if (config.runtime !== 'onnx' && config.runtime !== 'tfjs') throw new Error(`the built-in embedder runs on onnx or tfjs, not ${JSON.stringify(config.runtime)}`);
  if (config.runtime === 'tfjs') return tfjsEmbedder(config.fallbackReason ? 'onnx' : 'tfjs', config.fallbackReason ?? null);
  if (config.fallbackReason) return tfjsEmbedder('onnx', config.fallbackReason);
  let onnxEmbedder: OnnxEmbedder | null = null;
  try {
    const ort = await loadOnnxRuntime();
    const model = await ensureBackboneOnnx(config.cacheDir ?? defaultModelCacheDir(projectRoot));
    const tfjs = defaultEmbedderConfig();
    onnxEmbedder = await OnnxEmbedder.load(ort, {
      model: model.path,
      inputName: model.inputName,
      outputName: model.outputName,
      inputSize: tfjs.inputSize,
      inputLayout: 'NHWC',
      outputLayout: 'NCHW',
      pixelRange: tfjs.pixelRange ?? '0-255',
      pooling: tfjs.pooling ?? ['avg', 'max'],
      blocks: (tfjs.pooling ?? ['avg', 'max']).map(() => model.channels),
      id: ONNX_EMBEDDER_ID,
      threads: 1,
      batch: config.batch,
    });
    let verification: Agreement | null = config.verify === false ? (config.verified ?? null) : null;
    if (config.verify !== false) {
      verification = await checkAgainstTfjs(onnxEmbedder);
      if (!(verification.relativeL2 < AGREEMENT_TOLERANCE)) {
        throw new Error(`the ONNX backbone disagrees with TF.js on the probe image: relative L2 ${verification.relativeL2.toExponential(2)}, limit ${AGREEMENT_TOLERANCE.toExponential(0)}`);
      }
    }
    recordEmbedderStatus(onnxEmbedder, { id: onnxEmbedder.id, runtime: 'onnx', requested: 'onnx', fallbackReason: null, verification, detail: `${model.path}${model.built ? ' (converted now)' : ''}` });
    return onnxEmbedder;
  } catch (e) {
    onnxEmbedder?.dispose();
    const reason = (e as Error).message;
    logger.warn({ reason }, 'the ONNX embedder is not available; embedding with TF.js wasm instead');
    return tfjsEmbedder('onnx', reason);
  }
}
