/**
 * One call from stored features to a storable subject-model version: prepares the features with the
 * collection's centres, picks (or applies) a synthesis method, measures the model by leave-one-out,
 * calibrates it, and returns the values for the `subject_models` columns. For the methods that need
 * more context — refined (a narrower subject), carried (from another collection), scoped transductive
 * refinement — call their functions in synthesis/ directly.
 */
import { calibrate, scoreStats, type Calibration } from './calibration.ts';
import { exampleCentre, prepareFeature, scanCentre, type CollectionCentres, type FeatureLayout } from './centring.ts';
import { toStoredModel, type LinearModel, type StoredSubjectModel, type SynthesisMethod } from './model.ts';
import { assessModel, type Judgement, type QualityRecord } from './quality.ts';
import { scoreAll } from './ranking.ts';
import { fitLogistic } from './synthesis/logistic.ts';
import { photoAugmentedModel } from './synthesis/photo-augmented.ts';
import { prototypeModel } from './synthesis/prototype.ts';
import { MIN_CONFIRMED_FOR_REGRESSOR, trainWeightMapWithValidation, type RegressorValidation, type WeightMap } from './synthesis/regressor.ts';
import { canTrain, trainedModel } from './synthesis/trained.ts';

/** A stored (raw) feature and the id of what it belongs to (example id or item id). */
export interface RawFeature {
  id: number;
  feature: Float32Array;
}

export interface SubjectJudgements {
  /** the subject's examples (raw example embeddings; mirror-averaged when made with embedWithMirror) */
  examples: readonly RawFeature[];
  /** items accepted or added for the subject */
  confirmed: readonly RawFeature[];
  /** items rejected for the subject */
  rejected: readonly RawFeature[];
  /** items confirmed for other subjects, standing in as negatives when there are few rejections */
  others?: readonly RawFeature[];
}

export interface SynthesisContext {
  embedderId: string;
  layout: FeatureLayout;
  centres: CollectionCentres;
  /** the collection's prepared item matrix (rows × dimension): the reference for z-scores and the threshold */
  collectionMatrix?: Float32Array;
  /** the collection's weight regressor, used only when its validation measured it better than the prototype */
  regressor?: { map: WeightMap; validation: RegressorValidation } | null;
}

export interface SynthesisResult {
  method: SynthesisMethod;
  model: LinearModel;
  calibration: Calibration;
  quality: QualityRecord;
  stored: StoredSubjectModel;
}

/** The method the product uses for these counts: trained, then photo-augmented, then regressed, then prototype. */
export function chooseMethod(counts: { examples: number; confirmed: number; rejected: number }, regressorUsable: boolean): SynthesisMethod {
  if (canTrain({ confirmed: counts.confirmed, rejected: counts.rejected })) return 'trained';
  if (counts.confirmed > 0) return 'photo_augmented';
  if (counts.examples === 0) throw new Error('a subject model needs examples or confirmed items');
  return regressorUsable ? 'regressed' : 'prototype';
}

export async function synthesizeSubjectModel(
  j: SubjectJudgements,
  ctx: SynthesisContext,
  method: SynthesisMethod | 'auto' = 'auto',
): Promise<SynthesisResult> {
  const regressor = ctx.regressor?.validation.better ? ctx.regressor.map : undefined;
  const chosen = method === 'auto' ? chooseMethod({ examples: j.examples.length, confirmed: j.confirmed.length, rejected: j.rejected.length }, !!regressor) : method;
  if (chosen === 'refined' || chosen === 'carried') throw new Error(`${chosen} models are made with refinedModel / carriedModel`);
  if (chosen === 'regressed' && !ctx.regressor) throw new Error('the regressed method needs the collection’s weight regressor');
  const exCentre = exampleCentre(ctx.centres);
  const itemCentre = scanCentre(ctx.centres);
  const ex = j.examples.map((x) => prepareFeature(x.feature, exCentre, ctx.layout));
  const conf = j.confirmed.map((x) => prepareFeature(x.feature, itemCentre, ctx.layout));
  const rej = j.rejected.map((x) => prepareFeature(x.feature, itemCentre, ctx.layout));
  const others = (j.others ?? []).map((x) => prepareFeature(x.feature, itemCentre, ctx.layout));

  const positives: Judgement[] = [...ex.map((feature) => ({ feature, kind: 'example' as const })), ...conf.map((feature) => ({ feature, kind: 'confirmed' as const }))];
  const negatives: Judgement[] = [...rej.map((feature) => ({ feature, kind: 'rejected' as const })), ...others.map((feature) => ({ feature, kind: 'other-subject' as const }))];
  const split = (pos: readonly Judgement[]) => ({
    examples: pos.filter((p) => p.kind === 'example').map((p) => p.feature),
    confirmed: pos.filter((p) => p.kind === 'confirmed').map((p) => p.feature),
  });
  const build = async (pos: readonly Judgement[], neg: readonly Judgement[]): Promise<LinearModel> => {
    const { examples, confirmed } = split(pos);
    switch (chosen) {
      case 'prototype':
        return prototypeModel(examples.length > 0 ? examples : confirmed);
      case 'regressed':
        return (ctx.regressor!.map).model(examples);
      case 'photo_augmented':
        return photoAugmentedModel({ examples, confirmed, regressor });
      case 'trained':
        return fitLogistic(confirmed, neg.map((n) => n.feature));
    }
  };

  const model = chosen === 'trained' ? (await trainedModel({ confirmed: conf, rejected: [...rej, ...others] })).model : await build(positives, negatives);
  const collectionStats = ctx.collectionMatrix ? scoreStats(scoreAll(ctx.collectionMatrix, ctx.layout.blocks.reduce((a, b) => a + b, 0), model)) : undefined;
  const assessment = await assessModel({
    method: chosen,
    positives,
    negatives,
    build,
    usesNegatives: chosen === 'trained',
    collection: collectionStats,
    // logistic fits are the costly ones: ten folds at most
    maxFits: chosen === 'trained' ? 10 : 60,
  });
  const reference = collectionStats ?? scoreStats(Float32Array.from(negatives.map((n) => n.feature.reduce((s, v, i) => s + v * model.weights[i]!, model.bias))));
  const calibration = calibrate(assessment.decisions, reference);
  const madeFrom = {
    exampleIds: j.examples.map((x) => x.id),
    confirmedItemIds: j.confirmed.map((x) => x.id),
    rejectedItemIds: j.rejected.map((x) => x.id),
    ...(chosen === 'regressed' || (chosen === 'photo_augmented' && regressor) ? { regressorId: ctx.regressor!.map.id } : {}),
    centres: { scans: ctx.centres.scans.count, examples: ctx.centres.examples.count, subjectsWithExamples: ctx.centres.subjectsWithExamples },
  };
  return {
    method: chosen,
    model,
    calibration,
    quality: assessment.quality,
    stored: toStoredModel(model, { method: chosen, embedderId: ctx.embedderId, calibration, metrics: assessment.quality, madeFrom }),
  };
}

/** Subjects with fewer qualifying subjects than this get no regressor (validation needs held-out subjects). */
export const MIN_SUBJECTS_FOR_REGRESSOR = 5;

/**
 * The collection's weight regressor: trained on its subjects that have examples and at least
 * MIN_CONFIRMED_FOR_REGRESSOR confirmed items, validated on held-out subjects. Null when too few
 * subjects qualify. Store `map.toBuffer()` with the collection; `validation.better` decides its use.
 */
export async function trainCollectionRegressor(
  subjects: readonly { examples: readonly RawFeature[]; confirmed: readonly RawFeature[] }[],
  ctx: Pick<SynthesisContext, 'layout' | 'centres'>,
  options: Parameters<typeof trainWeightMapWithValidation>[1] = {},
): Promise<{ map: WeightMap; validation: RegressorValidation; subjects: number } | null> {
  const qualifying = subjects.filter((s) => s.examples.length > 0 && s.confirmed.length >= MIN_CONFIRMED_FOR_REGRESSOR);
  if (qualifying.length < MIN_SUBJECTS_FOR_REGRESSOR) return null;
  const exCentre = exampleCentre(ctx.centres);
  const itemCentre = scanCentre(ctx.centres);
  const tasks = qualifying.map((s) => ({
    examples: s.examples.map((x) => prepareFeature(x.feature, exCentre, ctx.layout)),
    items: s.confirmed.map((x) => prepareFeature(x.feature, itemCentre, ctx.layout)),
  }));
  const { map, validation } = await trainWeightMapWithValidation(tasks, options);
  return { map, validation, subjects: qualifying.length };
}
