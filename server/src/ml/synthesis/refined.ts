/**
 * Refined: a narrower subject synthesized from its broader subject plus a few examples of its own, and
 * scored only among the items carrying the broader subject. Measured best variant: the narrower
 * subject's (regressed) prototype minus the mean of its sibling narrower subjects' weights, projected on
 * the top principal directions of the broader subject's items — what tells siblings apart inside the
 * broader subject, without the part they all share.
 */
import { addScaled, dot, meanOf, normalise } from '../features.ts';
import { principalDirections, projectOnto } from '../linalg.ts';
import type { LinearModel } from '../model.ts';
import { prototypeWeights } from './prototype.ts';
import type { WeightMap } from './regressor.ts';

export interface RefinedInput {
  /** prepared features of the narrower subject's examples */
  examples: readonly Float32Array[];
  /** prepared features of items carrying the broader subject (confirmed, or its ranked list) */
  broaderItems: readonly Float32Array[];
  /** weights of the other narrower subjects of the same broader subject (same method), may be empty */
  siblings: readonly Float32Array[];
  /** the broader subject's model: without siblings, its direction is removed instead */
  broader?: LinearModel;
  regressor?: WeightMap;
  /** principal directions kept (default 16) */
  components?: number;
}

/** The narrower subject's weights before the sibling and subspace steps: normalise(T(prototype)) or the prototype. */
export function narrowerBaseWeights(examples: readonly Float32Array[], regressor?: WeightMap): Float32Array {
  const p = prototypeWeights(examples);
  return regressor ? normalise(regressor.apply(p)) : p;
}

export function refinedModel(input: RefinedInput): LinearModel {
  const w0 = narrowerBaseWeights(input.examples, input.regressor);
  let w: Float32Array;
  if (input.siblings.length > 0) {
    w = addScaled(w0, meanOf([w0, ...input.siblings]), -1);
  } else if (input.broader) {
    const b = normalise(input.broader.weights);
    w = addScaled(w0, b, -dot(w0, b));
  } else {
    w = w0;
  }
  if (input.broaderItems.length >= 3) {
    const k = Math.min(input.components ?? 16, input.broaderItems.length - 1);
    const { directions } = principalDirections(input.broaderItems, k);
    const projected = projectOnto(w, directions);
    if (projected.some((x) => x !== 0)) w = projected;
  }
  return { weights: normalise(w), bias: 0 };
}
