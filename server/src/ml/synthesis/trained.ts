/**
 * Trained: once a subject has enough confirmations and rejections, an L2-regularised logistic regression
 * on them (confirmed = 1, rejected = 0), Platt-calibrated on cross-validated scores (Platt 1999 fits the
 * sigmoid on held-out outputs, not on the training outputs).
 */
import { fitPlatt, type PlattCalibration } from '../calibration.ts';
import { dot } from '../features.ts';
import type { LinearModel } from '../model.ts';
import { seededRng, shuffled } from '../random.ts';
import { fitLogistic, type LogisticOptions } from './logistic.ts';

export const MIN_FOR_TRAINED = { confirmed: 10, rejected: 10 };

export function canTrain(counts: { confirmed: number; rejected: number }, minimum = MIN_FOR_TRAINED): boolean {
  return counts.confirmed >= minimum.confirmed && counts.rejected >= minimum.rejected;
}

export interface TrainedInput extends LogisticOptions {
  confirmed: readonly Float32Array[];
  rejected: readonly Float32Array[];
  /** folds for the cross-validated scores behind the calibration (default 5) */
  folds?: number;
  seed?: number;
}

export interface TrainedResult {
  model: LinearModel;
  calibration: PlattCalibration;
  /** out-of-fold scores of every judged item, confirmed first then rejected */
  heldOut: { scores: Float32Array; labels: number[] };
}

export async function trainedModel(input: TrainedInput): Promise<TrainedResult> {
  const { confirmed, rejected } = input;
  if (!canTrain({ confirmed: confirmed.length, rejected: rejected.length }, { confirmed: 2, rejected: 2 })) {
    throw new Error(`a trained model needs confirmations and rejections (got ${confirmed.length} and ${rejected.length})`);
  }
  const all = [...confirmed.map((x) => ({ x, y: 1 })), ...rejected.map((x) => ({ x, y: 0 }))];
  const folds = Math.max(2, Math.min(input.folds ?? 5, confirmed.length, rejected.length));
  const rng = seededRng(input.seed ?? 1);
  // stratified folds
  const foldOf = new Int32Array(all.length);
  for (const y of [1, 0]) {
    const idx = shuffled(all.map((a, i) => (a.y === y ? i : -1)).filter((i) => i >= 0), rng);
    idx.forEach((i, j) => (foldOf[i] = j % folds));
  }
  const scores = new Float32Array(all.length);
  for (let f = 0; f < folds; f++) {
    const train = all.filter((_, i) => foldOf[i] !== f);
    const m = await fitLogistic(train.filter((a) => a.y === 1).map((a) => a.x), train.filter((a) => a.y === 0).map((a) => a.x), input);
    all.forEach((a, i) => {
      if (foldOf[i] === f) scores[i] = dot(m.weights, a.x) + m.bias;
    });
  }
  const labels = all.map((a) => a.y);
  const model = await fitLogistic(confirmed, rejected, input);
  return { model, calibration: fitPlatt(scores, labels), heldOut: { scores, labels } };
}
