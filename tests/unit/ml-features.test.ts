import { describe, expect, it } from 'vitest';
import {
  exampleCentre,
  prepareFeature,
  prepareMatrix,
  RunningMean,
  scanCentre,
} from '../../server/src/ml/centring.ts';
import { featureFromBuffer, featureToBuffer, meanOf, norm, stackRows } from '../../server/src/ml/features.ts';
import { fromStoredModel, toStoredModel } from '../../server/src/ml/model.ts';
import { gaussian, seededRng } from '../../server/src/ml/random.ts';

describe('float32 BLOBs (little-endian, as the embeddings and subject_models columns store them)', () => {
  it('encodes 1.0 as 00 00 80 3f and −2.5 as 00 00 20 c0 (IEEE 754 binary32, little-endian byte order)', () => {
    // IEEE 754-2019 binary32: 1.0 = 0x3F800000, −2.5 = 0xC0200000
    expect(featureToBuffer(Float32Array.from([1, -2.5])).toString('hex')).toBe('0000803f000020c0');
  });

  it('round-trips exactly, also from an unaligned slice of a larger buffer', () => {
    const v = Float32Array.from([0.1, -3.75, 1e-30, 65504, Math.PI]);
    const bytes = featureToBuffer(v);
    const padded = Buffer.concat([Buffer.from([7]), bytes, Buffer.from([9, 9])]);
    const unaligned = padded.subarray(1, 1 + bytes.length);
    expect(unaligned.byteOffset % 4).not.toBe(0);
    expect(Array.from(featureFromBuffer(unaligned, 5))).toEqual(Array.from(v));
  });

  it('refuses a BLOB of the wrong length', () => {
    expect(() => featureFromBuffer(Buffer.alloc(7))).toThrow(/multiple of 4/);
    expect(() => featureFromBuffer(Buffer.alloc(8), 3)).toThrow(/expected 3 floats/);
  });

  it('maps a subject model onto the subject_models columns and back', () => {
    const stored = toStoredModel({ weights: Float32Array.from([0.6, -0.8]), bias: 0.25 }, { method: 'prototype', embedderId: 'centernet-mnv3-b14-ap-mp-320@1', madeFrom: { exampleIds: [3, 4] } });
    expect(stored.dimension).toBe(2);
    expect(stored.weights).toHaveLength(8);
    const back = fromStoredModel(stored);
    expect(Array.from(back.weights)).toEqual([expect.closeTo(0.6, 6), expect.closeTo(-0.8, 6)]);
    expect(back.bias).toBe(0.25);
  });
});

describe('running means of a collection', () => {
  const rng = seededRng(1);
  const vs = Array.from({ length: 20 }, () => Float32Array.from({ length: 6 }, () => gaussian(rng)));

  it('equals the direct mean, survives removal, merging and JSON', () => {
    const m = RunningMean.of(vs.slice(0, 15));
    for (const v of vs.slice(15)) m.add(v);
    const direct = meanOf(vs);
    m.mean().forEach((x, i) => expect(x).toBeCloseTo(direct[i]!, 6));
    m.remove(vs[0]!);
    const without = meanOf(vs.slice(1));
    m.mean().forEach((x, i) => expect(x).toBeCloseTo(without[i]!, 6));
    const merged = RunningMean.of(vs.slice(0, 5)).merge(RunningMean.ofMatrix(stackRows(vs.slice(5)), 6));
    merged.mean().forEach((x, i) => expect(x).toBeCloseTo(direct[i]!, 6));
    const again = RunningMean.fromJSON(JSON.parse(JSON.stringify(merged.toJSON())));
    expect(again.count).toBe(20);
    again.mean().forEach((x, i) => expect(x).toBeCloseTo(direct[i]!, 6));
  });

  it('has no mean when empty', () => {
    expect(() => new RunningMean(3).mean()).toThrow(/no features/);
  });

  it('centres examples with the example mean, or with the scan mean below five subjects', () => {
    const scans = RunningMean.of([Float32Array.from([1, 1])]);
    const examples = RunningMean.of([Float32Array.from([5, 5])]);
    expect(Array.from(exampleCentre({ scans, examples, subjectsWithExamples: 5 }))).toEqual([5, 5]);
    expect(Array.from(exampleCentre({ scans, examples, subjectsWithExamples: 4 }))).toEqual([1, 1]);
    expect(Array.from(scanCentre({ scans, examples, subjectsWithExamples: 9 }))).toEqual([1, 1]);
  });
});

describe('prepared features (centre, then L2-normalise each pooled block)', () => {
  const layout = { blocks: [2, 2] };

  it('subtracts the centre, normalises each block, and scales to unit length', () => {
    const p = prepareFeature(Float32Array.from([4, 3, 10, 0]), Float32Array.from([1, -1, 0, 0]), layout);
    // block 1: (3, 4)/5; block 2: (1, 0); each × 1/√2
    const s = Math.SQRT1_2;
    expect(Array.from(p)).toEqual([0.6 * s, 0.8 * s, s, 0].map((x) => expect.closeTo(x, 6)));
    expect(norm(p)).toBeCloseTo(1, 6);
  });

  it('treats the matrix form row by row, the same as one at a time', () => {
    const rng = seededRng(2);
    const rows = Array.from({ length: 5 }, () => Float32Array.from({ length: 4 }, () => gaussian(rng)));
    const centre = Float32Array.from([0.1, 0.2, 0.3, 0.4]);
    const m = prepareMatrix(rows, centre, layout);
    rows.forEach((r, i) => expect(Array.from(m.subarray(i * 4, i * 4 + 4))).toEqual(Array.from(prepareFeature(r, centre, layout))));
  });

  it('leaves a block that equals the centre at zero instead of dividing by zero', () => {
    const p = prepareFeature(Float32Array.from([1, 1, 2, 0]), Float32Array.from([1, 1, 0, 0]), layout);
    expect(Array.from(p.subarray(0, 2))).toEqual([0, 0]);
    expect(p.every(Number.isFinite)).toBe(true);
  });

  it('refuses a feature of another layout', () => {
    expect(() => prepareFeature(new Float32Array(3), null, layout)).toThrow(/layout/);
  });
});
