import { queryOptions, useQuery } from '@tanstack/react-query';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';

export type WorkerState = 'running' | 'stale' | 'absent';

/** The API process's embedder as /api/health reports it: which runtime turns images into features. */
export interface EmbedderHealth {
  /** what the settings ask for: the built-in backbone on onnx or tfjs, or a model named by a configuration file */
  requested: 'onnx' | 'tfjs' | 'configured model';
  /** idle: not needed yet (it starts with the first upload of examples); failed: it could not start */
  state: 'idle' | 'starting' | 'ready' | 'failed';
  id: string | null;
  runtime: 'onnx' | 'tfjs' | null;
  /** why the requested runtime is not the one in use */
  fallbackReason: string | null;
  /** ONNX against TF.js on the start-up probe image */
  agreement: { relativeL2: number; maxAbs: number; lowestCosine: number } | null;
  error?: string;
}

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
