/**
 * A subject model: a linear one-vs-rest scorer s(x) = w·x + b over prepared (centred, normalised)
 * features, plus what is stored with each version. Pure data; the API and the worker map it onto the
 * `subject_models` table (weights BLOB = little-endian float32, see features.ts).
 */
import type { Calibration } from './calibration.ts';
import { dot, featureFromBuffer, featureToBuffer } from './features.ts';
import { METHODS, type MadeFrom, type QualityRecord, type SynthesisMethod } from '../../../common/api/subjects.ts';

export { METHODS, type MadeFrom, type SynthesisMethod };

export interface LinearModel {
  weights: Float32Array;
  bias: number;
}

export function scoreOne(model: LinearModel, x: Float32Array): number {
  return dot(model.weights, x) + model.bias;
}

/** What the `subject_models` columns hold for one version (the database adds id, subject, version, active). */
export interface StoredSubjectModel {
  method: SynthesisMethod;
  embedderId: string;
  dimension: number;
  weights: Buffer;
  bias: number;
  calibration: Calibration | null;
  metrics: QualityRecord | null;
  madeFrom: MadeFrom;
}

export function toStoredModel(
  model: LinearModel,
  info: { method: SynthesisMethod; embedderId: string; calibration?: Calibration | null; metrics?: QualityRecord | null; madeFrom: MadeFrom },
): StoredSubjectModel {
  return {
    method: info.method,
    embedderId: info.embedderId,
    dimension: model.weights.length,
    weights: featureToBuffer(model.weights),
    bias: model.bias,
    calibration: info.calibration ?? null,
    metrics: info.metrics ?? null,
    madeFrom: info.madeFrom,
  };
}

export function fromStoredModel(row: { dimension: number; weights: Buffer | Uint8Array; bias: number }): LinearModel {
  return { weights: featureFromBuffer(row.weights, row.dimension), bias: row.bias };
}
