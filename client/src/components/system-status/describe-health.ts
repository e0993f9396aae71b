import type { Health } from '../../api/health';
import type { StatusTone } from '../ui/status-badge';
import { formatCount, formatDateTime } from '../../lib/format';

export interface HealthPart {
  key: 'database' | 'worker';
  tone: StatusTone;
  /** The state in a few words, shown in the badge. */
  state: string;
  /** What stands behind it, in a sentence fragment. */
  detail: string;
}

function heartbeat(iso: string | null): string | null {
  return iso === null ? null : formatDateTime(iso);
}

/** Health report -> words. Every state is spelled out; nothing relies on colour or shape. */
export function describeHealth(health: Health): { summary: string; tone: StatusTone; parts: HealthPart[] } {
  const { database, worker } = health;

  const databasePart: HealthPart = database.ok
    ? {
        key: 'database',
        tone: 'good',
        state: 'Database connected',
        detail:
          database.latencyMs === null ? 'answered' : `answered in ${formatCount(Math.round(database.latencyMs))} ms`,
      }
    : {
        key: 'database',
        tone: 'down',
        state: 'Database not reachable',
        detail: database.error ? database.error : 'no further detail was given',
      };

  const beat = heartbeat(worker.lastHeartbeatAt);
  const workers = worker.count === 1 ? '1 worker' : `${formatCount(worker.count)} workers`;
  let workerPart: HealthPart;
  switch (worker.state) {
    case 'running':
      workerPart = {
        key: 'worker',
        tone: 'good',
        state: 'Night shift running',
        detail: beat ? `${workers}, last heard from ${beat}` : workers,
      };
      break;
    case 'stale':
      workerPart = {
        key: 'worker',
        tone: 'attention',
        state: 'Night shift not responding',
        detail: beat ? `no heartbeat since ${beat}` : 'no recent heartbeat',
      };
      break;
    case 'absent':
      workerPart = {
        key: 'worker',
        tone: 'down',
        state: 'No night-shift worker',
        detail: 'none has started, so no suggestions are being made',
      };
      break;
  }

  const healthy = health.status === 'ok';
  return {
    summary: healthy ? 'Everything is working' : 'Some parts need attention',
    tone: healthy ? 'good' : 'attention',
    parts: [databasePart, workerPart],
  };
}
