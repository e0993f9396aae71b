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
import { trainRegressor, type RegressorOptions, type WeightMap, type WeightRegressor } from './regressor.ts';

export interface SharedSubject {
  /** the subject model's weights on the source collection (several versions may be given) */
  source: Float32Array | readonly Float32Array[];
  /** prepared features of the subject's confirmed items on the target collection */
  targetItems: readonly Float32Array[];
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
