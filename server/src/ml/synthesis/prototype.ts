/**
 * Prototype — weight imprinting (Qi, Brown & Lowe, "Low-Shot Learning with Imprinted Weights", CVPR 2018):
 * the subject's weight vector is the normalised mean of its examples' normalised embeddings. Here the
 * embeddings are prepared features (centred with the example mean, block-normalised; see centring.ts).
 */
import { assertFeatures, meanOf, normalise } from '../features.ts';
import type { LinearModel } from '../model.ts';

export function prototypeWeights(examples: readonly Float32Array[]): Float32Array {
  if (examples.length === 0) throw new Error('a prototype needs at least one example');
  assertFeatures(examples, examples[0]!.length, 'example');
  return normalise(meanOf(examples.map(normalise)));
}

/** The prototype model: w = normalise(mean(normalise(xᵢ))), b = 0; its score is the cosine to the prototype. */
export function prototypeModel(examples: readonly Float32Array[]): LinearModel {
  return { weights: prototypeWeights(examples), bias: 0 };
}
