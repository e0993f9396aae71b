import { queryOptions, useQuery } from '@tanstack/react-query';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';

/** The managers' dashboard: coverage of every collection over time, and one collection's review figures. */

export interface CoveragePoint {
  /** the ISO week's Monday, YYYY-MM-DD */
  week: string;
  items: number;
  approved: number;
  coverage: number | null;
}

export interface CoverageOverTime {
  weeks: string[];
  series: Array<{ collectionId: number; name: string; points: CoveragePoint[] }>;
}

export interface SubjectPrecision {
  subjectId: number;
  label: string;
  kind: 'subject' | 'form';
  accepted: number;
  rejected: number;
  added: number;
  waiting: number;
  precision: number | null;
}

export interface Agreement {
  perSubject: Array<{ subjectId: number; label: string; items: number; kappa: number | null }>;
  perPair: Array<{ editorA: { id: number; name: string }; editorB: { id: number; name: string }; items: number; kappa: number | null }>;
}

export interface DashboardRun {
  id: number;
  trigger: 'schedule' | 'manual';
  status: 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled';
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  durationMs: number | null;
  counts: { ingested: number; embedded: number; suggested: number; rejected: number };
}

export interface CollectionDashboard {
  throughput: {
    weeks: string[];
    editors: Array<{ id: number; name: string }>;
    rows: Array<{ week: string; editorId: number; approved: number; decisions: number }>;
  };
  precision: SubjectPrecision[];
  agreement: Agreement;
  runs: DashboardRun[];
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

export const DASHBOARD_WEEKS = 12;

/** GET /api/dashboard/coverage */
export async function getCoverage(weeks: number, signal?: AbortSignal): Promise<CoverageOverTime> {
  const path = `/api/dashboard/coverage?weeks=${weeks}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.weeks) || !Array.isArray(body.series)) throw unexpectedShape(path, 'coverage over time');
  return body as unknown as CoverageOverTime;
}

/** GET /api/collections/:id/dashboard */
export async function getCollectionDashboard(collectionId: number, weeks: number, signal?: AbortSignal): Promise<CollectionDashboard> {
  const path = `/api/collections/${collectionId}/dashboard?weeks=${weeks}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !isRecord(body.throughput) || !Array.isArray(body.precision) || !isRecord(body.agreement) || !Array.isArray(body.runs)) {
    throw unexpectedShape(path, 'the dashboard of a collection');
  }
  return body as unknown as CollectionDashboard;
}

export function coverageQueryOptions(weeks = DASHBOARD_WEEKS) {
  return queryOptions({ queryKey: queryKeys.dashboard.coverage(weeks), queryFn: ({ signal }) => getCoverage(weeks, signal) });
}

export function useCoverage(weeks = DASHBOARD_WEEKS) {
  return useQuery(coverageQueryOptions(weeks));
}

export function collectionDashboardQueryOptions(collectionId: number, weeks = DASHBOARD_WEEKS) {
  return queryOptions({ queryKey: queryKeys.dashboard.collection(collectionId, weeks), queryFn: ({ signal }) => getCollectionDashboard(collectionId, weeks, signal) });
}

export function useCollectionDashboard(collectionId: number | null, weeks = DASHBOARD_WEEKS) {
  return useQuery({ ...collectionDashboardQueryOptions(collectionId ?? 0, weeks), enabled: collectionId !== null });
}
