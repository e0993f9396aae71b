/**
 * Photo-augmented: confirmed items join the examples as photo examples. Confirmed scans are in the
 * domain being searched, so they pull the model toward what the collection's scans of the subject look
 * like — the largest single gain measured for drawing-defined subjects.
 *
 * w = normalise( (1 − λ)·d̂ + λ·ĉ ), where d̂ is the unit drawing-side direction (the prototype of the
 * examples, or T of it when a weight regressor is given), ĉ the prototype of the confirmed items and
 * λ = m / (m + k·r) for m confirmed items and k examples: each confirmed item counts as much as
 * `1/r` examples (r = `exampleWeight`, default 0.5; r = 1 without a regressor is the plain prototype
 * of the union).
 */
import { addScaled, normalise } from '../features.ts';
import type { LinearModel } from '../model.ts';
import { prototypeWeights } from './prototype.ts';
import type { WeightMap } from './regressor.ts';

export interface PhotoAugmentedInput {
  /** prepared example features (drawings, illustrations or photos); may be empty */
  examples: readonly Float32Array[];
  /** prepared features of the subject's confirmed (accepted or added) items */
  confirmed: readonly Float32Array[];
  /** maps the examples' prototype first, as the regressed method does */
  regressor?: WeightMap;
  /** weight of one example relative to one confirmed item (default 0.5, measured best on the bench with a regressor) */
  exampleWeight?: number;
}

export function photoAugmentedModel(input: PhotoAugmentedInput): LinearModel {
  const k = input.examples.length;
  const m = input.confirmed.length;
  if (k + m === 0) throw new Error('a photo-augmented model needs examples or confirmed items');
  if (m === 0) {
    const p = prototypeWeights(input.examples);
    return { weights: normalise(input.regressor ? input.regressor.apply(p) : p), bias: 0 };
  }
  const c = prototypeWeights(input.confirmed);
  if (k === 0) return { weights: c, bias: 0 };
  const p = prototypeWeights(input.examples);
  const dHat = normalise(input.regressor ? input.regressor.apply(p) : p);
  const r = input.exampleWeight ?? 0.5;
  const lambda = m / (m + k * r);
  return { weights: normalise(addScaled(dHat.map((x) => x * (1 - lambda)), c, lambda)), bias: 0 };
}
