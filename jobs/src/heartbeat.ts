import { hostname } from 'node:os';
import { WorkerHeartbeat } from '../../server/src/models/index.ts';

export function makeWorkerId(): string {
  return `${hostname()}:${process.pid}:${Date.now().toString(36)}`;
}

/** Writes this worker's heartbeat row (insert on first beat, update after). */
export async function beat(workerId: string, currentJobId: number | null, startedAt: Date): Promise<void> {
  await WorkerHeartbeat.upsert({
    workerId,
    hostname: hostname(),
    pid: process.pid,
    startedAt,
    heartbeatAt: new Date(),
    stoppedAt: null,
    currentJobId,
  });
}

export async function markStopped(workerId: string): Promise<void> {
  await WorkerHeartbeat.update({ stoppedAt: new Date(), currentJobId: null }, { where: { workerId } });
}
