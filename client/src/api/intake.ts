import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { ApiError, http, unexpectedShape, type ProblemDetails, type ProblemFieldError } from './http';
import { queryKeys } from './query-keys';
import type { ImportColumn, ImportPreview } from '../../../common/api/metadata-import.ts';
import { sessionQueryOptions } from './session';

/**
 * Intake: scans uploaded from the browser, and catalogue sheets previewed and applied.
 *
 * Uploads go through XMLHttpRequest rather than fetch, because only XMLHttpRequest reports how much of a
 * request body has been sent (fetch has no upload progress).
 */

export interface IntakeSettings {
  formats: Array<{ format: string; label: string; mimeType: string; extensions: string[] }>;
  maxFileBytes: number;
  maxFiles: number;
  maxPixels: number;
  sheet: {
    maxBytes: number;
    maxRows: number;
    columns: Array<{ field: ImportColumn; label: string; aliases: string[] }>;
  };
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** GET /api/intake/settings: what intake accepts on this server. */
export async function getIntakeSettings(signal?: AbortSignal): Promise<IntakeSettings> {
  const path = '/api/intake/settings';
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.formats) || typeof body.maxFileBytes !== 'number' || !isRecord(body.sheet)) {
    throw unexpectedShape(path, 'the intake settings');
  }
  return body as unknown as IntakeSettings;
}

export function intakeSettingsQueryOptions() {
  return queryOptions({ queryKey: queryKeys.intake.settings(), queryFn: ({ signal }) => getIntakeSettings(signal), staleTime: 10 * 60_000 });
}

export function useIntakeSettings() {
  return useQuery(intakeSettingsQueryOptions());
}

// ------------------------------------------------------------------ sending files with progress

/** Where a multipart request gets its CSRF token, and a fresh one when the server refuses it. */
export interface CsrfTokens {
  current(): string | undefined;
  refresh(): Promise<string | undefined>;
}

export function csrfTokensFrom(queryClient: QueryClient): CsrfTokens {
  return {
    current: () => queryClient.getQueryData(sessionQueryOptions().queryKey)?.csrfToken,
    refresh: async () => (await queryClient.fetchQuery({ ...sessionQueryOptions(), staleTime: 0 })).csrfToken,
  };
}

export interface SendOptions {
  /** bytes of the request body sent so far, and its total */
  onProgress?: (sent: number, total: number) => void;
  /** the body is sent; the server is working on the answer */
  onSent?: () => void;
  signal?: AbortSignal;
}

function readFieldErrors(value: unknown): ProblemFieldError[] | undefined {
  if (!Array.isArray(value)) return undefined;
  return value.filter(isRecord).flatMap((entry) => {
    const detail = typeof entry.detail === 'string' ? entry.detail : typeof entry.message === 'string' ? entry.message : undefined;
    return detail === undefined ? [] : [{ ...entry, detail, ...(typeof entry.path === 'string' ? { path: entry.path } : {}) }];
  });
}

function problemFrom(xhr: XMLHttpRequest, method: string, path: string): ProblemDetails {
  let body: unknown;
  try {
    body = xhr.responseText ? (JSON.parse(xhr.responseText) as unknown) : undefined;
  } catch {
    body = undefined;
  }
  const source = isRecord(body) ? body : {};
  const problem: ProblemDetails = {
    type: typeof source.type === 'string' && source.type !== '' ? source.type : 'about:blank',
    title: typeof source.title === 'string' && source.title !== '' ? source.title : xhr.statusText || `Request failed with status ${xhr.status}`,
    status: typeof source.status === 'number' ? source.status : xhr.status,
    detail: typeof source.detail === 'string' && source.detail !== '' ? source.detail : `The server answered ${method} ${path} with status ${xhr.status} and gave no further detail.`,
  };
  if (typeof source.instance === 'string') problem.instance = source.instance;
  const errors = readFieldErrors(source.errors);
  if (errors) problem.errors = errors;
  return problem;
}

function sendOnce(path: string, form: FormData, token: string | undefined, options: SendOptions): Promise<unknown> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', path);
    xhr.withCredentials = true;
    xhr.setRequestHeader('Accept', 'application/json, application/problem+json');
    if (token !== undefined) xhr.setRequestHeader('x-csrf-token', token);
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable) options.onProgress?.(event.loaded, event.total);
    };
    xhr.upload.onload = () => options.onSent?.();
    const onAbort = () => xhr.abort();
    options.signal?.addEventListener('abort', onAbort, { once: true });
    const done = () => options.signal?.removeEventListener('abort', onAbort);
    xhr.onabort = () => {
      done();
      reject(new DOMException('The upload was cancelled.', 'AbortError'));
    };
    xhr.onerror = () => {
      done();
      reject(
        new ApiError({
          type: 'about:blank',
          title: 'Cannot reach the Cartouche server',
          status: 0,
          detail: 'The upload did not get an answer. Check your network connection and try again.',
        }),
      );
    };
    xhr.onload = () => {
      done();
      const type = (xhr.getResponseHeader('content-type') ?? '').split(';')[0]!.trim().toLowerCase();
      if (xhr.status < 200 || xhr.status >= 300 || type === 'application/problem+json') {
        reject(new ApiError(problemFrom(xhr, 'POST', path)));
        return;
      }
      try {
        resolve(JSON.parse(xhr.responseText) as unknown);
      } catch (error) {
        reject(new ApiError({ type: 'about:blank', title: 'Unreadable response', status: xhr.status, detail: `The server's answer to POST ${path} is not valid JSON.` }, { cause: error }));
      }
    };
    if (options.signal?.aborted) {
      reject(new DOMException('The upload was cancelled.', 'AbortError'));
      return;
    }
    xhr.send(form);
  });
}

/** POSTs a multipart form with upload progress; a refused CSRF token is renewed once and the form sent again. */
export async function sendForm(path: string, form: FormData, csrf: CsrfTokens, options: SendOptions = {}): Promise<unknown> {
  const token = csrf.current() ?? (await csrf.refresh());
  try {
    return await sendOnce(path, form, token, options);
  } catch (error) {
    const csrfRefused = error instanceof ApiError && error.status === 403 && error.problem.type.endsWith('/problems/csrf');
    if (!csrfRefused) throw error;
    return sendOnce(path, form, await csrf.refresh(), options);
  }
}

// ------------------------------------------------------------------ scans

export type IngestFormat = 'jpeg' | 'png' | 'tiff' | 'webp';

/** What became of one uploaded file. */
export type UploadOutcome =
  | {
      outcome: 'ingested';
      fileName: string;
      itemId: number;
      identifier: string;
      format: IngestFormat;
      width: number;
      height: number;
      byteSize: number;
      notes: string[];
    }
  | { outcome: 'duplicate'; fileName: string; itemId: number; identifier: string; reason: string }
  | { outcome: 'rejected'; fileName: string; code: string; reason: string }
  | { outcome: 'failed'; fileName: string; reason: string };

function isOutcome(value: unknown): value is UploadOutcome {
  return isRecord(value) && typeof value.fileName === 'string' && ['ingested', 'duplicate', 'rejected', 'failed'].includes(String(value.outcome));
}

/** POST /api/collections/:id/items/upload with one file; resolves to what became of it. */
export async function uploadScan(collectionId: number, file: File, csrf: CsrfTokens, options: SendOptions = {}): Promise<UploadOutcome> {
  const path = `/api/collections/${collectionId}/items/upload`;
  const form = new FormData();
  form.append('files', file, file.name);
  const body = await sendForm(path, form, csrf, options);
  const outcome = isRecord(body) && Array.isArray(body.outcomes) ? body.outcomes[0] : undefined;
  if (!isOutcome(outcome)) throw unexpectedShape(path, 'the outcome of the upload');
  return outcome;
}

/** Addresses of an item's derivatives, for <img src>. */
export const thumbnailUrl = (itemId: number) => `/api/items/${itemId}/thumbnail`;
export const viewUrl = (itemId: number) => `/api/items/${itemId}/view`;

// ------------------------------------------------------------------ catalogue sheets

export type { ImportColumn, ImportField, ImportPreview, PreviewRow } from '../../../common/api/metadata-import.ts';

function readImport(body: unknown, path: string): ImportPreview {
  const value = isRecord(body) ? body.import : undefined;
  if (!isRecord(value) || typeof value.id !== 'number' || !Array.isArray(value.rows) || !isRecord(value.summary)) throw unexpectedShape(path, 'the import preview');
  return value as unknown as ImportPreview;
}

/** POST /api/collections/:id/imports: reads the sheet and answers with its preview; changes no item. */
export async function previewSheet(collectionId: number, file: File, csrf: CsrfTokens): Promise<ImportPreview> {
  const path = `/api/collections/${collectionId}/imports`;
  const form = new FormData();
  form.append('sheet', file, file.name);
  return readImport(await sendForm(path, form, csrf), path);
}

export function usePreviewSheet() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ collectionId, file }: { collectionId: number; file: File }) => previewSheet(collectionId, file, csrfTokensFrom(queryClient)),
    onSuccess: (preview) => queryClient.setQueryData(queryKeys.intake.import(preview.collectionId, preview.id), preview),
  });
}

/** GET /api/collections/:id/imports/:importId */
export async function getImport(collectionId: number, importId: number, signal?: AbortSignal): Promise<ImportPreview> {
  const path = `/api/collections/${collectionId}/imports/${importId}`;
  return readImport(await http.get<unknown>(path, { signal }), path);
}

export function importQueryOptions(collectionId: number, importId: number) {
  return queryOptions({ queryKey: queryKeys.intake.import(collectionId, importId), queryFn: ({ signal }) => getImport(collectionId, importId, signal) });
}

export function useImport(collectionId: number, importId: number | null) {
  return useQuery({ ...importQueryOptions(collectionId, importId ?? 0), enabled: importId !== null });
}

/** POST /api/collections/:id/imports/:importId/apply */
export async function applyImport({ collectionId, importId }: { collectionId: number; importId: number }): Promise<ImportPreview> {
  const path = `/api/collections/${collectionId}/imports/${importId}/apply`;
  return readImport(await http.post<unknown>(path), path);
}

export function useApplyImport() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: applyImport,
    onSuccess: (applied) => {
      queryClient.setQueryData(queryKeys.intake.import(applied.collectionId, applied.id), applied);
      void queryClient.invalidateQueries({ queryKey: queryKeys.collections.all });
    },
    onError: (_error, { collectionId, importId }) => {
      // e.g. applied meanwhile from another tab: show what the server has
      void queryClient.invalidateQueries({ queryKey: queryKeys.intake.import(collectionId, importId) });
    },
  });
}

/** After scans were added: the collection counts on other screens are out of date. */
export function scansAdded(queryClient: QueryClient): void {
  void queryClient.invalidateQueries({ queryKey: queryKeys.collections.all });
}
