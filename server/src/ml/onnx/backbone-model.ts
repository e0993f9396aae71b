/**
 * The default backbone as an ONNX file: converted at first start from the TF.js graph that ships in the
 * installed `@vladmandic/human` package (no network), then cached. The file name is the cache key: the
 * package version, a hash of its model.json and weights, the converter version and the opset — a new
 * package or converter gives a new file, an old file is never reused for a different source.
 *
 * Converted with `activations: 'fused'` (ONNX HardSwish / HardSigmoid times the leftover scale of the
 * graph's float16 1/6): as faithful as op by op (relative L2 ~1.5e-6 against TF.js, measured) and faster.
 */
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { mkdir, readFile, rename, rm, writeFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { threadId } from 'node:worker_threads';
import { defaultEmbedderConfig, findInNodeModules } from '../backbone/embedder.ts';
import { readModelArtifacts } from '../backbone/model-files.ts';
import { CONVERTER_VERSION, ONNX_OPSET, convertGraphToOnnx } from './tfjs-to-onnx.ts';
import type { WeightSpec } from './weights.ts';

export interface BackboneOnnx {
  /** the cached .onnx file */
  path: string;
  /** the cache key (the file name without extension) */
  key: string;
  /** true when this call converted it, false when the cached file was used */
  built: boolean;
  inputName: string;
  outputName: string;
  /** channels at the feature node; the output has one block of this size per pooling */
  channels: number;
}

interface Sidecar {
  key: string;
  inputName: string;
  outputName: string;
  channels: number;
  source: string;
  humanVersion: string;
  converterVersion: number;
  opset: number;
  builtAt: string;
}

/** The cache key for the installed package and this converter. */
export async function backboneCacheKey(): Promise<{ key: string; humanVersion: string }> {
  const config = defaultEmbedderConfig();
  const pkg = JSON.parse(await readFile(findInNodeModules('@vladmandic/human/package.json'), 'utf8')) as { version: string };
  const json = await readFile(config.modelJson);
  const manifest = JSON.parse(json.toString('utf8')) as { weightsManifest: { paths: string[] }[] };
  const hash = createHash('sha256').update(json);
  for (const group of manifest.weightsManifest) for (const p of group.paths) hash.update(await readFile(join(dirname(config.modelJson), p)));
  const pooling = (config.pooling ?? []).map((p) => (p === 'avg' ? 'ap' : 'mp')).join('-');
  return {
    key: `centernet-b14-${pooling}_human-${pkg.version}-${hash.digest('hex').slice(0, 10)}_c${CONVERTER_VERSION}-op${ONNX_OPSET}`,
    humanVersion: pkg.version,
  };
}

/** The cached ONNX backbone under `cacheDir`, converting it first when it is not there yet. */
export async function ensureBackboneOnnx(cacheDir: string): Promise<BackboneOnnx> {
  const { key, humanVersion } = await backboneCacheKey();
  const path = join(cacheDir, `${key}.onnx`);
  const sidecarPath = join(cacheDir, `${key}.json`);
  if (existsSync(path) && existsSync(sidecarPath)) {
    const s = JSON.parse(await readFile(sidecarPath, 'utf8')) as Sidecar;
    if (s.key === key) return { path, key, built: false, inputName: s.inputName, outputName: s.outputName, channels: s.channels };
  }
  const config = defaultEmbedderConfig();
  const artifacts = await readModelArtifacts(config.modelJson);
  const converted = convertGraphToOnnx(
    { modelTopology: artifacts.modelTopology, weightSpecs: (artifacts.weightSpecs ?? []) as WeightSpec[], weightData: artifacts.weightData as ArrayBuffer },
    { inputNode: config.inputNode, featureNode: config.featureNode, pooling: config.pooling, activations: 'fused', docString: `@vladmandic/human ${humanVersion} models/centernet.json, ${config.inputNode} → ${config.featureNode}, pooled ${config.pooling?.join('+')}` },
  );
  await mkdir(cacheDir, { recursive: true });
  // written under a name of its own, then renamed: several threads or processes may build at once
  const tmp = `${path}.${process.pid}-${threadId}.tmp`;
  const tmpSidecar = `${sidecarPath}.${process.pid}-${threadId}.tmp`;
  const sidecar: Sidecar = {
    key,
    inputName: converted.inputName,
    outputName: converted.outputName,
    channels: converted.channels,
    source: config.modelJson,
    humanVersion,
    converterVersion: CONVERTER_VERSION,
    opset: ONNX_OPSET,
    builtAt: new Date().toISOString(),
  };
  try {
    await writeFile(tmp, converted.bytes);
    await writeFile(tmpSidecar, `${JSON.stringify(sidecar, null, 2)}\n`);
    await rename(tmp, path);
    await rename(tmpSidecar, sidecarPath);
  } finally {
    await rm(tmp, { force: true });
    await rm(tmpSidecar, { force: true });
  }
  return { path, key, built: true, inputName: converted.inputName, outputName: converted.outputName, channels: converted.channels };
}
