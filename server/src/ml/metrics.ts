/**
 * Evaluation metrics: precision, recall, F1 (per class, micro, macro, weighted), average precision and
 * its mean over subjects, area under the ROC curve, Cohen's kappa, expected calibration error.
 * Definitions follow scikit-learn and torchmetrics (their documented examples are reproduced in
 * tests/reference/ml-metrics.test.ts). Undefined ratios (0/0) count as 0, as scikit-learn's
 * `zero_division` default reports them.
 */

export type Label = string | number;

const ratio = (a: number, b: number): number => (b === 0 ? 0 : a / b);

export interface ClassScores {
  label: Label;
  precision: number;
  recall: number;
  f1: number;
  /** how many true instances of the class */
  support: number;
}

export interface AveragedScores {
  precision: number;
  recall: number;
  f1: number;
}

export interface ClassificationReport {
  perClass: ClassScores[];
  micro: AveragedScores;
  macro: AveragedScores;
  weighted: AveragedScores;
}

function f1Of(p: number, r: number): number {
  return p + r === 0 ? 0 : (2 * p * r) / (p + r);
}

/**
 * Multi-class precision, recall and F1. `labels` fixes the classes and their order (default: every label
 * seen in either list, sorted). Micro averages pool the counts; macro averages the per-class values;
 * weighted averages them by support. The macro F1 is the mean of per-class F1 (scikit-learn's definition),
 * not the F1 of the macro precision and recall.
 */
export function classificationReport(yTrue: readonly Label[], yPred: readonly Label[], labels?: readonly Label[]): ClassificationReport {
  if (yTrue.length !== yPred.length) throw new Error(`${yTrue.length} true labels but ${yPred.length} predictions`);
  const classes = labels ?? [...new Set([...yTrue, ...yPred])].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  let tpAll = 0;
  let fpAll = 0;
  let fnAll = 0;
  const perClass = classes.map((c) => {
    let tp = 0;
    let fp = 0;
    let fn = 0;
    for (let i = 0; i < yTrue.length; i++) {
      const t = yTrue[i] === c;
      const p = yPred[i] === c;
      if (t && p) tp++;
      else if (p) fp++;
      else if (t) fn++;
    }
    tpAll += tp;
    fpAll += fp;
    fnAll += fn;
    const precision = ratio(tp, tp + fp);
    const recall = ratio(tp, tp + fn);
    return { label: c, precision, recall, f1: f1Of(precision, recall), support: tp + fn };
  });
  const mean = (k: keyof AveragedScores) => ratio(perClass.reduce((s, c) => s + c[k], 0), perClass.length);
  const totalSupport = perClass.reduce((s, c) => s + c.support, 0);
  const wmean = (k: keyof AveragedScores) => ratio(perClass.reduce((s, c) => s + c[k] * c.support, 0), totalSupport);
  const mp = ratio(tpAll, tpAll + fpAll);
  const mr = ratio(tpAll, tpAll + fnAll);
  return {
    perClass,
    micro: { precision: mp, recall: mr, f1: f1Of(mp, mr) },
    macro: { precision: mean('precision'), recall: mean('recall'), f1: mean('f1') },
    weighted: { precision: wmean('precision'), recall: wmean('recall'), f1: wmean('f1') },
  };
}

/** Binary precision, recall and F1 of the positive label (default 1). */
export function binaryScores(yTrue: readonly Label[], yPred: readonly Label[], positive: Label = 1): AveragedScores {
  const r = classificationReport(yTrue, yPred, [positive]);
  const c = r.perClass[0]!;
  return { precision: c.precision, recall: c.recall, f1: c.f1 };
}

export function accuracy(yTrue: readonly Label[], yPred: readonly Label[]): number {
  if (yTrue.length !== yPred.length) throw new Error(`${yTrue.length} true labels but ${yPred.length} predictions`);
  let ok = 0;
  for (let i = 0; i < yTrue.length; i++) if (yTrue[i] === yPred[i]) ok++;
  return ratio(ok, yTrue.length);
}

function checkBinary(labels: readonly number[], scores: ArrayLike<number>): void {
  if (labels.length !== scores.length) throw new Error(`${labels.length} labels but ${scores.length} scores`);
}

/**
 * Average precision, AP = Σₙ (Rₙ − Rₙ₋₁)·Pₙ over the distinct score thresholds from high to low (no
 * interpolation; tied scores form one threshold), as scikit-learn's `average_precision_score`.
 * Returns 0 when there is no positive.
 */
export function averagePrecision(labels: readonly number[], scores: ArrayLike<number>): number {
  checkBinary(labels, scores);
  const idx = Array.from({ length: labels.length }, (_, i) => i).sort((a, b) => scores[b]! - scores[a]!);
  const positives = labels.reduce((s, y) => s + (y > 0 ? 1 : 0), 0);
  if (positives === 0) return 0;
  let tp = 0;
  let seen = 0;
  let prevRecall = 0;
  let ap = 0;
  for (let i = 0; i < idx.length; ) {
    const s = scores[idx[i]!]!;
    while (i < idx.length && scores[idx[i]!] === s) {
      tp += labels[idx[i]!]! > 0 ? 1 : 0;
      seen++;
      i++;
    }
    const recall = tp / positives;
    ap += (recall - prevRecall) * (tp / seen);
    prevRecall = recall;
  }
  return ap;
}

/** Mean of the average precision over several ranked lists (one per subject); lists without a positive are skipped. */
export function meanAveragePrecision(lists: readonly { labels: readonly number[]; scores: ArrayLike<number> }[]): number {
  const aps = lists.filter((l) => l.labels.some((y) => y > 0)).map((l) => averagePrecision(l.labels, l.scores));
  return ratio(aps.reduce((a, b) => a + b, 0), aps.length);
}

/** Area under the ROC curve = P(score of a random positive > score of a random negative), ties count ½. */
export function auroc(labels: readonly number[], scores: ArrayLike<number>): number {
  checkBinary(labels, scores);
  const idx = Array.from({ length: labels.length }, (_, i) => i).sort((a, b) => scores[a]! - scores[b]!);
  let rankSumPos = 0;
  let pos = 0;
  for (let i = 0; i < idx.length; ) {
    let j = i;
    while (j < idx.length && scores[idx[j]!] === scores[idx[i]!]) j++;
    const midRank = (i + 1 + j) / 2; // 1-based average rank of the tie group
    for (let t = i; t < j; t++) if (labels[idx[t]!]! > 0) {
      rankSumPos += midRank;
      pos++;
    }
    i = j;
  }
  const neg = labels.length - pos;
  if (pos === 0 || neg === 0) throw new Error('AUROC needs positives and negatives');
  return (rankSumPos - (pos * (pos + 1)) / 2) / (pos * neg);
}

/** Precision among the top k of a ranking. */
export function precisionAtK(labels: readonly number[], scores: ArrayLike<number>, k: number): number {
  checkBinary(labels, scores);
  const idx = Array.from({ length: labels.length }, (_, i) => i).sort((a, b) => scores[b]! - scores[a]!);
  const top = idx.slice(0, k);
  return ratio(top.filter((i) => labels[i]! > 0).length, top.length);
}

/** Cohen's kappa between two raters: κ = (pₒ − pₑ) / (1 − pₑ). */
export function cohenKappa(a: readonly Label[], b: readonly Label[]): number {
  if (a.length !== b.length) throw new Error(`${a.length} and ${b.length} ratings`);
  const n = a.length;
  if (n === 0) throw new Error("Cohen's kappa of no ratings is undefined");
  const labels = [...new Set([...a, ...b])];
  let agree = 0;
  for (let i = 0; i < n; i++) if (a[i] === b[i]) agree++;
  const po = agree / n;
  let pe = 0;
  for (const l of labels) {
    const ca = a.filter((x) => x === l).length;
    const cb = b.filter((x) => x === l).length;
    pe += (ca / n) * (cb / n);
  }
  return pe === 1 ? 1 : (po - pe) / (1 - pe);
}

export interface CalibrationError {
  /** expected calibration error: Σ_bins (n_b/n)·|acc_b − conf_b| */
  l1: number;
  /** root of Σ_bins (n_b/n)·(acc_b − conf_b)² */
  l2: number;
  /** maximum calibration error: max_bins |acc_b − conf_b| */
  max: number;
  bins: { lower: number; upper: number; count: number; confidence: number; accuracy: number }[];
}

/**
 * Binary calibration error with equal-width bins over [0, 1]: a probability p falls in bin ⌈p·B⌉ − 1
 * (bins are (lower, upper], the first also holds 0); confidence = mean p, accuracy = fraction of positives.
 * Matches torchmetrics' `BinaryCalibrationError` (norms 'l1', 'l2', 'max').
 */
export function calibrationError(probabilities: ArrayLike<number>, targets: readonly number[], nBins = 15): CalibrationError {
  if (probabilities.length !== targets.length) throw new Error(`${probabilities.length} probabilities but ${targets.length} targets`);
  const n = targets.length;
  if (n === 0) throw new Error('calibration error of no predictions is undefined');
  const count = new Array<number>(nBins).fill(0);
  const conf = new Array<number>(nBins).fill(0);
  const acc = new Array<number>(nBins).fill(0);
  for (let i = 0; i < n; i++) {
    const p = probabilities[i]!;
    if (!(p >= 0 && p <= 1)) throw new Error(`probability ${p} is outside [0, 1]`);
    const b = Math.min(nBins - 1, Math.max(0, Math.ceil(p * nBins) - 1));
    count[b]!++;
    conf[b]! += p;
    acc[b]! += targets[i]! > 0 ? 1 : 0;
  }
  let l1 = 0;
  let l2 = 0;
  let max = 0;
  const bins = count.map((c, b) => {
    const confidence = c ? conf[b]! / c : 0;
    const accuracy = c ? acc[b]! / c : 0;
    if (c) {
      const gap = Math.abs(accuracy - confidence);
      l1 += (c / n) * gap;
      l2 += (c / n) * gap * gap;
      max = Math.max(max, gap);
    }
    return { lower: b / nBins, upper: (b + 1) / nBins, count: c, confidence, accuracy };
  });
  return { l1, l2: Math.sqrt(l2), max, bins };
}

/** Mean and standard error of the mean (sample standard deviation / √n). */
export function meanAndStandardError(values: readonly number[]): { mean: number; se: number; n: number } {
  const n = values.length;
  if (n === 0) return { mean: NaN, se: NaN, n };
  const mean = values.reduce((a, b) => a + b, 0) / n;
  if (n === 1) return { mean, se: 0, n };
  const v = values.reduce((s, x) => s + (x - mean) ** 2, 0) / (n - 1);
  return { mean, se: Math.sqrt(v / n), n };
}
