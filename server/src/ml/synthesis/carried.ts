/**
 * Carried: a subject model made on one collection (say, drawings) used on another (say, photographs).
 * When the two collections share subjects that have models on the source side and confirmed items on the
 * target side, a weight regressor T is trained between them (source weights → target many-shot weights,
 * the same loss as the regressed method); otherwise the model is carried by re-centring alone: its weights
 * live in the prepared (centred, normalised) space, so scoring the target collection's features prepared
 * with the target's own means is already the carry.
 */
import { normalise } from '../features.ts';
import type { LinearModel } from '../model.ts';
import { compareOnHeldOutSubjects, trainRegressor, type HeldOutComparison, type RegressorOptions, type WeightMap, type WeightRegressor } from './regressor.ts';

export interface SharedSubject {
  /** the subject model's weights on the source collection (several versions may be given) */
  source: Float32Array | readonly Float32Array[];
  /** prepared features of the subject's confirmed items on the target collection */
  targetItems: readonly Float32Array[];
  /** ids of `targetItems` (an item confirmed for two shared subjects then counts for both when validating) */
  targetItemIds?: readonly number[];
  /** prepared features of items rejected for the subject on the target collection (negatives when validating) */
  targetRejected?: readonly Float32Array[];
}

/** Minimum shared subjects to train a carry map (fewer: re-centring alone). */
export const MIN_SHARED_SUBJECTS = 8;

export async function trainCarryMap(shared: readonly SharedSubject[], options: RegressorOptions = {}): Promise<WeightRegressor | null> {
  const usable = shared.filter((s) => s.targetItems.length > 0);
  if (usable.length < MIN_SHARED_SUBJECTS) return null;
  return trainRegressor(
    usable.map((s) => ({ examples: [], items: s.targetItems, inputs: s.source instanceof Float32Array ? [s.source] : s.source })),
    { kind: 'linear', ...options },
  );
}

export function carriedModel(source: LinearModel, map?: WeightMap | null): LinearModel {
  return { weights: map ? normalise(map.apply(normalise(source.weights))) : Float32Array.from(source.weights), bias: 0 };
}

export interface CarryChoice {
  /** what carried models between the two collections should use */
  use: 'map' | 're-centring';
  /** why, in words */
  reason: string;
  /** the carry map trained on all shared subjects (kept for the record even when `use` is 're-centring'), null below the minimum */
  map: WeightRegressor | null;
  /** held-out comparison of the map against re-centring alone, when there were enough shared subjects */
  validation: HeldOutComparison | null;
  sharedSubjects: number;
}

const ap = (x: number) => x.toFixed(3);

/**
 * Decides how to carry models between two collections: a carry map T is trained only with at least
 * MIN_SHARED_SUBJECTS shared subjects that have confirmed items on the target side, and used only when a map
 * trained without each held-out shared subject ranks that subject's target items better (mean AP) than the
 * source model re-centred alone; otherwise re-centring alone.
 */
export async function chooseCarry(shared: readonly SharedSubject[], options: RegressorOptions & { folds?: number } = {}): Promise<CarryChoice> {
  const usable = shared.filter((s) => s.targetItems.length > 0);
  if (usable.length < MIN_SHARED_SUBJECTS) {
    return {
      use: 're-centring',
      reason: `${usable.length} shared subject(s) have confirmed items on this collection; a carry map needs at least ${MIN_SHARED_SUBJECTS}, so the model is carried by re-centring alone.`,
      map: null,
      validation: null,
      sharedSubjects: usable.length,
    };
  }
  const tasks = usable.map((s) => ({
    examples: [],
    items: s.targetItems,
    itemIds: s.targetItemIds,
    rejected: s.targetRejected,
    inputs: s.source instanceof Float32Array ? [s.source] : s.source,
  }));
  const { folds, ...regressorOptions } = options;
  const validation = await compareOnHeldOutSubjects(tasks, (ts) => trainRegressor(ts, { kind: 'linear', ...regressorOptions }), { folds, seed: options.seed });
  const measured = `held-out AP ${ap(validation.mapMeanAP)} with the carry map against ${ap(validation.baselineMeanAP)} by re-centring alone, over ${validation.subjects} shared subjects in ${validation.folds} folds`;
  const map = await trainCarryMap(usable, regressorOptions);
  if (!validation.better) {
    return { use: 're-centring', reason: `The carry map did not measure better (${measured}), so the model is carried by re-centring alone.`, map, validation, sharedSubjects: usable.length };
  }
  return { use: 'map', reason: `The carry map measured better (${measured}).`, map, validation, sharedSubjects: usable.length };
}
