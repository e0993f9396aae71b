import type { Sequelize } from 'sequelize';
import { binaryScores, fromStoredModel, mirrorAverage, probabilityOf, prototypeModel, scoreAll, scoreStats, zScore, type Calibration, type Embedder, type LinearModel } from '../ml/index.ts';
import { HttpProblem } from '../http/problem.ts';
import { Embedding, Example, Subject } from '../models/index.ts';
import type { EXAMPLE_MEDIA } from '../models/example.ts';
import { audit } from './audit.ts';
import { prepareCollection, storeEmbedding } from './features.ts';
import type { Actor } from './review.ts';
import type { Storage } from './storage.ts';
import { activeModel, judgedItems } from './subject-models.ts';

/**
 * How precise and complete a subject's list would be at a threshold, estimated from the items editors
 * have already judged for it (accepted or added = it shows the subject; rejected = it does not).
 *
 * Below MIN_JUDGED_ITEMS judged items, or without at least one of each kind, no estimate is given: with
 * a handful of items one more decision moves precision by tens of points. The judged items are those
 * earlier suggestions put before editors, not a random sample of the collection, so the estimate is an
 * estimate: the 95 % Wilson score interval is given with precision to show how far it may be off.
 */
export const MIN_JUDGED_ITEMS = 10;

/** z for a two-sided 95 % interval (normal quantile 0.975), as tabulated in statistics handbooks. */
const Z95 = 1.959964;

/** Wilson score interval for a binomial proportion (Wilson, J. Am. Stat. Assoc. 22, 1927). */
export function wilsonInterval(successes: number, trials: number, z = Z95): { low: number; high: number } | null {
  if (trials === 0) return null;
  const p = successes / trials;
  const z2 = z * z;
  const denom = 1 + z2 / trials;
  const centre = (p + z2 / (2 * trials)) / denom;
  const half = (z * Math.sqrt((p * (1 - p)) / trials + z2 / (4 * trials * trials))) / denom;
  return { low: Math.max(0, centre - half), high: Math.min(1, centre + half) };
}

export interface ThresholdEstimate {
  subjectId: number;
  /** the threshold, as a z-score against the collection's scores under this model */
  minZ: number;
  /** the calibrated probability at the threshold, when the model has a Platt calibration */
  probabilityAtThreshold: number | null;
  minimumJudged: number;
  /** judged items that have a feature to score */
  judged: { confirmed: number; rejected: number };
  enough: boolean;
  /** why there is no estimate, in words, when there is none */
  reason: string | null;
  /** at or above the threshold: confirmed (tp) and rejected (fp); below it: confirmed (fn) */
  counts: { truePositives: number; falsePositives: number; falseNegatives: number } | null;
  precision: number | null;
  precisionInterval: { low: number; high: number } | null;
  recall: number | null;
  recallInterval: { low: number; high: number } | null;
  /** which model the estimate is for: the active version, or the examples' prototype before one exists */
  modelVersion: number | null;
}

export async function estimateAtThreshold(sequelize: Sequelize, embedder: Pick<Embedder, 'id' | 'dimension' | 'layout'>, subjectId: number, minZ: number): Promise<ThresholdEstimate> {
  const subject = await Subject.findByPk(subjectId);
  if (!subject) throw new HttpProblem(404, 'Not found', 'No such subject.');
  const prepared = await prepareCollection(sequelize, subject.collectionId, embedder);
  const row = await activeModel(subjectId, embedder.id);
  let model: LinearModel | null = null;
  let calibration: Calibration | null = null;
  if (row) {
    model = fromStoredModel(row);
    calibration = row.calibration as unknown as Calibration;
  } else {
    const ex = prepared.examples.filter((e) => e.subjectId === subjectId).map((e) => e.prepared);
    if (ex.length) model = prototypeModel(ex);
  }
  const judged = await judgedItems(subjectId);
  const rowsOf = (ids: number[]) => ids.map((id) => prepared.rowOfItem.get(id)).filter((r): r is number => r !== undefined);
  const confirmedRows = rowsOf(judged.confirmed);
  const rejectedRows = rowsOf(judged.rejected);
  const base = {
    subjectId,
    minZ,
    minimumJudged: MIN_JUDGED_ITEMS,
    judged: { confirmed: confirmedRows.length, rejected: rejectedRows.length },
    modelVersion: row?.version ?? null,
  };
  const none = (reason: string, probabilityAtThreshold: number | null = null): ThresholdEstimate => ({ ...base, probabilityAtThreshold, enough: false, reason, counts: null, precision: null, precisionInterval: null, recall: null, recallInterval: null });
  if (!model || prepared.itemIds.length === 0) return none(model ? 'No scan of this collection has been read yet.' : 'The subject has no examples yet.');

  const all = scoreAll(prepared.items, prepared.dimension, model);
  const stats = scoreStats(all);
  const thresholdScore = stats.mean + minZ * stats.std;
  const probabilityAtThreshold = calibration ? probabilityOf(calibration, thresholdScore) : null;
  const total = confirmedRows.length + rejectedRows.length;
  if (total < MIN_JUDGED_ITEMS) return none(`Too few reviewed items to estimate: ${total} of the ${MIN_JUDGED_ITEMS} needed. Precision and recall are shown once editors have accepted or rejected at least ${MIN_JUDGED_ITEMS} suggestions of this subject.`, probabilityAtThreshold);
  if (confirmedRows.length === 0) return none('No reviewed item shows this subject yet, so recall cannot be estimated and precision would only say “none”.', probabilityAtThreshold);
  if (rejectedRows.length === 0) return none('No suggestion of this subject has been rejected yet, so there is nothing to tell how often it is wrong.', probabilityAtThreshold);

  const yTrue = [...confirmedRows.map(() => 1), ...rejectedRows.map(() => 0)];
  const yPred = [...confirmedRows, ...rejectedRows].map((r) => (zScore(stats, all[r]!) >= minZ ? 1 : 0));
  const { precision, recall } = binaryScores(yTrue, yPred, 1);
  let tp = 0;
  let fp = 0;
  let fn = 0;
  yTrue.forEach((t, i) => {
    if (yPred[i] === 1 && t === 1) tp++;
    else if (yPred[i] === 1) fp++;
    else if (t === 1) fn++;
  });
  const listed = tp + fp;
  return {
    ...base,
    probabilityAtThreshold,
    enough: true,
    reason: listed === 0 ? 'No reviewed item scores this high: precision cannot be estimated at this threshold.' : null,
    counts: { truePositives: tp, falsePositives: fp, falseNegatives: fn },
    precision: listed === 0 ? null : precision,
    precisionInterval: wilsonInterval(tp, listed),
    recall,
    recallInterval: wilsonInterval(tp, tp + fn),
  };
}

// ------------------------------------------------------------------ examples

export interface ExampleFile {
  name: string;
  bytes: Buffer;
}

/**
 * Adds a batch of examples to a subject, whole or not at all: every file is embedded first (with its mirror
 * image, averaged), and only when all of them could be read are the examples, their features and one
 * `example-added` audit event each stored, in one transaction. A sketch saved from the sketch pad
 * (`sketch-pad-….png`) is recorded as drawn, anything else as uploaded.
 */
export async function addExamples(
  sequelize: Sequelize,
  embedder: Pick<Embedder, 'id' | 'embedWithMirror'>,
  storage: Storage,
  subjectId: number,
  medium: (typeof EXAMPLE_MEDIA)[number],
  files: readonly ExampleFile[],
  actor: Actor,
): Promise<Example[]> {
  const vectors: Float32Array[] = [];
  for (const f of files) {
    try {
      vectors.push(mirrorAverage((await embedder.embedWithMirror([f.bytes]))[0]!));
    } catch (err) {
      throw new HttpProblem(422, 'Could not read the example', `${f.name}: ${(err as Error).message}`);
    }
  }
  const keys: string[] = [];
  for (const f of files) keys.push(await storage.put(f.bytes));
  return sequelize.transaction(async (transaction) => {
    const subject = await Subject.findByPk(subjectId, { transaction });
    if (!subject) throw new HttpProblem(404, 'Not found', 'No such subject.');
    const created: Example[] = [];
    for (const [i, f] of files.entries()) {
      const origin = medium === 'sketch' && f.name.startsWith('sketch-pad') ? 'drawn' : 'uploaded';
      const example = await Example.create({ subjectId, medium, origin, fileKey: keys[i]!, itemId: null, createdBy: actor.id }, { transaction });
      await storeEmbedding({ type: 'example', id: example.id }, embedder.id, vectors[i]!, transaction);
      await audit({ action: 'example-added', actorId: actor.id, ip: actor.ip, targetType: 'subject', targetId: subjectId, detail: { exampleId: example.id, prefLabel: subject.prefLabel, medium, origin, fileName: f.name } }, transaction);
      created.push(example);
    }
    return created;
  });
}

/** Removes an example and its features, with its `example-removed` audit event, in one transaction. */
export async function removeExample(sequelize: Sequelize, exampleId: number, actor: Actor): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    const example = await Example.findByPk(exampleId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!example) throw new HttpProblem(404, 'Not found', 'No such example.');
    const subject = await Subject.findByPk(example.subjectId, { transaction, attributes: ['id', 'prefLabel'] });
    await Embedding.destroy({ where: { ownerType: 'example', ownerId: exampleId }, transaction });
    await example.destroy({ transaction });
    await audit({ action: 'example-removed', actorId: actor.id, ip: actor.ip, targetType: 'subject', targetId: example.subjectId, detail: { exampleId, prefLabel: subject?.prefLabel ?? null, medium: example.medium, origin: example.origin, itemId: example.itemId } }, transaction);
  });
}
