/**
 * Quality records: how a subject model measures, stored with each model version. Each positive judgement
 * (an example, a confirmed item) is scored by the model rebuilt without it (leave-one-out; in folds
 * beyond `maxFits` judgements); negatives (rejected items, or other subjects' items standing in as
 * negatives) are scored by the full model, or held out the same way when the method learns from them.
 * From those held-out scores: average precision, AUROC, and precision and recall at the ranked-list
 * threshold (z ≥ 2 against the collection). The held-out scores of confirmed and rejected items are also
 * what Platt scaling is fitted on.
 */
import { scoreStats, type ScoreStats } from './calibration.ts';
import { dot } from './features.ts';
import type { QualityRecord, SynthesisMethod } from '../../../common/api/subjects.ts';
import type { LinearModel } from './model.ts';
import { auroc, averagePrecision } from './metrics.ts';
import { seededRng, shuffled } from './random.ts';

export type JudgementKind = 'example' | 'confirmed' | 'rejected' | 'other-subject';

export interface Judgement {
  feature: Float32Array;
  kind: JudgementKind;
}

export type { QualityRecord };

export interface AssessInput {
  method: SynthesisMethod;
  positives: readonly Judgement[];
  negatives: readonly Judgement[];
  /** rebuilds the model from a subset of the judgements */
  build: (positives: readonly Judgement[], negatives: readonly Judgement[]) => LinearModel | Promise<LinearModel>;
  /** the method learns from negatives (trained): hold them out too */
  usesNegatives?: boolean;
  /** distribution of the full model's scores over the collection (threshold reference); the negatives' scores otherwise */
  collection?: ScoreStats;
  minZ?: number;
  /** at most this many rebuilds (default 60): beyond, k-fold with this many folds */
  maxFits?: number;
  seed?: number;
}

export interface Assessment {
  quality: QualityRecord;
  /** held-out scores of confirmed (1) and rejected (0) items: the data for Platt scaling */
  decisions: { scores: Float32Array; labels: number[] };
}

export async function assessModel(input: AssessInput): Promise<Assessment> {
  const minZ = input.minZ ?? 2;
  const maxFits = input.maxFits ?? 60;
  const all = [...input.positives.map((j) => ({ j, y: 1 })), ...input.negatives.map((j) => ({ j, y: 0 }))];
  const heldOutIdx = all.map((a, i) => (a.y === 1 || input.usesNegatives ? i : -1)).filter((i) => i >= 0);
  const scheme: QualityRecord['scheme'] = heldOutIdx.length <= maxFits ? 'leave-one-out' : 'k-fold';
  const folds = scheme === 'leave-one-out' ? heldOutIdx.length : maxFits;
  const foldOf = new Int32Array(all.length).fill(-1);
  shuffled(heldOutIdx, seededRng(input.seed ?? 1)).forEach((i, n) => (foldOf[i] = n % Math.max(1, folds)));
  const scores = new Float32Array(all.length);
  if (input.positives.length > 0) {
    for (let f = 0; f < folds; f++) {
      const keep = all.filter((_, i) => foldOf[i] !== f);
      const pos = keep.filter((a) => a.y === 1).map((a) => a.j);
      if (pos.length === 0) continue; // a single positive cannot be left out: it stays unscored
      const model = await input.build(pos, keep.filter((a) => a.y === 0).map((a) => a.j));
      all.forEach((a, i) => {
        if (foldOf[i] === f) scores[i] = dot(model.weights, a.j.feature) + model.bias;
      });
    }
    if (!input.usesNegatives) {
      const full = await input.build(input.positives, input.negatives);
      all.forEach((a, i) => {
        if (a.y === 0) scores[i] = dot(full.weights, a.j.feature) + full.bias;
      });
    }
  }
  const scoredIdx = all.map((_, i) => i).filter((i) => !(all[i]!.y === 1 && input.positives.length === 1));
  const labels = scoredIdx.map((i) => all[i]!.y);
  const s = Float32Array.from(scoredIdx, (i) => scores[i]!);
  const hasBoth = labels.includes(1) && labels.includes(0);
  const reference = input.collection ?? scoreStats(Float32Array.from(all.map((a, i) => (a.y === 0 ? scores[i]! : NaN)).filter((x) => !Number.isNaN(x))));
  const thr = reference.mean + minZ * reference.std;
  let tp = 0;
  let listed = 0;
  labels.forEach((y, i) => {
    if (s[i]! >= thr) {
      listed++;
      tp += y;
    }
  });
  const positivesScored = labels.filter((y) => y === 1).length;
  const count = (k: JudgementKind) => [...input.positives, ...input.negatives].filter((j) => j.kind === k).length;
  const quality: QualityRecord = {
    method: input.method,
    scheme,
    folds,
    averagePrecision: hasBoth ? averagePrecision(labels, s) : null,
    auroc: hasBoth ? auroc(labels, s) : null,
    threshold: { minZ, score: thr, precision: listed ? tp / listed : null, recall: positivesScored ? tp / positivesScored : null, listed },
    judgements: { examples: count('example'), confirmed: count('confirmed'), rejected: count('rejected'), otherSubject: count('other-subject') },
  };
  const decisionIdx = all.map((a, i) => (a.j.kind === 'confirmed' || a.j.kind === 'rejected' ? i : -1)).filter((i) => i >= 0 && scoredIdx.includes(i));
  return {
    quality,
    decisions: { scores: Float32Array.from(decisionIdx, (i) => scores[i]!), labels: decisionIdx.map((i) => all[i]!.y) },
  };
}
