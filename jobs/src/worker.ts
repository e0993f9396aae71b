import type { Sequelize } from 'sequelize';
import { logger } from '../../server/src/logger.ts';
import { Job } from '../../server/src/models/index.ts';
import { beat, makeWorkerId, markStopped } from './heartbeat.ts';
import { claimNextJob, completeJob, failJob, renewLease, type ClaimedJob } from './queue.ts';

export type TaskHandler = (job: ClaimedJob, tools: { sequelize: Sequelize; reportProgress: (p: Record<string, unknown>) => Promise<void> }) => Promise<Record<string, unknown>>;

export interface WorkerOptions {
  sequelize: Sequelize;
  tasks: Record<string, TaskHandler>;
  heartbeatMs?: number;
  pollMs?: number;
  leaseMs?: number;
}

/** The night-shift worker loop: heartbeats, claims jobs of the kinds it knows, runs them, records the outcome. */
export class NightShiftWorker {
  readonly id = makeWorkerId();
  private readonly startedAt = new Date();
  private running = false;
  private currentJob: number | null = null;
  private heartbeatTimer: NodeJS.Timeout | null = null;
  private loop: Promise<void> | null = null;
  private wake: (() => void) | null = null;
  private readonly opts: Required<WorkerOptions>;

  constructor(opts: WorkerOptions) {
    const defined = Object.fromEntries(Object.entries(opts).filter(([, v]) => v !== undefined)) as WorkerOptions;
    this.opts = { heartbeatMs: 15_000, pollMs: 5_000, leaseMs: 120_000, ...defined };
  }

  async start(): Promise<void> {
    this.running = true;
    await beat(this.id, null, this.startedAt);
    this.heartbeatTimer = setInterval(() => {
      beat(this.id, this.currentJob, this.startedAt).catch((err: unknown) => logger.warn({ err }, 'heartbeat failed'));
      if (this.currentJob !== null) {
        renewLease(this.currentJob, this.id, this.opts.leaseMs).catch((err: unknown) => logger.warn({ err }, 'lease renewal failed'));
      }
    }, this.opts.heartbeatMs);
    this.loop = this.runLoop();
    logger.info({ workerId: this.id, tasks: Object.keys(this.opts.tasks) }, 'night-shift worker started');
  }

  /** Runs at most one job now (used by the loop and by tests). Returns whether a job was found. */
  async runOnce(): Promise<boolean> {
    const kinds = Object.keys(this.opts.tasks);
    const job = await claimNextJob(this.opts.sequelize, this.id, { leaseMs: this.opts.leaseMs, kinds });
    if (!job) return false;
    const handler = this.opts.tasks[job.kind];
    this.currentJob = job.id;
    const log = logger.child({ jobId: job.id, kind: job.kind, attempt: job.attempts });
    try {
      if (!handler) throw new Error(`no task handler for job kind "${job.kind}"`);
      const result = await handler(job, {
        sequelize: this.opts.sequelize,
        reportProgress: async (progress) => {
          await Job.update({ progress }, { where: { id: job.id, lockedBy: this.id } });
        },
      });
      await completeJob(job.id, this.id, result);
      log.info('job done');
    } catch (err) {
      const outcome = await failJob(job.id, this.id, err);
      log.warn({ err, outcome }, 'job failed');
    } finally {
      this.currentJob = null;
    }
    return true;
  }

  private async runLoop(): Promise<void> {
    while (this.running) {
      let found = false;
      try {
        found = await this.runOnce();
      } catch (err) {
        logger.error({ err }, 'worker loop error');
      }
      if (!found && this.running) {
        await new Promise<void>((resolve) => {
          const t = setTimeout(resolve, this.opts.pollMs);
          this.wake = () => {
            clearTimeout(t);
            resolve();
          };
        });
      }
    }
  }

  async stop(): Promise<void> {
    this.running = false;
    this.wake?.();
    if (this.heartbeatTimer) clearInterval(this.heartbeatTimer);
    await this.loop;
    await markStopped(this.id);
    logger.info({ workerId: this.id }, 'night-shift worker stopped');
  }
}
