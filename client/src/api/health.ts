import { queryOptions, useQuery } from '@tanstack/react-query';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';
import type { EmbedderHealth } from '../../../common/api/health.ts';

export type WorkerState = 'running' | 'stale' | 'absent';

export type { EmbedderHealth } from '../../../common/api/health.ts';

export interface Health {
  status: 'ok' | 'degraded';
  version: string;
  database: {
    ok: boolean;
    latencyMs: number | null;
    error?: string;
  };
  worker: {
    state: WorkerState;
    lastHeartbeatAt: string | null;
    count: number;
  };
  /** sent by every current server; a report without it (an older server during an upgrade) leaves the part out */
  embedder?: EmbedderHealth;
}

/** How often the status line asks again while the page is open. */
const HEALTH_REFRESH_MS = 30_000;

/** GET /api/health. A degraded system may answer 503 with the same body; that is still a report. */
export async function getHealth(signal?: AbortSignal): Promise<Health> {
  const body = await http.get<Health | undefined>('/api/health', { signal, acceptStatuses: [503] });
  if (!body || typeof body.status !== 'string' || !body.database || !body.worker) {
    throw unexpectedShape('/api/health', 'a health report');
  }
  return body;
}

export function healthQueryOptions() {
  return queryOptions({
    queryKey: queryKeys.health(),
    queryFn: ({ signal }) => getHealth(signal),
    refetchInterval: HEALTH_REFRESH_MS,
    staleTime: HEALTH_REFRESH_MS / 2,
  });
}

export function useHealth() {
  return useQuery(healthQueryOptions());
}
