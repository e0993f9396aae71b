import { Op, type Sequelize } from 'sequelize';
import { HttpProblem } from '../http/problem.ts';
import { Collection, Job, Run } from '../models/index.ts';

// tonight's models learn from today's decisions before they suggest; text reading (OCR, the slowest stage per
// scan: bench:review) comes after suggest, so the suggestions are ready before the slow part. The order is
// the order of work and of display: a run recorded with another order is shown in this one, and a run taken over
// goes on with the first stage in this order that is neither done nor skipped.
export const STAGES = ['ingest', 'embed', 'retrain', 'suggest', 'text', 'digest'] as const;
export type Stage = (typeof STAGES)[number];

export interface StageReport {
  state: 'pending' | 'running' | 'done' | 'skipped';
  done: number;
  total: number | null;
  startedAt: string | null;
  finishedAt: string | null;
  note?: string;
}

export interface RunReport {
  stages: Record<Stage, StageReport>;
  /** files the ingest stage refused, with the reason in words */
  rejected: Array<{ fileName: string; reason: string }>;
  /** failed attempts (a later attempt may have gone on) */
  errors: Array<{ at: string; message: string }>;
}

export interface RunCounts {
  ingested: number;
  /** items whose text (OCR) was read in this run */
  textRead: number;
  duplicates: number;
  rejected: number;
  embedded: number;
  suggested: number;
  retrained: number;
  /** new versions of the collection's weight map trained by the retrain stage */
  weightMapsTrained: number;
  [key: string]: number;
}

export const emptyReport = (): RunReport => ({
  stages: Object.fromEntries(STAGES.map((s) => [s, { state: 'pending', done: 0, total: null, startedAt: null, finishedAt: null }])) as Record<Stage, StageReport>,
  rejected: [],
  errors: [],
});
export const emptyCounts = (): RunCounts => ({ ingested: 0, duplicates: 0, rejected: 0, embedded: 0, textRead: 0, suggested: 0, retrained: 0, weightMapsTrained: 0 });

export const RUN_JOB = 'nightshift-run';

/**
 * Queues a night-shift run for a collection. The collection row is locked while checking, so two requests
 * (a click and the schedule, or two workers' schedules) cannot both start one: the second is told a run is
 * already under way.
 */
export async function startRun(sequelize: Sequelize, collectionId: number, trigger: 'schedule' | 'manual', requestedBy: number | null): Promise<Run> {
  return sequelize.transaction(async (transaction) => {
    const collection = await Collection.findByPk(collectionId, { transaction, lock: true });
    if (!collection) throw new HttpProblem(404, 'Not found', 'No such collection.');
    if (collection.archivedAt) throw new HttpProblem(409, 'Collection archived', `${collection.name} is archived; reopen it before running the night shift.`, { type: '/problems/conflict' });
    const busy = await Run.findOne({ where: { collectionId, status: { [Op.in]: ['queued', 'running'] } }, transaction });
    if (busy) {
      throw new HttpProblem(409, 'A run is already under way', `Run ${busy.id} for ${collection.name} is ${busy.status}; wait for it to finish or cancel it.`, { type: '/problems/run-in-progress' });
    }
    const run = await Run.create(
      { collectionId, trigger, status: 'queued', requestedBy, startedAt: null, finishedAt: null, counts: emptyCounts(), report: emptyReport() as unknown as Record<string, unknown>, error: null },
      { transaction },
    );
    await Job.create(
      { kind: RUN_JOB, payload: { runId: run.id }, runId: run.id, idempotencyKey: `run:${run.id}`, maxAttempts: 3, leaseUntil: null, lockedBy: null, progress: null, result: null, lastError: null },
      { transaction },
    );
    return run;
  });
}

/** Asks a run to stop: a queued run never starts; a running one stops at its next batch. */
export async function cancelRun(runId: number): Promise<Run> {
  const run = await Run.findByPk(runId);
  if (!run) throw new HttpProblem(404, 'Not found', 'No such run.');
  if (run.status !== 'queued' && run.status !== 'running') {
    throw new HttpProblem(409, 'Run already over', `Run ${run.id} has ${run.status === 'cancelled' ? 'already been cancelled' : run.status}.`, { type: '/problems/conflict' });
  }
  await run.update({ status: 'cancelled', finishedAt: new Date() });
  return run;
}

export function runView(run: Run) {
  const report = (run.report as unknown as RunReport | null) ?? emptyReport();
  const started = run.startedAt?.getTime();
  const end = run.finishedAt?.getTime() ?? Date.now();
  return {
    id: run.id,
    collectionId: run.collectionId,
    trigger: run.trigger,
    status: run.status,
    requestedBy: run.requestedBy,
    createdAt: run.createdAt.toISOString(),
    startedAt: run.startedAt?.toISOString() ?? null,
    finishedAt: run.finishedAt?.toISOString() ?? null,
    durationMs: started ? end - started : null,
    counts: run.counts as RunCounts,
    // a run recorded before a stage existed reports it as not started
    stages: STAGES.map((name) => {
      const stage = report.stages[name] ?? { state: 'pending' as const, done: 0, total: null, startedAt: null, finishedAt: null };
      return { name, ...stage, eta: eta(stage) };
    }),
    rejected: report.rejected,
    errors: report.errors,
    error: run.error,
  };
}

/** Seconds left in a running stage at its pace so far, or null when it cannot be told. */
function eta(s: StageReport): number | null {
  if (s.state !== 'running' || !s.total || !s.startedAt || s.done === 0) return null;
  const elapsed = (Date.now() - Date.parse(s.startedAt)) / 1000;
  return Math.round((elapsed / s.done) * (s.total - s.done));
}

export async function listRuns(collectionId: number, limit = 30): Promise<ReturnType<typeof runView>[]> {
  const runs = await Run.findAll({ where: { collectionId }, order: [['id', 'DESC']], limit });
  return runs.map(runView);
}
