import { Op, QueryTypes, Transaction, type Sequelize } from 'sequelize';
import { Job } from '../../server/src/models/index.ts';

export interface ClaimedJob {
  id: number;
  kind: string;
  payload: Record<string, unknown>;
  attempts: number;
  maxAttempts: number;
}

/**
 * Claims the oldest due job for this worker. `FOR UPDATE SKIP LOCKED` lets any number of workers on any
 * number of machines share one queue: a row another transaction is claiming is skipped, not waited for.
 * A running job whose lease has expired (its worker died) is claimable again.
 */
export async function claimNextJob(sequelize: Sequelize, workerId: string, opts: { leaseMs: number; kinds?: string[]; now?: Date }): Promise<ClaimedJob | null> {
  const now = opts.now ?? new Date();
  const kindFilter = opts.kinds?.length ? 'AND kind IN (:kinds)' : '';
  // Two index-ordered probes (due pending jobs by run_after, then expired leases by lease_until), so each
  // claimer locks only the row it takes. READ COMMITTED releases rows the kind filter passes over at once.
  const probes = [
    `SELECT id FROM jobs WHERE status = 'pending' AND run_after <= :now AND attempts < max_attempts ${kindFilter}
      ORDER BY run_after, id LIMIT 1 FOR UPDATE SKIP LOCKED`,
    `SELECT id FROM jobs WHERE status = 'running' AND lease_until < :now AND attempts < max_attempts ${kindFilter}
      ORDER BY lease_until, id LIMIT 1 FOR UPDATE SKIP LOCKED`,
  ];
  return sequelize.transaction({ isolationLevel: Transaction.ISOLATION_LEVELS.READ_COMMITTED }, async (transaction) => {
    for (const sql of probes) {
      const rows = await sequelize.query<{ id: number }>(sql, { type: QueryTypes.SELECT, transaction, replacements: { now, kinds: opts.kinds ?? [] } });
      const row = rows[0];
      if (!row) continue;
      const job = await Job.findByPk(row.id, { transaction });
      if (!job) continue;
      await job.update(
        { status: 'running', attempts: job.attempts + 1, lockedBy: workerId, leaseUntil: new Date(now.getTime() + opts.leaseMs) },
        { transaction },
      );
      return { id: Number(job.id), kind: job.kind, payload: job.payload, attempts: job.attempts, maxAttempts: job.maxAttempts };
    }
    return null;
  });
}

/** Extends the lease of a job this worker holds; false when the job is no longer ours (lease lost). */
export async function renewLease(jobId: number, workerId: string, leaseMs: number): Promise<boolean> {
  const [n] = await Job.update(
    { leaseUntil: new Date(Date.now() + leaseMs) },
    { where: { id: jobId, lockedBy: workerId, status: 'running' } },
  );
  return n === 1;
}

export async function completeJob(jobId: number, workerId: string, result: Record<string, unknown>): Promise<void> {
  await Job.update(
    { status: 'done', result, leaseUntil: null, lastError: null },
    { where: { id: jobId, lockedBy: workerId, status: 'running' } },
  );
}

/** Exponential backoff with a ceiling: 30 s, 60 s, 120 s, … at most an hour. */
export function backoffMs(attempts: number): number {
  return Math.min(30_000 * 2 ** Math.max(0, attempts - 1), 3_600_000);
}

/** Records a failure: the job is retried after a backoff, or fails for good once its attempts are spent. */
export async function failJob(jobId: number, workerId: string, error: unknown, now = new Date()): Promise<'retry' | 'failed'> {
  const job = await Job.findOne({ where: { id: jobId, lockedBy: workerId, status: 'running' } });
  if (!job) return 'failed';
  const message = error instanceof Error ? `${error.name}: ${error.message}` : String(error);
  const final = job.attempts >= job.maxAttempts;
  await job.update({
    status: final ? 'failed' : 'pending',
    lastError: message.slice(0, 10_000),
    leaseUntil: null,
    lockedBy: null,
    runAfter: final ? job.runAfter : new Date(now.getTime() + backoffMs(job.attempts)),
  });
  return final ? 'failed' : 'retry';
}

/** Enqueues a job once: a second call with the same idempotency key returns the existing job. */
export async function enqueueJob(input: { kind: string; payload?: Record<string, unknown>; idempotencyKey?: string; runId?: number; runAfter?: Date; maxAttempts?: number }): Promise<Job> {
  if (input.idempotencyKey) {
    const existing = await Job.findOne({ where: { idempotencyKey: input.idempotencyKey } });
    if (existing) return existing;
  }
  try {
    return await Job.create({
      kind: input.kind,
      payload: input.payload ?? {},
      idempotencyKey: input.idempotencyKey ?? null,
      runId: input.runId ?? null,
      runAfter: input.runAfter ?? new Date(),
      maxAttempts: input.maxAttempts ?? 5,
      leaseUntil: null,
      lockedBy: null,
      progress: null,
      result: null,
      lastError: null,
    });
  } catch (err) {
    // two enqueuers raced on the same key: the other one won, which is what we wanted
    if (input.idempotencyKey && err instanceof Error && err.name === 'SequelizeUniqueConstraintError') {
      const existing = await Job.findOne({ where: { idempotencyKey: input.idempotencyKey } });
      if (existing) return existing;
    }
    throw err;
  }
}

export async function countJobs(status: 'pending' | 'running' | 'done' | 'failed'): Promise<number> {
  return Job.count({ where: { status, ...(status === 'running' ? { leaseUntil: { [Op.gt]: new Date() } } : {}) } });
}
