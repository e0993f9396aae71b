import { Op, type Sequelize } from 'sequelize';
import {
  assessModel,
  calibrate,
  canTrain,
  carriedModel,
  fromStoredModel,
  photoAugmentedModel,
  probabilityOf,
  prototypeModel,
  rankItems,
  refinedModel,
  scoreAll,
  scoreStats,
  toStoredModel,
  trainedModel,
  type Calibration,
  type Embedder,
  type Judgement,
  type LinearModel,
  type MadeFrom,
  type QualityRecord,
  type SynthesisMethod,
} from '../ml/index.ts';
import { HttpProblem } from '../http/problem.ts';
import { Item, Subject, SubjectModel, Suggestion } from '../models/index.ts';
import { audit } from './audit.ts';
import { itemRows, prepareCollection, type PreparedCollection } from './features.ts';
import { carryDecision, chosenRegressor, latestRegressorNote } from './weight-maps.ts';
import type { ModelSummary } from '../../../common/api/subjects.ts';

type EmbedderInfo = Pick<Embedder, 'id' | 'dimension' | 'layout'>;

/** The three ways an archivist asks for a model; 'from-examples' picks the best method the judgements allow. */
export type SynthesisRequest =
  | { mode: 'from-examples' }
  | { mode: 'narrower'; broaderSubjectId?: number }
  | { mode: 'carried'; sourceSubjectId: number };

export type { ModelSummary };

export function summarise(m: SubjectModel): ModelSummary {
  const cal = m.calibration as Calibration | null;
  return {
    id: m.id,
    subjectId: m.subjectId,
    version: m.version,
    method: m.method,
    embedderId: m.embedderId,
    active: m.active,
    madeFrom: m.madeFrom as MadeFrom,
    metrics: m.metrics as QualityRecord | null,
    calibration: cal ? { kind: cal.kind, ...(cal.kind === 'platt' ? { positives: cal.positives, negatives: cal.negatives } : {}) } : null,
    createdAt: m.createdAt.toISOString(),
    createdBy: m.createdBy,
  };
}

/** Items editors confirmed (accepted or added) and rejected for a subject. */
export async function judgedItems(subjectId: number): Promise<{ confirmed: number[]; rejected: number[] }> {
  const rows = await Suggestion.findAll({ where: { subjectId, state: { [Op.in]: ['accepted', 'added', 'rejected'] } }, attributes: ['itemId', 'state'] });
  return {
    confirmed: rows.filter((r) => r.state !== 'rejected').map((r) => r.itemId),
    rejected: rows.filter((r) => r.state === 'rejected').map((r) => r.itemId),
  };
}

async function loadSubject(subjectId: number): Promise<Subject> {
  const subject = await Subject.findByPk(subjectId);
  if (!subject) throw new HttpProblem(404, 'Not found', 'No such subject.');
  return subject;
}

export async function activeModel(subjectId: number, embedderId: string): Promise<SubjectModel | null> {
  return SubjectModel.findOne({ where: { subjectId, embedderId, active: true }, order: [['version', 'DESC']] });
}

interface Built {
  model: LinearModel;
  method: SynthesisMethod;
  madeFrom: MadeFrom;
  /** rebuilds the model from a subset of its judgements, for the leave-one-out quality record */
  rebuild?: (positives: readonly Judgement[], negatives: readonly Judgement[]) => LinearModel | Promise<LinearModel>;
  calibration?: Calibration;
  usesNegatives?: boolean;
}

/**
 * Synthesizes a new version of a subject's model from stored features (no network run), measures it by
 * leave-one-out, calibrates it, and stores it as the active version. Asked for by a person (`actorId`), the
 * version is audited (`subject-model-made`) in the same transaction; the night shift's versions are not.
 */
export async function synthesizeSubjectModel(
  sequelize: Sequelize,
  embedder: EmbedderInfo,
  subjectId: number,
  request: SynthesisRequest,
  actorId: number | null,
  ip: string | null = null,
): Promise<ModelSummary> {
  const subject = await loadSubject(subjectId);
  const prepared = await prepareCollection(sequelize, subject.collectionId, embedder);
  const examples = prepared.examples.filter((e) => e.subjectId === subjectId);
  const judged = await judgedItems(subjectId);
  const confirmed = itemRows(prepared, judged.confirmed);
  const rejected = itemRows(prepared, judged.rejected);
  const exampleIds = examples.map((e) => e.exampleId);
  const base: MadeFrom = { exampleIds, confirmedItemIds: judged.confirmed, rejectedItemIds: judged.rejected, mirrored: true };
  const exampleJudgements: Judgement[] = examples.map((e) => ({ feature: e.prepared, kind: 'example' }));
  const confirmedJudgements: Judgement[] = confirmed.map((f) => ({ feature: f, kind: 'confirmed' }));

  let built: Built;
  if (request.mode === 'carried') {
    built = await buildCarried(sequelize, embedder, subject, prepared, request.sourceSubjectId, base);
  } else if (request.mode === 'narrower') {
    built = await buildNarrower(embedder, subject, prepared, examples.map((e) => e.prepared), request.broaderSubjectId, base);
  } else if (canTrain({ confirmed: confirmed.length, rejected: rejected.length })) {
    const result = await trainedModel({ confirmed, rejected });
    built = {
      model: result.model,
      method: 'trained',
      madeFrom: { ...base, how: `Logistic regression on ${confirmed.length} confirmed and ${rejected.length} rejected item(s), its probabilities Platt-calibrated.` },
      calibration: result.calibration,
      usesNegatives: true,
      rebuild: async (pos, neg) => (await trainedModel({ confirmed: pos.map((j) => j.feature), rejected: neg.map((j) => j.feature), folds: 2 })).model,
    };
  } else if (confirmed.length > 0) {
    const ex = examples.map((e) => e.prepared);
    built = {
      model: photoAugmentedModel({ examples: ex, confirmed }),
      method: 'photo_augmented',
      madeFrom: { ...base, how: `The prototype of ${examples.length} example(s), with ${confirmed.length} confirmed item(s) joined as photograph examples.` },
      rebuild: (pos) => photoAugmentedModel({ examples: pos.filter((j) => j.kind === 'example').map((j) => j.feature), confirmed: pos.filter((j) => j.kind === 'confirmed').map((j) => j.feature) }),
    };
  } else {
    if (examples.length === 0) throw new HttpProblem(409, 'No examples yet', `Add at least one example of "${subject.prefLabel}" (a drawing, an illustration or a photograph) first.`, { type: '/problems/no-examples' });
    // the collection's weight map, when one measured better than the prototype on held-out subjects
    const regressor = await chosenRegressor(subject.collectionId, embedder.id);
    const ex = examples.map((e) => e.prepared);
    if (regressor) {
      const { row, map } = regressor;
      built = {
        model: map.model(ex),
        method: 'regressed',
        madeFrom: {
          ...base,
          regressorId: map.id,
          weightMapVersionId: row.id,
          weightMapVersion: row.version,
          how: `The prototype of ${ex.length} example(s), mapped by the collection's weight map version ${row.version} (${row.kind}), which ranked held-out subjects better than the prototype (AP ${row.mapAp.toFixed(3)} against ${row.baselineAp.toFixed(3)}).`,
        },
        rebuild: (pos) => map.model(pos.map((j) => j.feature)),
      };
    } else {
      built = {
        model: prototypeModel(ex),
        method: 'prototype',
        madeFrom: { ...base, weightMapVersionId: null, how: `The prototype of ${ex.length} example(s). ${await latestRegressorNote(subject.collectionId, embedder.id)}` },
        rebuild: (pos) => prototypeModel(pos.map((j) => j.feature)),
      };
    }
  }

  // quality: positives left out one at a time; negatives are the rejected items plus other subjects' confirmed items
  const negatives: Judgement[] = [...rejected.map((f): Judgement => ({ feature: f, kind: 'rejected' })), ...(await otherSubjectJudgements(prepared, subject))];
  const collectionScores = scoreStats(scoreAll(prepared.items, prepared.dimension, built.model));
  let metrics: QualityRecord | null = null;
  let calibration: Calibration = built.calibration ?? { kind: 'zscore', ...collectionScores };
  if (built.rebuild) {
    const assessment = await assessModel({
      method: built.method,
      positives: [...(built.method === 'trained' ? [] : exampleJudgements), ...confirmedJudgements],
      negatives,
      build: built.rebuild,
      usesNegatives: built.usesNegatives,
      collection: prepared.itemIds.length > 1 ? collectionScores : undefined,
    });
    metrics = assessment.quality;
    if (!built.calibration) calibration = calibrate(assessment.decisions, collectionScores);
  }

  const stored = toStoredModel(built.model, { method: built.method, embedderId: embedder.id, calibration, metrics, madeFrom: built.madeFrom });
  const row = await sequelize.transaction(async (transaction) => {
    const last = (await SubjectModel.max('version', { where: { subjectId }, transaction })) as number | null;
    await SubjectModel.update({ active: false }, { where: { subjectId, embedderId: embedder.id, active: true }, transaction });
    const made = await SubjectModel.create(
      {
        subjectId,
        version: (last ?? 0) + 1,
        method: stored.method,
        embedderId: stored.embedderId,
        dimension: stored.dimension,
        weights: stored.weights,
        bias: stored.bias,
        calibration: stored.calibration as unknown as Record<string, unknown>,
        metrics: stored.metrics as unknown as Record<string, unknown> | null,
        madeFrom: stored.madeFrom,
        active: true,
        createdBy: actorId,
      },
      { transaction },
    );
    if (actorId !== null) await audit({ action: 'subject-model-made', actorId, ip, targetType: 'subject', targetId: subjectId, detail: { subjectModelId: made.id, version: made.version, method: made.method, mode: request.mode, embedderId: made.embedderId } }, transaction);
    return made;
  });
  return summarise(row);
}

/** Confirmed items of the collection's other subjects stand in as negatives (at most 200, the nearest first by id). */
async function otherSubjectJudgements(prepared: PreparedCollection, subject: Subject): Promise<Judgement[]> {
  const own = new Set((await Suggestion.findAll({ where: { subjectId: subject.id }, attributes: ['itemId'] })).map((s) => s.itemId));
  const others = await Suggestion.findAll({
    where: { subjectId: { [Op.ne]: subject.id }, state: { [Op.in]: ['accepted', 'added'] } },
    include: [{ model: Subject, as: 'subject', attributes: [], where: { collectionId: subject.collectionId, kind: subject.kind } }],
    attributes: ['itemId'],
    limit: 400,
  });
  const ids = [...new Set(others.map((s) => s.itemId).filter((id) => !own.has(id)))].slice(0, 200);
  return itemRows(prepared, ids).map((feature) => ({ feature, kind: 'other-subject' }));
}

async function buildNarrower(
  embedder: EmbedderInfo,
  subject: Subject,
  prepared: PreparedCollection,
  examples: Float32Array[],
  broaderId: number | undefined,
  base: MadeFrom,
): Promise<Built> {
  const broaderSubjectId = broaderId ?? subject.broaderId;
  if (!broaderSubjectId) throw new HttpProblem(409, 'No broader subject', `"${subject.prefLabel}" has no broader subject to refine.`, { type: '/problems/no-broader' });
  if (examples.length === 0) throw new HttpProblem(409, 'No examples yet', `A narrower subject still needs a few examples of its own.`, { type: '/problems/no-examples' });
  const broader = await Subject.findByPk(broaderSubjectId);
  if (!broader || broader.collectionId !== subject.collectionId) throw new HttpProblem(400, 'Invalid broader subject', 'The broader subject must belong to the same collection.');
  const broaderModelRow = await activeModel(broader.id, embedder.id);
  const broaderModel = broaderModelRow ? fromStoredModel(broaderModelRow) : undefined;
  // items carrying the broader subject: its confirmations, else its ranked list
  const broaderJudged = await judgedItems(broader.id);
  let broaderItems = itemRows(prepared, broaderJudged.confirmed);
  if (broaderItems.length < 3 && broaderModel) {
    broaderItems = rankItems(prepared.items, prepared.dimension, broaderModel, { topN: 200, minZ: 1 }).items.map((r) =>
      prepared.items.subarray(r.row * prepared.dimension, (r.row + 1) * prepared.dimension),
    );
  }
  const siblingRows = await Subject.findAll({ where: { broaderId: broader.id, id: { [Op.ne]: subject.id } } });
  const siblings: Float32Array[] = [];
  for (const s of siblingRows) {
    const m = await activeModel(s.id, embedder.id);
    if (m) siblings.push(fromStoredModel(m).weights);
  }
  const make = (ex: readonly Float32Array[]) => refinedModel({ examples: ex, broaderItems, siblings, broader: broaderModel });
  return {
    model: make(examples),
    method: 'refined',
    madeFrom: {
      ...base,
      broaderSubjectId: broader.id,
      siblingSubjectIds: siblingRows.map((s) => s.id),
      broaderModelId: broaderModelRow?.id,
      how: `Refined from "${broader.prefLabel}" with ${examples.length} example(s) of its own, set apart from ${siblings.length} sibling subject(s) and shaped by ${broaderItems.length} item(s) of the broader subject.`,
    },
    rebuild: (pos) => make(pos.filter((j) => j.kind === 'example').map((j) => j.feature)),
  };
}

async function buildCarried(sequelize: Sequelize, embedder: EmbedderInfo, subject: Subject, prepared: PreparedCollection, sourceSubjectId: number, base: MadeFrom): Promise<Built> {
  const source = await Subject.findByPk(sourceSubjectId);
  if (!source) throw new HttpProblem(400, 'Invalid source subject', 'No such subject to carry a model from.');
  if (source.collectionId === subject.collectionId) throw new HttpProblem(400, 'Same collection', 'Carry a model from a subject of another collection.');
  const sourceModel = await activeModel(source.id, embedder.id);
  if (!sourceModel) throw new HttpProblem(409, 'No model to carry', `"${source.prefLabel}" has no model yet in its collection.`, { type: '/problems/no-model' });
  // a carry map trained between the two collections' shared subjects, used only when it beat re-centring
  // alone on held-out shared subjects; otherwise re-centring alone carries the model (its weights live in
  // centred feature space, and each collection is centred on its own scans)
  const decision = await carryDecision(sequelize, embedder, source.collectionId, subject.collectionId, { prepared });
  return {
    model: carriedModel(fromStoredModel(sourceModel), decision.map),
    method: 'carried',
    madeFrom: {
      ...base,
      sourceCollectionId: source.collectionId,
      sourceSubjectId: source.id,
      sourceModelId: sourceModel.id,
      carry: {
        use: decision.use,
        reason: decision.reason,
        sharedSubjects: decision.sharedSubjects,
        weightMapVersionId: decision.version?.id ?? null,
        weightMapVersion: decision.version?.version ?? null,
        heldOut: decision.version ? { mapAp: decision.version.mapAp, recentringAp: decision.version.baselineAp } : null,
      },
      ...(decision.map ? { regressorId: decision.map.id } : {}),
      how: decision.use === 'map' ? `Carried from another collection through a carry map. ${decision.reason}` : `Carried from another collection by re-centring alone. ${decision.reason}`,
    },
  };
}

export interface RankedPreviewItem {
  itemId: number;
  identifier: string;
  fileName: string;
  caption: string | null;
  score: number;
  z: number;
  probability: number | null;
  /** what an editor already said about this item and this subject */
  judgement: 'confirmed' | 'rejected' | null;
}

export interface RankedPreview {
  subjectId: number;
  model: ModelSummary | null;
  /** the items scored (those with a feature from this embedder) */
  scored: number;
  items: RankedPreviewItem[];
}

/**
 * The items a subject would catch: brute-force scores of every embedded item of the collection under the
 * active model (or, before one exists, what from-examples would make of its examples: the regressed model
 * when the collection has a chosen weight map, else the prototype), top N with z ≥ minZ.
 */
export async function rankedPreview(sequelize: Sequelize, embedder: EmbedderInfo, subjectId: number, opts: { topN?: number; minZ?: number } = {}): Promise<RankedPreview> {
  const subject = await loadSubject(subjectId);
  const prepared = await prepareCollection(sequelize, subject.collectionId, embedder);
  const row = await activeModel(subjectId, embedder.id);
  let model: LinearModel;
  let calibration: Calibration | undefined;
  if (row) {
    model = fromStoredModel(row);
    calibration = row.calibration as unknown as Calibration;
  } else {
    const ex = prepared.examples.filter((e) => e.subjectId === subjectId).map((e) => e.prepared);
    if (ex.length === 0) return { subjectId, model: null, scored: prepared.itemIds.length, items: [] };
    // what from-examples would make: the regressed model when the collection has a chosen weight map
    const regressor = await chosenRegressor(subject.collectionId, embedder.id);
    model = regressor ? regressor.map.model(ex) : prototypeModel(ex);
  }
  if (prepared.itemIds.length === 0) return { subjectId, model: row ? summarise(row) : null, scored: 0, items: [] };
  const ranked = rankItems(prepared.items, prepared.dimension, model, { topN: opts.topN, minZ: opts.minZ, calibration });
  const ids = ranked.items.map((r) => prepared.itemIds[r.row]!);
  const items = new Map((await Item.findAll({ where: { id: ids }, attributes: ['id', 'identifier', 'fileName', 'caption'] })).map((i) => [i.id, i]));
  const judged = await judgedItems(subjectId);
  const confirmed = new Set(judged.confirmed);
  const rejected = new Set(judged.rejected);
  return {
    subjectId,
    model: row ? summarise(row) : null,
    scored: prepared.itemIds.length,
    items: ranked.items.map((r, i) => {
      const item = items.get(ids[i]!)!;
      return {
        itemId: item.id,
        identifier: item.identifier,
        fileName: item.fileName,
        caption: item.caption,
        score: r.score,
        z: r.z,
        probability: calibration ? probabilityOf(calibration, r.score) : null,
        judgement: confirmed.has(item.id) ? 'confirmed' : rejected.has(item.id) ? 'rejected' : null,
      };
    }),
  };
}

export async function modelHistory(subjectId: number): Promise<ModelSummary[]> {
  await loadSubject(subjectId);
  const rows = await SubjectModel.findAll({ where: { subjectId }, order: [['version', 'DESC']], attributes: { exclude: ['weights'] } });
  return rows.map(summarise);
}
