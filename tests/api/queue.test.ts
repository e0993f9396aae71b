import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { backoffMs, claimNextJob, completeJob, enqueueJob, failJob } from '../../jobs/src/queue.ts';
import { housekeepingKey } from '../../jobs/src/tasks/housekeeping.ts';
import { housekeeping } from '../../jobs/src/tasks/housekeeping.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { Job, WorkerHeartbeat } from '../../server/src/models/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';

let sequelize: Sequelize;

beforeAll(async () => {
  ({ sequelize } = await openTestDatabase());
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

const lease = { leaseMs: 60_000 };

describe('the jobs queue in MariaDB', () => {
  it('hands one job to exactly one of many concurrent claimers (SKIP LOCKED)', async () => {
    await enqueueJob({ kind: 'probe' });
    const claims = await Promise.all(['a', 'b', 'c', 'd'].map((w) => claimNextJob(sequelize, w, lease)));
    expect(claims.filter(Boolean)).toHaveLength(1);
    const job = await Job.findOne();
    expect(job?.status).toBe('running');
    expect(job?.attempts).toBe(1);
  });

  it('gives concurrent claimers different jobs', async () => {
    for (let i = 0; i < 4; i++) await enqueueJob({ kind: 'probe', payload: { i } });
    const claims = await Promise.all(['a', 'b', 'c', 'd'].map((w) => claimNextJob(sequelize, w, lease)));
    const ids = claims.map((c) => c?.id);
    expect(ids.every((id) => typeof id === 'number')).toBe(true);
    expect(new Set(ids).size).toBe(4);
  });

  it('does not hand out a job before its time, nor of a kind the worker does not know', async () => {
    await enqueueJob({ kind: 'probe', runAfter: new Date(Date.now() + 60_000) });
    await enqueueJob({ kind: 'other' });
    expect(await claimNextJob(sequelize, 'w', { ...lease, kinds: ['probe'] })).toBeNull();
  });

  it('reclaims a job whose worker died (lease expired), and the dead worker can no longer complete it', async () => {
    await enqueueJob({ kind: 'probe' });
    const first = await claimNextJob(sequelize, 'dead', lease);
    expect(first).not.toBeNull();
    expect(await claimNextJob(sequelize, 'alive', lease)).toBeNull();
    const later = new Date(Date.now() + 61_000);
    const second = await claimNextJob(sequelize, 'alive', { ...lease, now: later });
    expect(second?.id).toBe(first?.id);
    expect(second?.attempts).toBe(2);
    await completeJob(first!.id, 'dead', { by: 'dead' });
    expect((await Job.findByPk(first!.id))?.status).toBe('running');
    await completeJob(second!.id, 'alive', { by: 'alive' });
    const done = await Job.findByPk(second!.id);
    expect(done?.status).toBe('done');
    expect(done?.result).toEqual({ by: 'alive' });
  });

  it('retries a failure after a growing backoff and fails for good when attempts are spent', async () => {
    expect([1, 2, 3, 10, 30].map(backoffMs)).toEqual([30_000, 60_000, 120_000, 3_600_000, 3_600_000]);
    const job = await enqueueJob({ kind: 'probe', maxAttempts: 2 });
    const c1 = await claimNextJob(sequelize, 'w', lease);
    const now = new Date();
    expect(await failJob(c1!.id, 'w', new Error('scanner offline'), now)).toBe('retry');
    let row = await Job.findByPk(job.id);
    expect(row?.status).toBe('pending');
    expect(row?.lastError).toBe('Error: scanner offline');
    expect(row!.runAfter.getTime()).toBe(now.getTime() + 30_000);
    expect(await claimNextJob(sequelize, 'w', lease)).toBeNull();
    const c2 = await claimNextJob(sequelize, 'w', { ...lease, now: new Date(now.getTime() + 31_000) });
    expect(await failJob(c2!.id, 'w', new Error('still offline'))).toBe('failed');
    row = await Job.findByPk(job.id);
    expect(row?.status).toBe('failed');
    expect(await claimNextJob(sequelize, 'w', { ...lease, now: new Date(now.getTime() + 10 * 3_600_000) })).toBeNull();
  });

  it('enqueues once per idempotency key, even when racing', async () => {
    const key = housekeepingKey(new Date('2026-12-01T10:00:00Z'));
    expect(key).toBe('housekeeping:2026-12-01');
    const jobs = await Promise.all([1, 2, 3].map(() => enqueueJob({ kind: 'housekeeping', idempotencyKey: key })));
    expect(new Set(jobs.map((j) => j.id)).size).toBe(1);
    expect(await Job.count()).toBe(1);
  });
});

describe('the night-shift worker', () => {
  it('beats, runs a housekeeping job to completion, and marks itself stopped', async () => {
    const week = 8 * 86_400_000;
    const old = new Date(Date.now() - week);
    await WorkerHeartbeat.create({ workerId: 'long-gone', hostname: 'x', pid: 2, startedAt: old, heartbeatAt: old, stoppedAt: old, currentJobId: null });
    await sequelize.query("INSERT INTO sessions (sid, expires, data) VALUES ('s-old', '2020-01-01', '{}'), ('s-live', '2099-01-01', '{}')");
    const job = await enqueueJob({ kind: 'housekeeping', idempotencyKey: 'housekeeping:test' });

    const worker = new NightShiftWorker({ sequelize, tasks: { housekeeping }, pollMs: 50, heartbeatMs: 1_000 });
    expect(await worker.runOnce()).toBe(true);
    const done = await Job.findByPk(job.id);
    expect(done?.status).toBe('done');
    expect(done?.result).toEqual({ heartbeatsRemoved: 1, sessionsRemoved: 1 });
    const [sessions] = await sequelize.query('SELECT sid FROM sessions');
    expect(sessions).toEqual([{ sid: 's-live' }]);
    expect(await worker.runOnce()).toBe(false);

    await worker.start();
    const beat = await WorkerHeartbeat.findByPk(worker.id);
    expect(beat?.stoppedAt).toBeNull();
    await worker.stop();
    expect((await WorkerHeartbeat.findByPk(worker.id))?.stoppedAt).toBeInstanceOf(Date);
  });

  it('records a clear error for a job kind with a handler that throws, and keeps going', async () => {
    const job = await enqueueJob({ kind: 'explode', maxAttempts: 1 });
    const worker = new NightShiftWorker({
      sequelize,
      tasks: { explode: async () => { throw new Error('corrupt scan'); } },
    });
    expect(await worker.runOnce()).toBe(true);
    const row = await Job.findByPk(job.id);
    expect(row?.status).toBe('failed');
    expect(row?.lastError).toBe('Error: corrupt scan');
  });
});
