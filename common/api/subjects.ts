/**
 * What the subject-model API answers about a model version (server/src/services/subject-models.ts builds it,
 * the studio reads it), and the parts of it that server/src/ml/ records: one definition for both sides.
 */

export const METHODS = ['prototype', 'regressed', 'photo_augmented', 'refined', 'carried', 'trained'] as const;
export type SynthesisMethod = (typeof METHODS)[number];

/** Each method in a few words, as the studio and the subject's history name it. */
export const METHOD_LABELS: Record<SynthesisMethod, string> = {
  prototype: 'Average of the examples',
  regressed: 'Examples through the weight regressor',
  photo_augmented: 'Examples plus confirmed items',
  trained: 'Trained on reviewed items',
  refined: 'Narrower than a broader subject',
  carried: 'Carried from another collection',
};

export interface QualityRecord {
  method: SynthesisMethod;
  scheme: 'leave-one-out' | 'k-fold';
  folds: number;
  /** AP of held-out positives among the negatives; null without positives or negatives */
  averagePrecision: number | null;
  auroc: number | null;
  /** at score ≥ mean + minZ·std of the collection's scores */
  threshold: { minZ: number; score: number; precision: number | null; recall: number | null; listed: number };
  /** how many judgements the measurement rests on */
  judgements: { examples: number; confirmed: number; rejected: number; otherSubject: number };
}

/** How a model version was made: its inputs, for the model history and for reproducing it. */
export interface MadeFrom {
  exampleIds?: number[];
  confirmedItemIds?: number[];
  rejectedItemIds?: number[];
  /** for `refined`: the broader subject and the models of its other narrower subjects */
  broaderSubjectId?: number;
  siblingSubjectIds?: number[];
  /** for `carried`: the source collection and model */
  sourceCollectionId?: number;
  sourceModelId?: number;
  /** identifies the weight regressor used, if any */
  regressorId?: string;
  /** the transductive refinement's scope, if one was applied */
  transductive?: { scopeSize: number; temperature: number; iterations: number; anchor: number };
  /** mirror-flipped example copies were used */
  mirrored?: boolean;
  [key: string]: unknown;
}

/** One model version of a subject, as the API shows it. */
export interface ModelSummary {
  id: number;
  subjectId: number;
  version: number;
  method: SynthesisMethod;
  embedderId: string;
  active: boolean;
  madeFrom: MadeFrom;
  metrics: QualityRecord | null;
  calibration: { kind: 'platt' | 'zscore'; positives?: number; negatives?: number } | null;
  createdAt: string;
  createdBy: number | null;
}

/** One change to a subject, as its history shows it: when, by whom, and what in words. */
export interface SubjectHistoryEntry {
  at: string;
  action: string;
  actor: { id: number; name: string } | null;
  summary: string;
}
