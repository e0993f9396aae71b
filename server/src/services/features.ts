import { readFile } from 'node:fs/promises';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import {
  RunningMean,
  exampleCentre,
  featureFromBuffer,
  featureToBuffer,
  mirrorAverage,
  prepareFeature,
  prepareMatrix,
  scanCentre,
  type CollectionCentres,
  type Embedder,
  type EmbedderStatus,
} from '../ml/index.ts';
import { selectedEmbedderConfig } from '../ml/backbone/selection.ts';
import { startWorkerEmbedders, type WorkerEmbedder } from '../ml/backbone/worker-embedder.ts';
import { logger } from '../logger.ts';
import { Embedding } from '../models/index.ts';
import type { Storage } from './storage.ts';

let shared: Promise<WorkerEmbedder> | null = null;
let sharedState: { state: 'idle' | 'starting' | 'ready' | 'failed'; status?: EmbedderStatus; error?: string } = { state: 'idle' };

/**
 * The process's embedder, built once on first use from the embedder settings (CARTOUCHE_EMBEDDER,
 * CARTOUCHE_EMBEDDER_CONFIG — see ml/backbone/selection.ts). It runs in a worker thread of its own, so
 * an archivist's upload never holds the API's event loop while the backbone runs.
 */
export function processEmbedder(): Promise<Embedder> {
  if (!shared) {
    sharedState = { state: 'starting' };
    const starting = (async () => (await startWorkerEmbedders(await selectedEmbedderConfig(), 1))[0]!)();
    shared = starting;
    starting.then(
      (e) => {
        sharedState = { state: 'ready', status: e.status };
        const log = { embedder: e.id, runtime: e.status.runtime, fallbackReason: e.status.fallbackReason ?? undefined };
        if (e.status.fallbackReason) logger.warn(log, 'API embedder started on the fallback runtime');
        else logger.info(log, 'API embedder started');
      },
      (err: unknown) => {
        sharedState = { state: 'failed', error: err instanceof Error ? err.message : String(err) };
        logger.error({ err }, 'API embedder could not start');
        if (shared === starting) shared = null;
      },
    );
  }
  return shared;
}

/** Where the process's embedder stands, without starting it (for /api/health). */
export function processEmbedderState(): { state: 'idle' | 'starting' | 'ready' | 'failed'; status?: EmbedderStatus; error?: string } {
  return sharedState;
}

/** Stops the process's embedder thread (tests, shutdown); the next `processEmbedder()` starts a new one. */
export async function stopProcessEmbedder(): Promise<void> {
  const current = shared;
  shared = null;
  sharedState = { state: 'idle' };
  if (current) (await current.catch(() => null))?.dispose();
}

export type OwnerType = 'item' | 'example';

/** Stores (or replaces) one owner's feature for this embedder. */
export async function storeEmbedding(owner: { type: OwnerType; id: number }, embedderId: string, vector: Float32Array, transaction?: Transaction): Promise<void> {
  await Embedding.upsert(
    { ownerType: owner.type, ownerId: owner.id, embedderId, dimension: vector.length, vector: featureToBuffer(vector) },
    { transaction },
  );
}

/**
 * Embeds one stored file and records it. Examples are embedded with their mirror image and averaged (free,
 * and it helps slightly); scans as they are.
 */
export async function embedStoredFile(embedder: Embedder, storage: Storage, owner: { type: OwnerType; id: number }, fileKey: string): Promise<Float32Array> {
  const bytes = await readFile(storage.pathOf(fileKey));
  const vector = owner.type === 'example' ? mirrorAverage((await embedder.embedWithMirror([bytes]))[0]!) : (await embedder.embed([bytes]))[0]!;
  await storeEmbedding(owner, embedder.id, vector);
  return vector;
}

export interface CollectionMatrix {
  /** item ids, in row order */
  itemIds: number[];
  /** raw features, row-major */
  raw: Float32Array;
  dimension: number;
}

/** Every embedded item of a collection for one embedder, as one matrix (one query, no per-row objects). */
export async function loadItemMatrix(sequelize: Sequelize, collectionId: number, embedderId: string, dimension: number): Promise<CollectionMatrix> {
  const rows = await sequelize.query<{ id: number; vector: Buffer }>(
    `SELECT i.id, e.vector FROM items i
       JOIN embeddings e ON e.owner_type = 'item' AND e.owner_id = i.id AND e.embedder_id = :embedderId
      WHERE i.collection_id = :collectionId ORDER BY i.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId, embedderId } },
  );
  const raw = new Float32Array(rows.length * dimension);
  rows.forEach((r, i) => raw.set(featureFromBuffer(r.vector, dimension), i * dimension));
  return { itemIds: rows.map((r) => Number(r.id)), raw, dimension };
}

export interface ExampleFeature {
  exampleId: number;
  subjectId: number;
  raw: Float32Array;
}

/** The embedded examples of every subject of a collection. */
export async function loadExampleFeatures(sequelize: Sequelize, collectionId: number, embedderId: string, dimension: number): Promise<ExampleFeature[]> {
  const rows = await sequelize.query<{ id: number; subject_id: number; vector: Buffer }>(
    `SELECT x.id, x.subject_id, e.vector FROM examples x
       JOIN subjects s ON s.id = x.subject_id
       JOIN embeddings e ON e.owner_type = 'example' AND e.owner_id = x.id AND e.embedder_id = :embedderId
      WHERE s.collection_id = :collectionId ORDER BY x.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId, embedderId } },
  );
  return rows.map((r) => ({ exampleId: Number(r.id), subjectId: Number(r.subject_id), raw: featureFromBuffer(r.vector, dimension) }));
}

/** A collection's features, centred the way synthesis and scoring need them. */
export interface PreparedCollection {
  embedderId: string;
  dimension: number;
  itemIds: number[];
  rowOfItem: Map<number, number>;
  /** centred (scan mean), block-normalised item features */
  items: Float32Array;
  examples: Array<ExampleFeature & { prepared: Float32Array }>;
  centres: CollectionCentres;
}

export async function prepareCollection(sequelize: Sequelize, collectionId: number, embedder: Pick<Embedder, 'id' | 'dimension' | 'layout'>): Promise<PreparedCollection> {
  const { id: embedderId, dimension, layout } = embedder;
  const matrix = await loadItemMatrix(sequelize, collectionId, embedderId, dimension);
  const examples = await loadExampleFeatures(sequelize, collectionId, embedderId, dimension);
  const centres: CollectionCentres = {
    scans: matrix.itemIds.length ? RunningMean.ofMatrix(matrix.raw, dimension) : new RunningMean(dimension),
    examples: examples.length ? RunningMean.of(examples.map((e) => e.raw), dimension) : new RunningMean(dimension),
    subjectsWithExamples: new Set(examples.map((e) => e.subjectId)).size,
  };
  const scan = matrix.itemIds.length ? scanCentre(centres) : null;
  // before any scan is embedded the example mean is the only centre there is
  const exampleMean = matrix.itemIds.length ? exampleCentre(centres) : examples.length ? centres.examples.mean() : null;
  return {
    embedderId,
    dimension,
    itemIds: matrix.itemIds,
    rowOfItem: new Map(matrix.itemIds.map((id, row) => [id, row])),
    items: prepareMatrix(matrix.raw, scan, layout),
    examples: examples.map((e) => ({ ...e, prepared: prepareFeature(e.raw, exampleMean, layout) })),
    centres,
  };
}

/** Rows of the prepared item matrix for these item ids (ids without a feature are skipped). */
export function itemRows(prepared: PreparedCollection, itemIds: readonly number[]): Float32Array[] {
  const rows: Float32Array[] = [];
  for (const id of itemIds) {
    const row = prepared.rowOfItem.get(id);
    if (row !== undefined) rows.push(prepared.items.subarray(row * prepared.dimension, (row + 1) * prepared.dimension));
  }
  return rows;
}

