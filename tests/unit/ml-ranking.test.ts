import { describe, expect, it } from 'vitest';
import {
  autoAcceptAvailable,
  autoAccepts,
  calibrate,
  fitPlatt,
  plattProbability,
  probabilityOf,
  scoreStats,
  zScore,
} from '../../server/src/ml/calibration.ts';
import { dot, normalise, stackRows } from '../../server/src/ml/features.ts';
import { calibrationError } from '../../server/src/ml/metrics.ts';
import { assessModel, type Judgement } from '../../server/src/ml/quality.ts';
import { gaussian, seededRng } from '../../server/src/ml/random.ts';
import { rankItems, scoreAll } from '../../server/src/ml/ranking.ts';
import { prototypeModel } from '../../server/src/ml/synthesis/prototype.ts';
import { trainedModel } from '../../server/src/ml/synthesis/trained.ts';

const rng = seededRng(7);
const d = 12;
const unit = () => normalise(Float32Array.from({ length: d }, () => gaussian(rng)));
const near = (c: Float32Array, s: number) => normalise(Float32Array.from(c, (x) => x + (s * gaussian(rng)) / Math.sqrt(d)));

describe('brute-force ranking over a matrix of prepared features', () => {
  const rows = Array.from({ length: 2000 }, unit);
  const matrix = stackRows(rows);
  const model = { weights: unit(), bias: 0.1 };

  it('scores every row as w·x + b', () => {
    const s = scoreAll(matrix, d, model);
    for (const i of [0, 17, 1999]) expect(s[i]).toBeCloseTo(dot(model.weights, rows[i]!) + 0.1, 5);
  });

  it('lists the top N by score among rows with z ≥ minZ, as a full sort would', () => {
    const s = Array.from(scoreAll(matrix, d, model));
    const stats = scoreStats(Float32Array.from(s));
    const expected = s
      .map((score, row) => ({ row, score }))
      .filter((x) => zScore(stats, x.score) >= 2)
      .sort((a, b) => b.score - a.score)
      .slice(0, 25)
      .map((x) => x.row);
    const list = rankItems(matrix, d, model, { topN: 25, minZ: 2 });
    expect(list.items.map((x) => x.row)).toEqual(expected);
    expect(list.items.every((x) => x.z >= 2 && x.probability === null)).toBe(true);
    // with a high bar fewer than N qualify: the z rule, not N, ends the list
    const strict = rankItems(matrix, d, model, { topN: 1000, minZ: 2 });
    expect(strict.items.length).toBe(s.filter((x) => zScore(stats, x) >= 2).length);
    expect(strict.items.length).toBeLessThan(1000);
  });

  it('scores only candidates (a narrower subject among its broader subject’s items) and skips excluded rows', () => {
    const candidates = Array.from({ length: 300 }, (_, i) => i * 3);
    const list = rankItems(matrix, d, model, { topN: 10, minZ: -Infinity, candidates, exclude: new Set([0, 3]) });
    expect(list.items).toHaveLength(10);
    expect(list.items.every((x) => x.row % 3 === 0 && x.row !== 0 && x.row !== 3)).toBe(true);
    expect(list.stats.count).toBe(300);
    for (let i = 1; i < list.items.length; i++) expect(list.items[i - 1]!.score).toBeGreaterThanOrEqual(list.items[i]!.score);
  });

  it('adds calibrated probabilities when the calibration supports them', () => {
    const cal = { kind: 'platt' as const, a: -10, b: 0, positives: 40, negatives: 40 };
    const list = rankItems(matrix, d, model, { topN: 3, calibration: cal });
    list.items.forEach((x) => expect(x.probability).toBeCloseTo(1 / (1 + Math.exp(-10 * x.score)), 6));
  });
});

describe('Platt scaling (Platt 1999; Newton method of Lin, Lin & Weng 2007)', () => {
  it('recovers the sigmoid that generated the decisions', () => {
    // decisions drawn from p(s) = 1 / (1 + exp(A·s + B)) with A = −2, B = 0.5
    const r = seededRng(11);
    const scores: number[] = [];
    const labels: number[] = [];
    for (let i = 0; i < 20000; i++) {
      const s = r() * 6 - 3;
      scores.push(s);
      labels.push(r() < 1 / (1 + Math.exp(-2 * s + 0.5)) ? 1 : 0);
    }
    const c = fitPlatt(scores, labels);
    expect(c.a).toBeCloseTo(-2, 1);
    expect(c.b).toBeCloseTo(0.5, 1);
    // and is well calibrated on fresh decisions (expected calibration error, 10 bins)
    const fresh = Array.from({ length: 5000 }, () => r() * 6 - 3);
    const freshLabels = fresh.map((s) => (r() < 1 / (1 + Math.exp(-2 * s + 0.5)) ? 1 : 0));
    expect(calibrationError(fresh.map((s) => plattProbability(c, s)), freshLabels, 10).l1).toBeLessThan(0.03);
  });

  it('uses Platt’s smoothed targets: perfectly separated decisions do not give probabilities of exactly 0 and 1', () => {
    const c = fitPlatt([-2, -1, 1, 2], [0, 0, 1, 1]);
    expect(plattProbability(c, 2)).toBeLessThan(1);
    expect(plattProbability(c, 2)).toBeGreaterThan(0.5);
    expect(plattProbability(c, -2)).toBeGreaterThan(0);
  });

  it('needs confirmations and rejections', () => {
    expect(() => fitPlatt([1, 2], [1, 1])).toThrow(/both/);
  });
});

describe('calibration choice and auto-accept', () => {
  const stats = { mean: 0.1, std: 0.05, count: 1000 };

  it('falls back to honest z-scores without enough decisions', () => {
    const c = calibrate({ scores: [0.3, 0.1], labels: [1, 0] }, stats);
    expect(c.kind).toBe('zscore');
    expect(probabilityOf(c, 0.3)).toBeNull();
    expect(zScore(c.kind === 'zscore' ? c : stats, 0.2)).toBeCloseTo(2, 10);
    expect(autoAcceptAvailable(c)).toBe(false);
    expect(autoAccepts(c, 10)).toBe(false);
  });

  it('auto-accepts only at p ≥ 0.8 from a Platt fit resting on enough confirmations', () => {
    const scores = Array.from({ length: 80 }, (_, i) => i / 80);
    const labels = scores.map((s) => (s > 0.5 ? 1 : 0));
    const c = calibrate({ scores, labels }, stats);
    expect(c.kind).toBe('platt');
    expect(autoAcceptAvailable(c)).toBe(true);
    expect(autoAccepts(c, 0.95)).toBe(plattProbability(c as never, 0.95) >= 0.8);
    expect(autoAccepts(c, 0.95)).toBe(true);
    expect(autoAccepts(c, 0.45)).toBe(false);
    // the same fit on too few confirmations offers no auto-accept
    expect(autoAcceptAvailable({ ...(c as { kind: 'platt'; a: number; b: number }), positives: 12, negatives: 40 })).toBe(false);
  });
});

describe('quality records (leave-one-out on examples and confirmed items)', () => {
  const e = (i: number) => Float32Array.from({ length: 3 }, (_, j) => (j === i ? 1 : 0));
  const build = (pos: readonly Judgement[]) => prototypeModel(pos.map((j) => j.feature));

  it('scores each positive with the model rebuilt without it (a worked case: every score is 0, AP = 2/3)', async () => {
    // positives e₁, e₂; negative e₃. Without e₁ the model is e₂, so e₁ scores 0, and vice versa;
    // the full model (e₁+e₂)/√2 scores e₃ at 0. One tied threshold: recall 1 at precision 2/3.
    const { quality } = await assessModel({
      method: 'prototype',
      positives: [{ feature: e(0), kind: 'example' }, { feature: e(1), kind: 'confirmed' }],
      negatives: [{ feature: e(2), kind: 'rejected' }],
      build,
    });
    expect(quality.scheme).toBe('leave-one-out');
    expect(quality.averagePrecision).toBeCloseTo(2 / 3, 10);
    expect(quality.judgements).toEqual({ examples: 1, confirmed: 1, rejected: 1, otherSubject: 0 });
  });

  it('measures a good model as good and a useless one as near prevalence, and hands back decisions for Platt', async () => {
    const c = Float32Array.from({ length: d }, (_, i) => (i === 0 ? 1 : 0));
    const other = Float32Array.from({ length: d }, (_, i) => (i === 1 ? 1 : 0));
    const positives: Judgement[] = [
      ...Array.from({ length: 5 }, () => ({ feature: near(c, 0.5), kind: 'example' as const })),
      ...Array.from({ length: 20 }, () => ({ feature: near(c, 0.5), kind: 'confirmed' as const })),
    ];
    const negatives: Judgement[] = Array.from({ length: 40 }, () => ({ feature: near(other, 0.5), kind: 'rejected' as const }));
    const good = await assessModel({ method: 'photo_augmented', positives, negatives, build });
    expect(good.quality.averagePrecision).toBeGreaterThan(0.95);
    // the z ≥ 2 bar is set by the negatives' own scores here, so about one in forty of them still passes it
    expect(good.quality.threshold.precision).toBeGreaterThan(0.9);
    expect(good.quality.threshold.recall).toBeGreaterThan(0.9);
    expect(good.decisions.labels.filter((y) => y === 1)).toHaveLength(20); // confirmed only, not the drawings
    expect(good.decisions.labels.filter((y) => y === 0)).toHaveLength(40);

    const noise: Judgement[] = Array.from({ length: 40 }, () => ({ feature: unit(), kind: 'rejected' as const }));
    const noisePos: Judgement[] = Array.from({ length: 20 }, () => ({ feature: unit(), kind: 'confirmed' as const }));
    const useless = await assessModel({ method: 'prototype', positives: noisePos, negatives: noise, build });
    expect(useless.quality.averagePrecision).toBeLessThan(0.6); // prevalence 1/3
  });

  it('holds out rejections too for a method that learns from them, in folds beyond maxFits', async () => {
    const c = Float32Array.from({ length: d }, (_, i) => (i === 0 ? 1 : 0));
    const other = Float32Array.from({ length: d }, (_, i) => (i === 1 ? 1 : 0));
    const positives: Judgement[] = Array.from({ length: 30 }, () => ({ feature: near(c, 0.8), kind: 'confirmed' as const }));
    const negatives: Judgement[] = Array.from({ length: 30 }, () => ({ feature: near(other, 0.8), kind: 'rejected' as const }));
    let fits = 0;
    const { quality } = await assessModel({
      method: 'trained',
      positives,
      negatives,
      usesNegatives: true,
      maxFits: 5,
      build: async (pos, neg) => {
        fits++;
        return (await trainedModel({ confirmed: pos.map((j) => j.feature), rejected: neg.map((j) => j.feature), folds: 2 })).model;
      },
    });
    expect(quality.scheme).toBe('k-fold');
    expect(fits).toBe(5);
    expect(quality.averagePrecision).toBeGreaterThan(0.9);
  }, 60_000);
});
