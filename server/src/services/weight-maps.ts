/**
 * The collection's weight maps T (model regression network): trained on the collection's own subjects that
 * have examples and enough confirmed items, measured on held-out subjects against the prototype, stored as
 * versions in `weight_maps`, and chosen only when they measured better. Carry maps between two collections are
 * kept the same way, measured against re-centring alone.
 *
 * Training is keyed by a fingerprint of its inputs (the subjects, their examples and the review decisions
 * about them): the same inputs never train twice, so the night shift can call `refreshRegressor` every run.
 */
import { createHash } from 'node:crypto';
import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import {
  chooseCarry,
  compareOnHeldOutSubjects,
  fromStoredModel,
  MIN_CONFIRMED_FOR_REGRESSOR,
  MIN_SUBJECTS_FOR_REGRESSOR,
  trainWeightMap,
  weightMapFromBuffer,
  type CarryChoice,
  type Embedder,
  type HeldOutComparison,
  type HeldOutTask,
  type SharedSubject,
  type WeightMap,
  type WeightMapKind,
} from '../ml/index.ts';
import { Collection, Subject, SubjectModel, WeightMapVersion } from '../models/index.ts';
import { itemRows, prepareCollection, type PreparedCollection } from './features.ts';

type EmbedderInfo = Pick<Embedder, 'id' | 'dimension' | 'layout'>;

/**
 * How the collection's regressor is trained: the library's measured defaults (α = 0.01, β = 1, Adam at
 * 1e-3), the ensemble of a linear and a residual-MLP map, held-out comparison in 5 folds of subjects.
 */
export const REGRESSOR_SETTINGS = { kind: 'ensemble' as WeightMapKind, steps: 600, learningRate: 1e-3, folds: 5, seed: 1, alpha: 0.01, beta: 1 };
export type WeightMapSettings = Omit<typeof REGRESSOR_SETTINGS, 'kind'> & { kind: WeightMapKind };
export const CARRY_SETTINGS: WeightMapSettings = { ...REGRESSOR_SETTINGS, kind: 'linear' };
/**
 * Part of every fingerprint: bump it when the defaults above change, so every collection retrains once. A
 * call that overrides the settings (tuning, tests) does not change the fingerprint: the same inputs are still
 * not trained twice, and the stored version records the settings it was trained with.
 */
export const SETTINGS_VERSION = 1;

export interface WeightMapSummary {
  id: number;
  collectionId: number;
  sourceCollectionId: number | null;
  purpose: WeightMapVersion['purpose'];
  version: number;
  embedderId: string;
  kind: string;
  mapId: string;
  trainedOn: Record<string, unknown>;
  validation: Record<string, unknown>;
  /** mean held-out AP of what the map would replace (prototype, or re-centring for a carry map) */
  baselineAp: number;
  mapAp: number;
  chosen: boolean;
  reason: string;
  createdAt: string;
}

export function weightMapSummary(row: WeightMapVersion): WeightMapSummary {
  return {
    id: row.id,
    collectionId: row.collectionId,
    sourceCollectionId: row.sourceCollectionId,
    purpose: row.purpose,
    version: row.version,
    embedderId: row.embedderId,
    kind: row.kind,
    mapId: row.mapId,
    trainedOn: row.trainedOn,
    validation: row.validation,
    baselineAp: row.baselineAp,
    mapAp: row.mapAp,
    chosen: row.chosen,
    reason: row.reason,
    createdAt: row.createdAt.toISOString(),
  };
}

/** Parsed maps by row id (a row's weights never change). */
const parsed = new Map<number, WeightMap>();
function mapOf(row: WeightMapVersion): WeightMap {
  let map = parsed.get(row.id);
  if (!map) {
    map = weightMapFromBuffer(Buffer.from(row.weights));
    if (parsed.size >= 16) parsed.delete(parsed.keys().next().value!);
    parsed.set(row.id, map);
  }
  return map;
}

/** The review decisions of every subject of a collection: items confirmed (accepted or added) and rejected. */
export async function collectionDecisions(sequelize: Sequelize, collectionId: number, transaction?: Transaction): Promise<Map<number, { confirmed: number[]; rejected: number[] }>> {
  const rows = await sequelize.query<{ subject_id: number; item_id: number; state: string }>(
    `SELECT g.subject_id, g.item_id, g.state FROM suggestions g JOIN subjects s ON s.id = g.subject_id
      WHERE s.collection_id = :collectionId AND g.state IN ('accepted', 'added', 'rejected') ORDER BY g.subject_id, g.item_id`,
    { type: QueryTypes.SELECT, replacements: { collectionId }, transaction },
  );
  const out = new Map<number, { confirmed: number[]; rejected: number[] }>();
  for (const r of rows) {
    const id = Number(r.subject_id);
    const entry = out.get(id) ?? { confirmed: [], rejected: [] };
    (r.state === 'rejected' ? entry.rejected : entry.confirmed).push(Number(r.item_id));
    out.set(id, entry);
  }
  return out;
}

export interface TrainingSubject {
  subjectId: number;
  label: string;
  exampleIds: number[];
  confirmedItemIds: number[];
  rejectedItemIds: number[];
}

export interface RegressorTraining {
  prepared: PreparedCollection;
  subjects: TrainingSubject[];
  tasks: HeldOutTask[];
  fingerprint: string;
}

const sha256 = (value: unknown) => createHash('sha256').update(JSON.stringify(value)).digest('hex');

/**
 * What the collection's regressor would be trained on now: its active subjects with at least one embedded
 * example and at least MIN_CONFIRMED_FOR_REGRESSOR confirmed items that have a feature.
 */
export async function regressorTraining(sequelize: Sequelize, embedder: EmbedderInfo, collectionId: number, prepared?: PreparedCollection): Promise<RegressorTraining> {
  prepared ??= await prepareCollection(sequelize, collectionId, embedder);
  const decisions = await collectionDecisions(sequelize, collectionId);
  const active = await Subject.findAll({ where: { collectionId, status: 'active' }, attributes: ['id', 'prefLabel'], order: [['id', 'ASC']] });
  const subjects: TrainingSubject[] = [];
  const tasks: HeldOutTask[] = [];
  for (const s of active) {
    const examples = prepared.examples.filter((e) => e.subjectId === s.id);
    const judged = decisions.get(s.id) ?? { confirmed: [], rejected: [] };
    const confirmedIds = judged.confirmed.filter((id) => prepared.rowOfItem.has(id));
    if (examples.length === 0 || confirmedIds.length < MIN_CONFIRMED_FOR_REGRESSOR) continue;
    const rejectedIds = judged.rejected.filter((id) => prepared.rowOfItem.has(id));
    subjects.push({ subjectId: s.id, label: s.prefLabel, exampleIds: examples.map((e) => e.exampleId), confirmedItemIds: confirmedIds, rejectedItemIds: rejectedIds });
    tasks.push({ examples: examples.map((e) => e.prepared), items: itemRows(prepared, confirmedIds), itemIds: confirmedIds, rejected: itemRows(prepared, rejectedIds) });
  }
  const fingerprint = sha256({
    purpose: 'regressed',
    embedderId: embedder.id,
    settingsVersion: SETTINGS_VERSION,
    subjects: subjects.map((s) => [s.subjectId, s.exampleIds, s.confirmedItemIds, s.rejectedItemIds]),
  });
  return { prepared, subjects, tasks, fingerprint };
}

export interface RefreshOutcome {
  /**
   * trained: a new version was stored; unchanged: the newest version was trained on these same inputs;
   * too-few: not enough subjects qualify; withdrawn: too few qualify any more, so no map stays chosen
   */
  status: 'trained' | 'unchanged' | 'too-few' | 'withdrawn';
  /** the newest version after the call, if any */
  latest: WeightMapSummary | null;
  /** the version from-examples models use now, if any */
  chosen: WeightMapSummary | null;
  /** the chosen version changed (so models made with the previous one are out of date) */
  chosenChanged: boolean;
  reason: string;
}

const ap = (x: number) => x.toFixed(3);

async function latestVersion(where: { collectionId: number; purpose: 'regressed' | 'carried'; embedderId: string; sourceCollectionId?: number }, transaction?: Transaction): Promise<WeightMapVersion | null> {
  return WeightMapVersion.findOne({ where: { sourceCollectionId: null, ...where }, order: [['version', 'DESC']], attributes: { exclude: ['weights'] }, transaction });
}

export async function chosenRegressorRow(collectionId: number, embedderId: string): Promise<WeightMapVersion | null> {
  return WeightMapVersion.findOne({ where: { collectionId, embedderId, purpose: 'regressed', chosen: true }, order: [['version', 'DESC']] });
}

/** The collection's chosen weight map for this embedder (one that measured better than the prototype), if any. */
export async function chosenRegressor(collectionId: number, embedderId: string): Promise<{ row: WeightMapVersion; map: WeightMap } | null> {
  const row = await chosenRegressorRow(collectionId, embedderId);
  return row ? { row, map: mapOf(row) } : null;
}

/**
 * Trains a new version of the collection's regressor when its training inputs changed since the newest
 * version (or when `force`), measures it on held-out subjects, stores it and chooses it when it beats the
 * prototype. The training happens outside any transaction; the store locks the collection row and checks
 * again that no other process stored the same inputs meanwhile.
 */
export async function refreshRegressor(
  sequelize: Sequelize,
  embedder: EmbedderInfo,
  collectionId: number,
  opts: { force?: boolean; prepared?: PreparedCollection; settings?: Partial<WeightMapSettings> } = {},
): Promise<RefreshOutcome> {
  const before = await chosenRegressorRow(collectionId, embedder.id);
  const training = await regressorTraining(sequelize, embedder, collectionId, opts.prepared);
  const where = { collectionId, purpose: 'regressed' as const, embedderId: embedder.id };
  const latest = await latestVersion(where);
  const summary = (r: WeightMapVersion | null) => (r ? weightMapSummary(r) : null);

  if (training.subjects.length < MIN_SUBJECTS_FOR_REGRESSOR) {
    const reason = `${training.subjects.length} subject(s) have examples and at least ${MIN_CONFIRMED_FOR_REGRESSOR} confirmed items; the weight map needs ${MIN_SUBJECTS_FOR_REGRESSOR}.`;
    if (!before) return { status: 'too-few', latest: summary(latest), chosen: null, chosenChanged: false, reason };
    await WeightMapVersion.update({ chosen: false }, { where: { ...where, chosen: true } });
    return { status: 'withdrawn', latest: summary(latest), chosen: null, chosenChanged: true, reason: `${reason} Version ${before.version} is no longer used.` };
  }
  if (!opts.force && latest?.fingerprint === training.fingerprint) {
    return { status: 'unchanged', latest: summary(latest), chosen: summary(before), chosenChanged: false, reason: 'The training subjects and their decisions are as they were for the newest version.' };
  }

  const settings: WeightMapSettings = { ...REGRESSOR_SETTINGS, ...opts.settings };
  const train = (tasks: readonly HeldOutTask[]) =>
    trainWeightMap(tasks, { kind: settings.kind, steps: settings.steps, learningRate: settings.learningRate, seed: settings.seed, alpha: settings.alpha, beta: settings.beta });
  const comparison = await compareOnHeldOutSubjects(training.tasks, train, { folds: settings.folds, seed: settings.seed });
  const map = await train(training.tasks);
  const measured = `held-out AP ${ap(comparison.mapMeanAP)} regressed against ${ap(comparison.baselineMeanAP)} prototype, over ${comparison.subjects} subjects in ${comparison.folds} folds`;
  const reason = comparison.better ? `Chosen: it measured better than the prototype (${measured}).` : `Not chosen: it did not measure better than the prototype (${measured}); from-examples models stay prototypes.`;

  const stored = await sequelize.transaction(async (transaction) => {
    await Collection.findByPk(collectionId, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
    const now = await latestVersion(where, transaction);
    if (!opts.force && now?.fingerprint === training.fingerprint) return null;
    await WeightMapVersion.update({ chosen: false }, { where: { ...where, chosen: true }, transaction });
    return WeightMapVersion.create(
      {
        ...where,
        sourceCollectionId: null,
        version: (now?.version ?? 0) + 1,
        kind: map.kind,
        mapId: map.id,
        dimension: map.dimension,
        weights: map.toBuffer(),
        fingerprint: training.fingerprint,
        trainedOn: { subjects: training.subjects.map((s) => ({ subjectId: s.subjectId, label: s.label, examples: s.exampleIds.length, confirmed: s.confirmedItemIds.length, rejected: s.rejectedItemIds.length })), settings },
        validation: validationRecord(comparison, training.subjects.map((s) => s.subjectId), 'prototype'),
        baselineAp: comparison.baselineMeanAP,
        mapAp: comparison.mapMeanAP,
        chosen: comparison.better,
        reason,
      },
      { transaction },
    );
  });
  if (!stored) {
    const raced = await latestVersion(where);
    const chosen = await chosenRegressorRow(collectionId, embedder.id);
    return { status: 'unchanged', latest: summary(raced), chosen: summary(chosen), chosenChanged: (chosen?.id ?? null) !== (before?.id ?? null), reason: 'Another process trained on the same inputs meanwhile.' };
  }
  const chosen = stored.chosen ? stored : null;
  return { status: 'trained', latest: weightMapSummary(stored), chosen: summary(chosen), chosenChanged: (chosen?.id ?? null) !== (before?.id ?? null), reason };
}

function validationRecord(c: HeldOutComparison, subjectIds: readonly number[], baseline: 'prototype' | 're-centring'): Record<string, unknown> {
  return {
    method: c.folds === c.subjects ? 'leave-one-subject-out' : `${c.folds}-fold split of subjects`,
    baseline,
    folds: c.folds,
    subjects: c.subjects,
    metric: 'mean one-vs-rest average precision over the reviewed items',
    perSubject: c.perSubject.map((r) => ({ subjectId: subjectIds[r.task], baselineAp: r.baselineAP, mapAp: r.mapAP })),
  };
}

export async function listWeightMaps(collectionId: number): Promise<WeightMapSummary[]> {
  const rows = await WeightMapVersion.findAll({ where: { collectionId }, order: [['purpose', 'ASC'], ['version', 'DESC']], attributes: { exclude: ['weights'] } });
  return rows.map(weightMapSummary);
}

/** How a carried model is made between two collections, and the stored carry-map version behind the choice. */
export interface CarryDecision {
  use: CarryChoice['use'];
  reason: string;
  map: WeightMap | null;
  version: WeightMapSummary | null;
  sharedSubjects: number;
}

/** Two subjects are the same subject in two collections when they name the same concept (URI), else the same label. */
function sameSubjectKey(s: Pick<Subject, 'conceptUri' | 'prefLabel' | 'kind'>): string {
  return s.conceptUri ? `uri:${s.conceptUri}` : `label:${s.kind}:${s.prefLabel.trim().toLocaleLowerCase('en')}`;
}

/**
 * Decides whether models carried from `sourceCollectionId` to `targetCollectionId` use a carry map: trains one
 * between the shared subjects (source subject models → target confirmed items) when there are enough of them,
 * and uses it only when it beats re-centring alone on held-out shared subjects. The decision is stored as a
 * `carried` weight-map version (same inputs: reused, not retrained).
 */
export async function carryDecision(
  sequelize: Sequelize,
  embedder: EmbedderInfo,
  sourceCollectionId: number,
  targetCollectionId: number,
  opts: { prepared?: PreparedCollection; settings?: Partial<WeightMapSettings> } = {},
): Promise<CarryDecision> {
  const prepared = opts.prepared ?? await prepareCollection(sequelize, targetCollectionId, embedder);
  const [sourceSubjects, targetSubjects] = await Promise.all(
    [sourceCollectionId, targetCollectionId].map((collectionId) => Subject.findAll({ where: { collectionId, status: 'active' }, attributes: ['id', 'prefLabel', 'conceptUri', 'kind'], order: [['id', 'ASC']] })),
  );
  const sourceModels = await SubjectModel.findAll({ where: { subjectId: sourceSubjects!.map((s) => s.id), embedderId: embedder.id, active: true } });
  const modelOf = new Map(sourceModels.map((m) => [m.subjectId, m]));
  const sourceByKey = new Map(sourceSubjects!.filter((s) => modelOf.has(s.id)).map((s) => [sameSubjectKey(s), s]));
  const decisions = await collectionDecisions(sequelize, targetCollectionId);
  const pairs: Array<{ source: number; target: number; model: SubjectModel; confirmed: number[]; rejected: number[] }> = [];
  for (const t of targetSubjects!) {
    const s = sourceByKey.get(sameSubjectKey(t));
    const judged = decisions.get(t.id);
    if (!s || !judged) continue;
    const confirmed = judged.confirmed.filter((id) => prepared.rowOfItem.has(id));
    if (confirmed.length === 0) continue;
    pairs.push({ source: s.id, target: t.id, model: modelOf.get(s.id)!, confirmed, rejected: judged.rejected.filter((id) => prepared.rowOfItem.has(id)) });
  }
  const fingerprint = sha256({ purpose: 'carried', sourceCollectionId, embedderId: embedder.id, settingsVersion: SETTINGS_VERSION, pairs: pairs.map((p) => [p.source, p.model.id, p.target, p.confirmed, p.rejected]) });
  const where = { collectionId: targetCollectionId, purpose: 'carried' as const, embedderId: embedder.id, sourceCollectionId };
  const latest = await WeightMapVersion.findOne({ where, order: [['version', 'DESC']] });
  if (latest && latest.fingerprint === fingerprint) {
    return { use: latest.chosen ? 'map' : 're-centring', reason: latest.reason, map: latest.chosen ? mapOf(latest) : null, version: weightMapSummary(latest), sharedSubjects: pairs.length };
  }
  const shared: SharedSubject[] = pairs.map((p) => ({
    source: fromStoredModel(p.model).weights,
    targetItems: itemRows(prepared, p.confirmed),
    targetItemIds: p.confirmed,
    targetRejected: itemRows(prepared, p.rejected),
  }));
  const settings: WeightMapSettings = { ...CARRY_SETTINGS, ...opts.settings, kind: 'linear' };
  const choice = await chooseCarry(shared, { steps: settings.steps, learningRate: settings.learningRate, seed: settings.seed, alpha: settings.alpha, beta: settings.beta, folds: settings.folds });
  if (!choice.map || !choice.validation) return { use: choice.use, reason: choice.reason, map: null, version: null, sharedSubjects: choice.sharedSubjects };
  const { map, validation } = choice;
  const row = await sequelize.transaction(async (transaction) => {
    await Collection.findByPk(targetCollectionId, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
    const now = await WeightMapVersion.findOne({ where, order: [['version', 'DESC']], transaction });
    if (now?.fingerprint === fingerprint) return now;
    await WeightMapVersion.update({ chosen: false }, { where: { ...where, chosen: true }, transaction });
    return WeightMapVersion.create(
      {
        ...where,
        version: (now?.version ?? 0) + 1,
        kind: map.kind,
        mapId: map.id,
        dimension: map.dimension,
        weights: map.toBuffer(),
        fingerprint,
        trainedOn: { pairs: pairs.map((p) => ({ sourceSubjectId: p.source, sourceModelId: p.model.id, targetSubjectId: p.target, confirmed: p.confirmed.length, rejected: p.rejected.length })), settings },
        validation: validationRecord(validation, pairs.map((p) => p.target), 're-centring'),
        baselineAp: validation.baselineMeanAP,
        mapAp: validation.mapMeanAP,
        chosen: choice.use === 'map',
        reason: choice.reason,
      },
      { transaction },
    );
  });
  return { use: row.chosen ? 'map' : 're-centring', reason: row.reason, map: row.chosen ? mapOf(row) : null, version: weightMapSummary(row), sharedSubjects: pairs.length };
}

/**
 * Active from-examples models (prototype or regressed) whose weight map is not the collection's chosen one any
 * more: a prototype made while no map was chosen, now that one is, and a regressed model of an older version.
 */
export async function subjectsWithStaleMap(collectionId: number, embedderId: string, chosenVersionId: number | null): Promise<number[]> {
  const subjects = await Subject.findAll({ where: { collectionId, status: 'active' }, attributes: ['id'] });
  const models = await SubjectModel.findAll({
    where: { subjectId: { [Op.in]: subjects.map((s) => s.id) }, embedderId, active: true, method: { [Op.in]: ['prototype', 'regressed'] } },
    attributes: ['subjectId', 'madeFrom'],
  });
  return models
    .filter((m) => ((m.madeFrom as { weightMapVersionId?: number | null }).weightMapVersionId ?? null) !== chosenVersionId)
    .map((m) => m.subjectId)
    .sort((a, b) => a - b);
}

/** One sentence on why a from-examples model is a prototype: no map yet, or the newest did not measure better. */
export async function latestRegressorNote(collectionId: number, embedderId: string): Promise<string> {
  const latest = await latestVersion({ collectionId, purpose: 'regressed', embedderId });
  if (!latest) return `The collection has no weight map yet (it needs ${MIN_SUBJECTS_FOR_REGRESSOR} subjects with examples and at least ${MIN_CONFIRMED_FOR_REGRESSOR} confirmed items each).`;
  if (latest.reason.startsWith('Chosen')) return `The collection's weight map version ${latest.version} is no longer used: fewer than ${MIN_SUBJECTS_FOR_REGRESSOR} subjects have examples and at least ${MIN_CONFIRMED_FOR_REGRESSOR} confirmed items now.`;
  return `The collection's weight map version ${latest.version} is not used. ${latest.reason}`;
}
