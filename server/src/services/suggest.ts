import { Op, QueryTypes, type Sequelize } from 'sequelize';
import { fromStoredModel, probabilityOf, rankItems, type Calibration, type Embedder } from '../ml/index.ts';
import { Item, Subject, SubjectModel, Suggestion } from '../models/index.ts';
import { prepareCollection } from './features.ts';
import { synthesizeSubjectModel } from './subject-models.ts';
import { refreshRegressor, subjectsWithStaleMap, type RefreshOutcome, type WeightMapSettings } from './weight-maps.ts';
import { refreshCollectionReviewMargins } from '../models/review-margin.ts';

type EmbedderInfo = Pick<Embedder, 'id' | 'dimension' | 'layout'>;

export interface SuggestOptions {
  /** longest ranked list per subject and night (default 200) */
  topN?: number;
  /** z-score cut-off against the collection (default 2) */
  minZ?: number;
  runId?: number | null;
  onProgress?: (done: number, total: number) => Promise<void> | void;
  shouldStop?: () => Promise<boolean>;
}

/**
 * Applies every active subject model of a collection to its items that are not approved, and keeps one
 * proposal per (item, subject): the ranked list of the newest model version replaces the older proposals
 * (proposals are the machine's, never a person's decision — those are left untouched). Running it twice
 * with the same models gives the same suggestions.
 */
export async function suggestForCollection(sequelize: Sequelize, embedder: EmbedderInfo, collectionId: number, opts: SuggestOptions = {}): Promise<{ proposed: number; subjects: number }> {
  const subjects = await Subject.findAll({ where: { collectionId, status: 'active' }, attributes: ['id'] });
  const models = await SubjectModel.findAll({ where: { subjectId: subjects.map((s) => s.id), embedderId: embedder.id, active: true } });
  if (models.length === 0) return { proposed: 0, subjects: 0 };
  const prepared = await prepareCollection(sequelize, collectionId, embedder);
  const approved = new Set(
    (await Item.findAll({ where: { collectionId, state: 'approved' }, attributes: ['id'] })).map((i) => i.id),
  );
  let proposed = 0;
  let done = 0;
  for (const row of models) {
    if (await opts.shouldStop?.()) break;
    const decided = new Set(
      (await Suggestion.findAll({ where: { subjectId: row.subjectId, state: { [Op.ne]: 'proposed' } }, attributes: ['itemId'] })).map((s) => s.itemId),
    );
    const exclude = new Set<number>();
    prepared.itemIds.forEach((id, r) => {
      if (approved.has(id) || decided.has(id)) exclude.add(r);
    });
    const calibration = row.calibration as unknown as Calibration | null;
    const ranked = rankItems(prepared.items, prepared.dimension, fromStoredModel(row), {
      topN: opts.topN ?? 200,
      minZ: opts.minZ ?? 2,
      exclude,
      calibration: calibration ?? undefined,
    });
    await sequelize.transaction(async (transaction) => {
      const keep = ranked.items.map((r) => prepared.itemIds[r.row]!);
      await Suggestion.destroy({ where: { subjectId: row.subjectId, state: 'proposed', ...(keep.length ? { itemId: { [Op.notIn]: keep } } : {}) }, transaction });
      for (const r of ranked.items) {
        const itemId = prepared.itemIds[r.row]!;
        const probability = calibration ? probabilityOf(calibration, r.score) : null;
        // one statement per pair: the unique (item, subject) index makes a rerun update, never duplicate
        await sequelize.query(
          `INSERT INTO suggestions (item_id, subject_id, subject_model_id, run_id, score, probability, state, version)
           VALUES (:itemId, :subjectId, :modelId, :runId, :score, :probability, 'proposed', 1)
           ON DUPLICATE KEY UPDATE
             subject_model_id = IF(state = 'proposed', VALUES(subject_model_id), subject_model_id),
             run_id = IF(state = 'proposed', VALUES(run_id), run_id),
             score = IF(state = 'proposed', VALUES(score), score),
             probability = IF(state = 'proposed', VALUES(probability), probability),
             version = IF(state = 'proposed' AND (score <> VALUES(score) OR subject_model_id <> VALUES(subject_model_id)), version + 1, version)`,
          { replacements: { itemId, subjectId: row.subjectId, modelId: row.id, runId: opts.runId ?? null, score: r.score, probability }, transaction, type: QueryTypes.INSERT },
        );
      }
      proposed += ranked.items.length;
    });
    await opts.onProgress?.(++done, models.length);
  }
  // items with a proposal waiting are 'suggested'; items whose proposals all went are 'new' again
  await sequelize.query(
    `UPDATE items i SET i.state = IF(EXISTS (SELECT 1 FROM suggestions s WHERE s.item_id = i.id AND s.state = 'proposed'), 'suggested', 'new'),
            i.version = i.version + 1
      WHERE i.collection_id = :collectionId AND i.state <> 'approved'
        AND i.state <> IF(EXISTS (SELECT 1 FROM suggestions s WHERE s.item_id = i.id AND s.state = 'proposed'), 'suggested', 'new')`,
    { replacements: { collectionId } },
  );
  // the review queue's order (the proposals above were written by SQL of their own, past the model's hooks)
  await refreshCollectionReviewMargins(sequelize, collectionId);
  return { proposed, subjects: models.length };
}

/**
 * Subjects whose model is older than the review decisions about them (or that have examples but no model):
 * the night shift rebuilds these, with the best method their judgements allow.
 */
export async function subjectsToRetrain(sequelize: Sequelize, collectionId: number, embedderId: string): Promise<number[]> {
  const rows = await sequelize.query<{ id: number }>(
    `SELECT s.id FROM subjects s
      LEFT JOIN subject_models m ON m.subject_id = s.id AND m.active = 1 AND m.embedder_id = :embedderId
      WHERE s.collection_id = :collectionId AND s.status = 'active'
        AND ( (m.id IS NULL AND EXISTS (SELECT 1 FROM examples x WHERE x.subject_id = s.id))
           OR (m.id IS NOT NULL AND EXISTS (SELECT 1 FROM suggestions g WHERE g.subject_id = s.id AND g.state <> 'proposed' AND g.decided_at > m.created_at)) )
      ORDER BY s.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId, embedderId } },
  );
  return rows.map((r) => Number(r.id));
}

export interface RetrainOutcome {
  retrained: number;
  failed: Array<{ subjectId: number; reason: string }>;
  /** what happened to the collection's weight map */
  weightMap: Pick<RefreshOutcome, 'status' | 'chosenChanged' | 'reason'> & { version: number | null; chosenVersion: number | null };
}

/**
 * Tonight's retraining for a collection: first the weight map (retrained only when the decisions about its
 * training subjects changed), then every subject whose decisions are newer than its model, or whose
 * from-examples model was made with another weight map than the one chosen now. Idempotent: a second call
 * with nothing new trains nothing and rebuilds nothing.
 */
export async function retrainCollection(
  sequelize: Sequelize,
  embedder: EmbedderInfo,
  collectionId: number,
  opts: Pick<SuggestOptions, 'onProgress' | 'shouldStop'> & { regressorSettings?: Partial<WeightMapSettings> } = {},
): Promise<RetrainOutcome> {
  const map = await refreshRegressor(sequelize, embedder, collectionId, { settings: opts.regressorSettings });
  const weightMap = { status: map.status, chosenChanged: map.chosenChanged, reason: map.reason, version: map.latest?.version ?? null, chosenVersion: map.chosen?.version ?? null };
  const byDecision = await subjectsToRetrain(sequelize, collectionId, embedder.id);
  const byMap = await subjectsWithStaleMap(collectionId, embedder.id, map.chosen?.id ?? null);
  const ids = [...new Set([...byDecision, ...byMap])].sort((a, b) => a - b);
  const failed: Array<{ subjectId: number; reason: string }> = [];
  let retrained = 0;
  for (const [i, subjectId] of ids.entries()) {
    if (await opts.shouldStop?.()) break;
    try {
      await synthesizeSubjectModel(sequelize, embedder, subjectId, { mode: 'from-examples' }, null);
      retrained++;
    } catch (err) {
      failed.push({ subjectId, reason: (err as Error).message });
    }
    await opts.onProgress?.(i + 1, ids.length);
  }
  return { retrained, failed, weightMap };
}
