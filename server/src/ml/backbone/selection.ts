/**
 * Which embedder a process uses, from its environment:
 * - `CARTOUCHE_EMBEDDER_CONFIG`: a JSON file naming another model (any `EmbedderConfig`); it wins over
 *   the setting below;
 * - `CARTOUCHE_EMBEDDER`: the built-in backbone's runtime, `onnx` (default; falls back to TF.js with a
 *   recorded reason) or `tfjs`;
 * - `CARTOUCHE_MODEL_CACHE_DIR`: where the converted ONNX file is kept (default `<data dir>/models`).
 * The API and the night-shift worker read the same variables, so they store features of the same id.
 */
import { readFile } from 'node:fs/promises';
import { z } from 'zod';
import { join } from 'node:path';
import { PROJECT_ROOT, type EmbedderConfig, type EmbedderRuntime } from './embedder.ts';

export interface EmbedderSelection {
  runtime: EmbedderRuntime;
  /** a JSON file with another embedder's configuration, or null */
  configFile: string | null;
  modelCacheDir: string;
}

/** The default folder for converted models: `<data dir>/models` (`CARTOUCHE_DATA_DIR`, default `<project>/.data`). */
export function defaultModelCacheDir(projectRoot = PROJECT_ROOT, env: NodeJS.ProcessEnv = process.env): string {
  return env.CARTOUCHE_MODEL_CACHE_DIR || join(env.CARTOUCHE_DATA_DIR || join(projectRoot, '.data'), 'models');
}

const RUNTIMES: readonly EmbedderRuntime[] = ['onnx', 'tfjs'];

/** Reads the embedder settings; throws a plain message for a value it does not know. */
export function embedderSelectionFromEnv(env: NodeJS.ProcessEnv = process.env, projectRoot = PROJECT_ROOT): EmbedderSelection {
  const raw = (env.CARTOUCHE_EMBEDDER ?? 'onnx').trim().toLowerCase();
  if (!RUNTIMES.includes(raw as EmbedderRuntime)) throw new Error(`CARTOUCHE_EMBEDDER must be onnx or tfjs, got ${JSON.stringify(env.CARTOUCHE_EMBEDDER)}`);
  return { runtime: raw as EmbedderRuntime, configFile: env.CARTOUCHE_EMBEDDER_CONFIG || null, modelCacheDir: defaultModelCacheDir(projectRoot, env) };
}

const pixelRange = z.enum(['0-255', '0-1', '-1-1']);
const pooling = z.array(z.enum(['avg', 'max'])).min(1);
const common = { inputSize: z.number().int().min(16).max(4096), pixelRange: pixelRange.optional(), pooling: pooling.optional(), id: z.string().min(1).max(120).optional(), maxInputPixels: z.number().int().positive().optional() };
const backend = z.enum(['wasm', 'cpu']).optional();

const configSchema = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('tfjs-graph'), modelJson: z.string().min(1), inputNode: z.string().min(1), featureNode: z.string().min(1), dynamicInput: z.boolean().optional(), channels: z.number().int().positive().optional(), backend, ...common }),
  z.strictObject({ kind: z.literal('tfjs-layers'), modelJson: z.string().min(1), featureLayer: z.string().min(1).optional(), backend, ...common }),
  z.strictObject({
    kind: z.literal('onnx'),
    modelPath: z.string().min(1),
    inputName: z.string().min(1),
    outputName: z.string().min(1),
    inputLayout: z.enum(['NHWC', 'NCHW']).optional(),
    outputLayout: z.enum(['NHWC', 'NCHW']).optional(),
    blocks: z.array(z.number().int().positive()).min(1).optional(),
    threads: z.number().int().min(1).max(64).optional(),
    batch: z.number().int().min(1).max(256).optional(),
    ...common,
    id: z.string().min(1).max(120),
  }),
  z.strictObject({ kind: z.literal('builtin'), runtime: z.enum(['onnx', 'tfjs']), cacheDir: z.string().min(1).optional(), verify: z.boolean().optional(), batch: z.number().int().min(1).max(256).optional() }),
]);

/** Checks an embedder configuration read from JSON; the error names the file and each wrong field. */
export function parseEmbedderConfig(value: unknown, source = 'the embedder configuration'): EmbedderConfig {
  const r = configSchema.safeParse(value);
  if (!r.success) {
    const problems = r.error.issues.map((i) => `${i.path.length ? i.path.join('.') : '(top level)'}: ${i.message}`).join('; ');
    throw new Error(`${source} is not a valid embedder configuration — ${problems}`);
  }
  return r.data as EmbedderConfig;
}

/** The configuration the selection names: the file's, or the built-in backbone on the chosen runtime. */
export async function selectedEmbedderConfig(selection: EmbedderSelection = embedderSelectionFromEnv()): Promise<EmbedderConfig> {
  if (selection.configFile) {
    let text: string;
    try {
      text = await readFile(selection.configFile, 'utf8');
    } catch (e) {
      throw new Error(`CARTOUCHE_EMBEDDER_CONFIG names ${selection.configFile}, which cannot be read: ${(e as Error).message}`);
    }
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch (e) {
      throw new Error(`${selection.configFile} is not JSON: ${(e as Error).message}`);
    }
    return parseEmbedderConfig(json, selection.configFile);
  }
  return { kind: 'builtin', runtime: selection.runtime, cacheDir: selection.modelCacheDir };
}
