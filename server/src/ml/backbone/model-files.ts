/**
 * Loading TF.js models from files (a `model.json` plus its weight shards) with a file IO handler: no URL,
 * no fetch. Also the graph edit that lets the CenterNet backbone run at any input size.
 */
import { readFile } from 'node:fs/promises';
import { dirname, resolve } from 'node:path';
import type { io } from '@tensorflow/tfjs';

type ModelArtifacts = io.ModelArtifacts;
type IOHandler = io.IOHandler;

interface ModelJson {
  format?: string;
  generatedBy?: string;
  convertedBy?: string | null;
  signature?: unknown;
  userDefinedMetadata?: Record<string, unknown>;
  modelInitializer?: unknown;
  modelTopology: unknown;
  weightsManifest: { paths: string[]; weights: io.WeightsManifestEntry[] }[];
}

/** Reads model.json and every weight shard it lists (paths relative to the JSON file) into model artifacts. */
export async function readModelArtifacts(modelJsonPath: string): Promise<ModelArtifacts> {
  const json = JSON.parse(await readFile(modelJsonPath, 'utf8')) as ModelJson;
  if (!json.modelTopology || !Array.isArray(json.weightsManifest)) throw new Error(`${modelJsonPath} is not a TF.js model.json`);
  const dir = dirname(modelJsonPath);
  const weightSpecs: io.WeightsManifestEntry[] = [];
  const shards: Buffer[] = [];
  for (const group of json.weightsManifest) {
    weightSpecs.push(...group.weights);
    for (const p of group.paths) shards.push(await readFile(resolve(dir, p)));
  }
  const all = Buffer.concat(shards);
  const weightData = all.buffer.slice(all.byteOffset, all.byteOffset + all.byteLength) as ArrayBuffer;
  const artifacts: ModelArtifacts = {
    modelTopology: json.modelTopology as ModelArtifacts['modelTopology'],
    weightSpecs,
    weightData,
    format: json.format,
    generatedBy: json.generatedBy,
    convertedBy: json.convertedBy ?? null,
  };
  if (json.signature) artifacts.signature = json.signature as object;
  if (json.userDefinedMetadata) artifacts.userDefinedMetadata = json.userDefinedMetadata as ModelArtifacts['userDefinedMetadata'];
  if (json.modelInitializer) artifacts.modelInitializer = json.modelInitializer as object;
  return artifacts;
}

/** An IOHandler that reads a model from the file system, optionally editing the artifacts before TF.js builds the model. */
export function fileModelHandler(modelJsonPath: string, edit?: (a: ModelArtifacts) => ModelArtifacts): IOHandler {
  return {
    load: async () => {
      const a = await readModelArtifacts(modelJsonPath);
      return edit ? edit(a) : a;
    },
  };
}

interface GraphNode {
  name: string;
  op: string;
  input?: string[];
  attr?: Record<string, { shape?: { dim?: { size: string }[] } } & Record<string, unknown>>;
}
interface TensorInfo {
  name?: string;
  tensorShape?: { dim?: { size: string }[] };
}

/**
 * Makes the spatial dimensions (height, width; NHWC axes 1 and 2) of an input placeholder dynamic (-1) in
 * both the node's `shape` attribute and the model signature, so a convolutional backbone runs at any size.
 * Throws when the placeholder is missing or is not rank 4.
 */
export function makeSpatialDimsDynamic(artifacts: ModelArtifacts, inputName: string): ModelArtifacts {
  const topology = artifacts.modelTopology as { node?: GraphNode[] } | undefined;
  const node = topology?.node?.find((n) => n.name === inputName);
  if (!node || node.op !== 'Placeholder') throw new Error(`the graph has no placeholder named ${inputName}`);
  const dims = node.attr?.shape?.shape?.dim;
  if (!dims || dims.length !== 4) throw new Error(`placeholder ${inputName} is not rank 4 (NHWC)`);
  dims[1] = { size: '-1' };
  dims[2] = { size: '-1' };
  const signature = artifacts.signature as { inputs?: Record<string, TensorInfo> } | undefined;
  const sigDims = signature?.inputs?.[inputName]?.tensorShape?.dim;
  if (sigDims && sigDims.length === 4) {
    sigDims[1] = { size: '-1' };
    sigDims[2] = { size: '-1' };
  }
  return artifacts;
}

/** Names of the nodes of a graph model's topology (to check a configured feature node exists). */
export function graphNodeNames(artifacts: ModelArtifacts): string[] {
  const topology = artifacts.modelTopology as { node?: GraphNode[] } | undefined;
  return (topology?.node ?? []).map((n) => n.name);
}
