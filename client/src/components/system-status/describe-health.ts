import type { EmbedderHealth, Health } from '../../api/health';
import type { StatusTone } from '../ui/status-badge';
import { formatCount, formatDateTime } from '../../lib/format';

export interface HealthPart {
  key: 'database' | 'worker' | 'embedder';
  tone: StatusTone;
  /** The state in a few words, shown in the badge. */
  state: string;
  /** What stands behind it, in a sentence fragment. */
  detail: string;
}

function heartbeat(iso: string | null): string | null {
  return iso === null ? null : formatDateTime(iso);
}

const RUNTIME_NAMES = { onnx: 'ONNX Runtime', tfjs: 'TensorFlow.js' } as const;

/** The embedder in words: which runtime turns images into features, and why when it is the fallback. */
export function describeEmbedder(e: EmbedderHealth): HealthPart {
  const asked = e.requested === 'configured model' ? 'a configured model' : RUNTIME_NAMES[e.requested];
  switch (e.state) {
    case 'idle':
      return { key: 'embedder', tone: 'waiting', state: 'Image features not started', detail: `${asked} starts when the API starts, or at the first upload of examples` };
    case 'starting':
      return { key: 'embedder', tone: 'waiting', state: 'Image features starting', detail: `loading ${asked}` };
    case 'failed':
      return { key: 'embedder', tone: 'down', state: 'Image features unavailable', detail: e.error ?? 'the embedder could not start' };
    case 'ready': {
      const runtime = e.runtime ? RUNTIME_NAMES[e.runtime] : 'an unknown runtime';
      if (e.fallbackReason) {
        return { key: 'embedder', tone: 'attention', state: `Image features on ${runtime}`, detail: `the slower fallback; ${asked} is not in use: ${e.fallbackReason}` };
      }
      const checked = e.agreement ? `, checked against TensorFlow.js at start (relative difference ${e.agreement.relativeL2.toPrecision(1)})` : '';
      return { key: 'embedder', tone: 'good', state: `Image features on ${runtime}`, detail: `${e.id ?? 'unnamed model'}${checked}` };
    }
  }
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
    parts: health.embedder ? [databasePart, workerPart, describeEmbedder(health.embedder)] : [databasePart, workerPart],
  };
}
