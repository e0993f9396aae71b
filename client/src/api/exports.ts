import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';
import type { ExportKind, ExportView, LedgerMailView } from '../../../common/api/exports.ts';

/** Exports of a collection (coverage ledger, items CSV, XMP sidecars, IIIF manifest) and the weekly ledger mail. */

export { EXPORT_KINDS, type ExportKind, type ExportStatus } from '../../../common/api/exports.ts';
/** one export as the list shows it (the server's ExportView) */
export type ExportEntry = ExportView;
/** the weekly ledger mail settings with the weekday in words and the next sending */
export type LedgerMail = LedgerMailView;

/** How often the list is asked for again while an export is being built. */
export const EXPORT_POLL_MS = 2000;

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isExport(value: unknown): value is ExportEntry {
  return isRecord(value) && typeof value.id === 'number' && typeof value.kind === 'string' && typeof value.status === 'string';
}

function readMail(body: unknown, path: string): LedgerMail {
  const m = isRecord(body) ? body.ledgerMail : undefined;
  if (!isRecord(m) || typeof m.enabled !== 'boolean' || typeof m.weekday !== 'number' || typeof m.hour !== 'number' || typeof m.timeZone !== 'string') {
    throw unexpectedShape(path, 'the weekly ledger mail settings');
  }
  return m as unknown as LedgerMail;
}

export function isBuilding(e: Pick<ExportEntry, 'status'>): boolean {
  return e.status === 'queued' || e.status === 'running';
}

/** GET /api/collections/:id/exports, newest first */
export async function getExports(collectionId: number, signal?: AbortSignal): Promise<ExportEntry[]> {
  const path = `/api/collections/${collectionId}/exports`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.exports) || !body.exports.every(isExport)) throw unexpectedShape(path, 'a list of exports');
  return body.exports;
}

export function exportsQueryOptions(collectionId: number) {
  return queryOptions({
    queryKey: queryKeys.exports.list(collectionId),
    queryFn: ({ signal }) => getExports(collectionId, signal),
    refetchInterval: (query) => (query.state.data?.some(isBuilding) ? EXPORT_POLL_MS : false),
  });
}

export function useExports(collectionId: number | null) {
  return useQuery({ ...exportsQueryOptions(collectionId ?? 0), enabled: collectionId !== null });
}

export interface ExportRequest {
  collectionId: number;
  kind: ExportKind;
  periodFrom: string | null;
  periodTo: string | null;
}

/** POST /api/collections/:id/exports: the worker builds the file. */
export async function requestExport({ collectionId, ...body }: ExportRequest): Promise<ExportEntry> {
  const path = `/api/collections/${collectionId}/exports`;
  const res = await http.post<unknown>(path, body);
  const e = isRecord(res) ? res.export : undefined;
  if (!isExport(e)) throw unexpectedShape(path, 'the requested export');
  return e;
}

export function useRequestExport() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: requestExport,
    onSuccess: (created, { collectionId }) => {
      queryClient.setQueryData<ExportEntry[]>(queryKeys.exports.list(collectionId), (list) => (list ? [created, ...list.filter((e) => e.id !== created.id)] : [created]));
      void queryClient.invalidateQueries({ queryKey: queryKeys.exports.list(collectionId) });
    },
  });
}

/** GET /api/collections/:id/ledger-mail */
export async function getLedgerMail(collectionId: number, signal?: AbortSignal): Promise<LedgerMail> {
  const path = `/api/collections/${collectionId}/ledger-mail`;
  return readMail(await http.get<unknown>(path, { signal }), path);
}

export function useLedgerMail(collectionId: number | null) {
  return useQuery({ queryKey: queryKeys.exports.mail(collectionId ?? 0), queryFn: ({ signal }) => getLedgerMail(collectionId ?? 0, signal), enabled: collectionId !== null });
}

/** PUT /api/collections/:id/ledger-mail */
export async function saveLedgerMail({ collectionId, settings }: { collectionId: number; settings: Pick<LedgerMail, 'enabled' | 'weekday' | 'hour'> }): Promise<LedgerMail> {
  const path = `/api/collections/${collectionId}/ledger-mail`;
  return readMail(await http.put<unknown>(path, settings), path);
}

export function useSaveLedgerMail() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveLedgerMail,
    onSuccess: (saved, { collectionId }) => queryClient.setQueryData(queryKeys.exports.mail(collectionId), saved),
  });
}

/** The live IIIF manifest of a collection (built on request, not stored). */
export function manifestUrl(collectionId: number): string {
  return `/api/iiif/collections/${collectionId}/manifest`;
}
