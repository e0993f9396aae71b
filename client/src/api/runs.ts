import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';

/**
 * The night shift of a collection: its settings (schedule, time zone, drop folder) and its runs.
 * A run that is queued or running is asked for again every two seconds until it is over.
 */

/** How often a queued or running run is asked for again. */
export const POLL_MS = 2000;

export const STAGE_NAMES = ['ingest', 'embed', 'retrain', 'suggest', 'text', 'digest'] as const;
export type StageName = (typeof STAGE_NAMES)[number];
export type RunStatus = 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled';
export type StageState = 'pending' | 'running' | 'done' | 'skipped';

export interface RunStage {
  name: StageName;
  state: StageState;
  done: number;
  total: number | null;
  startedAt: string | null;
  finishedAt: string | null;
  note?: string;
  /** seconds left at the stage's pace so far, while it runs and when that can be told */
  eta: number | null;
}

export interface RunCounts {
  ingested: number;
  duplicates: number;
  rejected: number;
  embedded: number;
  /** absent on runs recorded before text reading existed */
  textRead?: number;
  suggested: number;
  retrained: number;
}

export interface Run {
  id: number;
  collectionId: number;
  trigger: 'schedule' | 'manual';
  status: RunStatus;
  requestedBy: number | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  durationMs: number | null;
  counts: RunCounts;
  stages: RunStage[];
  rejected: Array<{ fileName: string; reason: string }>;
  errors: Array<{ at: string; message: string }>;
  error: string | null;
}

export interface Schedule {
  scheduleCron: string;
  scheduleTimezone: string;
  scheduleEnabled: boolean;
  /** '' when the collection has no drop folder */
  dropFolder: string;
}

export function isActive(run: Pick<Run, 'status'>): boolean {
  return run.status === 'queued' || run.status === 'running';
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isRun(value: unknown): value is Run {
  return (
    isRecord(value) &&
    typeof value.id === 'number' &&
    typeof value.collectionId === 'number' &&
    typeof value.status === 'string' &&
    isRecord(value.counts) &&
    Array.isArray(value.stages) &&
    Array.isArray(value.rejected) &&
    Array.isArray(value.errors)
  );
}

function readRun(body: unknown, path: string): Run {
  const run = isRecord(body) ? body.run : undefined;
  if (!isRun(run)) throw unexpectedShape(path, 'a night-shift run');
  return run;
}

function readSchedule(body: unknown, path: string): Schedule {
  const s = isRecord(body) ? body.schedule : undefined;
  if (
    !isRecord(s) ||
    typeof s.scheduleCron !== 'string' ||
    typeof s.scheduleTimezone !== 'string' ||
    typeof s.scheduleEnabled !== 'boolean' ||
    typeof s.dropFolder !== 'string'
  ) {
    throw unexpectedShape(path, 'the night-shift settings');
  }
  return { scheduleCron: s.scheduleCron, scheduleTimezone: s.scheduleTimezone, scheduleEnabled: s.scheduleEnabled, dropFolder: s.dropFolder };
}

// ------------------------------------------------------------------ runs

/** GET /api/collections/:id/runs, newest first */
export async function getRuns(collectionId: number, signal?: AbortSignal): Promise<Run[]> {
  const path = `/api/collections/${collectionId}/runs`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.runs) || !body.runs.every(isRun)) throw unexpectedShape(path, 'a list of runs');
  return body.runs;
}

/** GET /api/runs/:id */
export async function getRun(runId: number, signal?: AbortSignal): Promise<Run> {
  const path = `/api/runs/${runId}`;
  return readRun(await http.get<unknown>(path, { signal }), path);
}

/**
 * The runs of a collection. The selected run polls itself (see useRun); the list polls only while some
 * other run of it is under way, so nothing is asked for twice.
 */
export function runsQueryOptions(collectionId: number, selectedRunId: number | null = null) {
  return queryOptions({
    queryKey: queryKeys.runs.list(collectionId),
    queryFn: ({ signal }) => getRuns(collectionId, signal),
    refetchInterval: (query) => (query.state.data?.some((r) => isActive(r) && r.id !== selectedRunId) ? POLL_MS : false),
  });
}

export function useRuns(collectionId: number | null, selectedRunId: number | null) {
  return useQuery({ ...runsQueryOptions(collectionId ?? 0, selectedRunId), enabled: collectionId !== null });
}

export function runQueryOptions(runId: number) {
  return queryOptions({
    queryKey: queryKeys.runs.run(runId),
    queryFn: ({ signal }) => getRun(runId, signal),
    refetchInterval: (query) => (query.state.data && isActive(query.state.data) ? POLL_MS : false),
  });
}

/** Puts a fresh copy of a run into its collection's list, so the list and the detail agree. */
function storeRunInList(queryClient: QueryClient, run: Run): void {
  queryClient.setQueryData<Run[]>(queryKeys.runs.list(run.collectionId), (runs) => {
    if (!runs) return runs;
    return runs.some((r) => r.id === run.id) ? runs.map((r) => (r.id === run.id ? run : r)) : [run, ...runs];
  });
}

/** One run, asked for again every two seconds while it is queued or running. */
export function useRun(runId: number | null, fromList: Run | undefined) {
  const queryClient = useQueryClient();
  const query = useQuery({
    ...runQueryOptions(runId ?? 0),
    enabled: runId !== null,
    // the list already holds a copy: show it at once, and ask again straight away only if it may change
    ...(fromList ? { initialData: fromList } : {}),
    ...(fromList && isActive(fromList) ? { initialDataUpdatedAt: 0 } : {}),
  });
  const data = query.data;
  useEffect(() => {
    if (data === undefined) return;
    storeRunInList(queryClient, data);
    // a finished run changes what other screens show (last run, items waiting for review)
    if (!isActive(data)) void queryClient.invalidateQueries({ queryKey: queryKeys.collections.all });
  }, [data, queryClient]);
  return query;
}

/** POST /api/collections/:id/runs: "Run now". */
export async function startRun(collectionId: number): Promise<Run> {
  const path = `/api/collections/${collectionId}/runs`;
  return readRun(await http.post<unknown>(path), path);
}

export function useStartRun() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: startRun,
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.run(run.id), run);
      storeRunInList(queryClient, run);
    },
    // e.g. a run was already under way: show it
    onError: (_error, collectionId) => void queryClient.invalidateQueries({ queryKey: queryKeys.runs.list(collectionId) }),
  });
}

/** POST /api/runs/:id/cancel */
export async function cancelRun(runId: number): Promise<Run> {
  const path = `/api/runs/${runId}/cancel`;
  return readRun(await http.post<unknown>(path), path);
}

export function useCancelRun() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: cancelRun,
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.run(run.id), run);
      storeRunInList(queryClient, run);
    },
    // e.g. the run finished meanwhile: show what the server has
    onError: (_error, runId) => void queryClient.invalidateQueries({ queryKey: queryKeys.runs.run(runId) }),
  });
}

// ------------------------------------------------------------------ settings

/** GET /api/collections/:id/schedule */
export async function getSchedule(collectionId: number, signal?: AbortSignal): Promise<Schedule> {
  const path = `/api/collections/${collectionId}/schedule`;
  return readSchedule(await http.get<unknown>(path, { signal }), path);
}

export function scheduleQueryOptions(collectionId: number) {
  return queryOptions({ queryKey: queryKeys.runs.schedule(collectionId), queryFn: ({ signal }) => getSchedule(collectionId, signal) });
}

export function useSchedule(collectionId: number | null) {
  return useQuery({ ...scheduleQueryOptions(collectionId ?? 0), enabled: collectionId !== null });
}

/** PUT /api/collections/:id/schedule */
export async function saveSchedule({ collectionId, schedule }: { collectionId: number; schedule: Schedule }): Promise<Schedule> {
  const path = `/api/collections/${collectionId}/schedule`;
  return readSchedule(await http.put<unknown>(path, schedule), path);
}

export function useSaveSchedule() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveSchedule,
    onSuccess: (saved, { collectionId }) => queryClient.setQueryData(queryKeys.runs.schedule(collectionId), saved),
  });
}
