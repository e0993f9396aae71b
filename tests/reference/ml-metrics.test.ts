import { describe, expect, it } from 'vitest';
import {
  accuracy,
  auroc,
  averagePrecision,
  binaryScores,
  calibrationError,
  classificationReport,
  cohenKappa,
  meanAveragePrecision,
} from '../../server/src/ml/metrics.ts';

describe('precision, recall, F1 (scikit-learn f1_score / precision_recall_fscore_support documentation)', () => {
  // scikit-learn, sklearn.metrics.f1_score docstring example: y_true [0,1,2,0,1,2], y_pred [0,2,1,0,0,1]
  const yTrue = [0, 1, 2, 0, 1, 2];
  const yPred = [0, 2, 1, 0, 0, 1];
  const r = classificationReport(yTrue, yPred);

  it('per-class F1 is [0.8, 0, 0]', () => {
    expect(r.perClass.map((c) => c.f1)).toEqual([expect.closeTo(0.8, 10), 0, 0]);
  });
  it('macro: F1 0.2667, precision 0.2222, recall 0.3333', () => {
    expect(r.macro.f1).toBeCloseTo(0.26666, 4);
    expect(r.macro.precision).toBeCloseTo(0.22222, 4);
    expect(r.macro.recall).toBeCloseTo(0.33333, 4);
  });
  it('micro: precision = recall = F1 = 0.3333', () => {
    expect(r.micro.precision).toBeCloseTo(1 / 3, 10);
    expect(r.micro.recall).toBeCloseTo(1 / 3, 10);
    expect(r.micro.f1).toBeCloseTo(1 / 3, 10);
  });
  it('weighted F1 0.2667', () => {
    expect(r.weighted.f1).toBeCloseTo(0.26666, 4);
  });
  it('binary [0,1,0,1] vs [0,1,0,0] gives F1 0.6667 (same docstring)', () => {
    expect(binaryScores([0, 1, 0, 1], [0, 1, 0, 0]).f1).toBeCloseTo(2 / 3, 10);
  });
  it('micro-averaged F1 over all classes equals accuracy for single-label data (common practice identity)', () => {
    expect(r.micro.f1).toBeCloseTo(accuracy(yTrue, yPred), 12);
  });
});

describe('average precision (scikit-learn average_precision_score documentation)', () => {
  it('y_true [0,0,1,1], scores [0.1,0.4,0.35,0.8] → 0.8333 (AP = Σ (Rₙ − Rₙ₋₁)·Pₙ, not interpolated)', () => {
    expect(averagePrecision([0, 0, 1, 1], [0.1, 0.4, 0.35, 0.8])).toBeCloseTo(0.83333, 4);
  });
  it('mAP averages the per-list AP (the second list ranks its only positive first: AP 1)', () => {
    expect(meanAveragePrecision([
      { labels: [0, 0, 1, 1], scores: [0.1, 0.4, 0.35, 0.8] },
      { labels: [1, 0, 0], scores: [0.9, 0.2, 0.1] },
    ])).toBeCloseTo((0.83333 + 1) / 2, 4);
  });
  it('AUROC of the same example is 0.75 (scikit-learn user guide, ROC section — value from memory, checked by hand: 3 of 4 pairs ordered)', () => {
    // from memory: scikit-learn's roc_auc_score example y_true [0,0,1,1], y_scores [0.1,0.4,0.35,0.8] → 0.75
    expect(auroc([0, 0, 1, 1], [0.1, 0.4, 0.35, 0.8])).toBeCloseTo(0.75, 10);
  });
});

describe("Cohen's kappa (scikit-learn cohen_kappa_score user guide and docstring)", () => {
  it('[2,0,2,2,0,1] vs [0,0,2,2,0,2] → κ = 3/7 ≈ 0.4286 (user guide)', () => {
    expect(cohenKappa([2, 0, 2, 2, 0, 1], [0, 0, 2, 2, 0, 2])).toBeCloseTo(3 / 7, 10);
  });
  it('negative/positive/neutral ratings → κ = 0.6875 (docstring)', () => {
    const a = ['negative', 'positive', 'negative', 'neutral', 'positive'];
    const b = ['negative', 'positive', 'negative', 'neutral', 'negative'];
    expect(cohenKappa(a, b)).toBeCloseTo(0.6875, 10);
  });
});

describe('expected calibration error (torchmetrics BinaryCalibrationError documentation)', () => {
  // torchmetrics BinaryCalibrationError docstring: preds [0.25,0.25,0.55,0.75,0.75], target [0,0,1,1,1], n_bins=2
  const preds = [0.25, 0.25, 0.55, 0.75, 0.75];
  const target = [0, 0, 1, 1, 1];
  const e = calibrationError(preds, target, 2);
  it('L1 norm (ECE) 0.2900', () => expect(e.l1).toBeCloseTo(0.29, 4));
  it('L2 norm 0.2918', () => expect(e.l2).toBeCloseTo(0.2918, 4));
  it('max norm (MCE) 0.3167', () => expect(e.max).toBeCloseTo(0.3167, 4));
});
