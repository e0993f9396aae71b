/**
 * The one way the client talks to the Cartouche API.
 *
 * Every request is same-origin JSON. A failed request throws an ApiError that carries
 * RFC 9457 problem details: the server's own when it sends application/problem+json,
 * otherwise a description composed here of what actually went wrong (no connection,
 * an unexpected status, an unreadable body).
 *
 * Every state-changing request (POST, PUT, PATCH, DELETE) carries the session's CSRF token in
 * the `x-csrf-token` header. The token comes from a CsrfSource (the cached session, see
 * `connectCsrfToSession` in session.ts). When the server refuses a token as stale (403 with
 * type `/problems/csrf`), the source is asked for a fresh one and the request is sent once more.
 */

/**
 * One entry of the optional `errors` member, usually pointing at an invalid input field.
 * The Cartouche API sends `{ path, message }`; `detail` always holds the message, whichever
 * member name the server used, and `path` the dotted field path when one was given.
 */
export interface ProblemFieldError {
  detail: string;
  path?: string;
  pointer?: string;
  [member: string]: unknown;
}

/** RFC 9457 problem details as returned by the Cartouche API. */
export interface ProblemDetails {
  type: string;
  title: string;
  status: number;
  detail: string;
  instance?: string;
  errors?: ProblemFieldError[];
}

export class ApiError extends Error {
  override readonly name = 'ApiError';
  readonly problem: ProblemDetails;
  /** Seconds the server asked the client to wait (Retry-After), when it said so. */
  readonly retryAfterSeconds: number | undefined;

  constructor(problem: ProblemDetails, options?: { cause?: unknown; retryAfterSeconds?: number }) {
    super(problem.detail ? `${problem.title}: ${problem.detail}` : problem.title, options);
    this.problem = problem;
    this.retryAfterSeconds = options?.retryAfterSeconds;
  }

  /** HTTP status of the failed response; 0 when no response arrived at all. */
  get status(): number {
    return this.problem.status;
  }
}

export function isApiError(error: unknown): error is ApiError {
  return error instanceof ApiError;
}

const PROBLEM_MEDIA_TYPE = 'application/problem+json';
const JSON_MEDIA_TYPE = 'application/json';

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

const CSRF_HEADER = 'x-csrf-token';
const CSRF_PROBLEM_TYPE = '/problems/csrf';

/** Where state-changing requests get their CSRF token from. */
export interface CsrfSource {
  /** The token known now, if any. */
  current(): string | undefined;
  /** Asks the server for the session again and returns its token. */
  refresh(): Promise<string | undefined>;
}

let csrfSource: CsrfSource | undefined;

/** Installs the token source; the app does this once at start (see main.tsx). */
export function setCsrfSource(source: CsrfSource | undefined): void {
  csrfSource = source;
}

function changesState(method: Method): boolean {
  return method !== 'GET';
}

/** The server's type may be relative (`/problems/csrf`) or resolved against its origin. */
function isCsrfProblem(error: ApiError): boolean {
  const { type } = error.problem;
  return error.status === 403 && (type === CSRF_PROBLEM_TYPE || type.endsWith(CSRF_PROBLEM_TYPE));
}

export interface RequestOptions {
  signal?: AbortSignal;
  headers?: Record<string, string>;
  /**
   * Non-2xx statuses whose JSON body is still a regular answer rather than a problem,
   * e.g. a health check that reports "degraded" with 503.
   */
  acceptStatuses?: readonly number[];
}

function mediaType(response: Response): string {
  const header = response.headers.get('content-type') ?? '';
  return (header.split(';')[0] ?? '').trim().toLowerCase();
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function readFieldErrors(value: unknown): ProblemFieldError[] | undefined {
  if (!Array.isArray(value)) return undefined;
  const entries: ProblemFieldError[] = [];
  for (const entry of value) {
    if (!isRecord(entry)) continue;
    const detail =
      typeof entry.detail === 'string' ? entry.detail : typeof entry.message === 'string' ? entry.message : undefined;
    if (detail === undefined) continue;
    const fieldError: ProblemFieldError = { ...entry, detail };
    if (typeof entry.path === 'string') fieldError.path = entry.path;
    entries.push(fieldError);
  }
  return entries;
}

/** Retry-After as seconds: either delay-seconds or an HTTP date (RFC 9110 §10.2.3). */
function readRetryAfter(response: Response): number | undefined {
  const header = response.headers.get('retry-after');
  if (header === null || header.trim() === '') return undefined;
  const trimmed = header.trim();
  if (/^\d+$/.test(trimmed)) return Number(trimmed);
  const at = Date.parse(trimmed);
  if (Number.isNaN(at)) return undefined;
  return Math.max(0, Math.ceil((at - Date.now()) / 1000));
}

/** Accepts what the server sent, filling only members the RFC lets a client default. */
function normaliseProblem(body: unknown, response: Response): ProblemDetails {
  const source = isRecord(body) ? body : {};
  const problem: ProblemDetails = {
    type: typeof source.type === 'string' && source.type !== '' ? source.type : 'about:blank',
    title:
      typeof source.title === 'string' && source.title !== ''
        ? source.title
        : response.statusText || `Request failed with status ${response.status}`,
    status: typeof source.status === 'number' ? source.status : response.status,
    detail: typeof source.detail === 'string' ? source.detail : '',
  };
  if (typeof source.instance === 'string') problem.instance = source.instance;
  const errors = readFieldErrors(source.errors);
  if (errors !== undefined) problem.errors = errors;
  return problem;
}

async function readJson(response: Response): Promise<unknown> {
  const text = await response.text();
  if (text === '') return undefined;
  return JSON.parse(text) as unknown;
}

function isAbort(error: unknown, signal: AbortSignal | undefined): boolean {
  return signal?.aborted === true || (error instanceof DOMException && error.name === 'AbortError');
}

async function request<T>(method: Method, path: string, body: unknown, options: RequestOptions): Promise<T> {
  if (!changesState(method) || csrfSource === undefined) return send<T>(method, path, body, options, undefined);
  const source = csrfSource;
  const token = source.current() ?? (await source.refresh());
  try {
    return await send<T>(method, path, body, options, token);
  } catch (error) {
    if (!isApiError(error) || !isCsrfProblem(error)) throw error;
    // The session was rotated or expired since the token was read: fetch it again, then retry once.
    const fresh = await source.refresh();
    return send<T>(method, path, body, options, fresh);
  }
}

async function send<T>(
  method: Method,
  path: string,
  body: unknown,
  options: RequestOptions,
  csrfToken: string | undefined,
): Promise<T> {
  const headers: Record<string, string> = {
    Accept: `${JSON_MEDIA_TYPE}, ${PROBLEM_MEDIA_TYPE}`,
    ...options.headers,
  };
  if (csrfToken !== undefined) headers[CSRF_HEADER] = csrfToken;
  const init: RequestInit = { method, headers, credentials: 'same-origin' };
  if (options.signal) init.signal = options.signal;
  if (body !== undefined) {
    headers['Content-Type'] = JSON_MEDIA_TYPE;
    init.body = JSON.stringify(body);
  }

  let response: Response;
  try {
    response = await fetch(path, init);
  } catch (error) {
    if (isAbort(error, options.signal)) throw error;
    throw new ApiError(
      {
        type: 'about:blank',
        title: 'Cannot reach the Cartouche server',
        status: 0,
        detail:
          'The request did not get an answer. Check your network connection; if it works, the server may be stopped.',
      },
      { cause: error },
    );
  }

  const type = mediaType(response);
  const accepted = response.ok || (options.acceptStatuses?.includes(response.status) ?? false);

  if (type === PROBLEM_MEDIA_TYPE || !accepted) {
    let parsed: unknown;
    if (type === PROBLEM_MEDIA_TYPE) {
      try {
        parsed = await readJson(response);
      } catch {
        parsed = undefined;
      }
    }
    const problem = normaliseProblem(parsed, response);
    if (problem.detail === '') {
      problem.detail = `The server answered ${method} ${path} with status ${response.status} and gave no further detail.`;
    }
    const retryAfterSeconds = readRetryAfter(response);
    throw new ApiError(problem, retryAfterSeconds === undefined ? undefined : { retryAfterSeconds });
  }

  if (response.status === 204 || response.status === 205) return undefined as T;

  if (type !== JSON_MEDIA_TYPE) {
    throw new ApiError({
      type: 'about:blank',
      title: 'Unexpected response',
      status: response.status,
      detail: `The server answered ${method} ${path} with "${type || 'no content type'}" instead of JSON.`,
    });
  }

  try {
    return (await readJson(response)) as T;
  } catch (error) {
    if (isAbort(error, options.signal)) throw error;
    throw new ApiError(
      {
        type: 'about:blank',
        title: 'Unreadable response',
        status: response.status,
        detail: `The server's answer to ${method} ${path} is not valid JSON.`,
      },
      { cause: error },
    );
  }
}

export const http = {
  get: <T>(path: string, options: RequestOptions = {}) => request<T>('GET', path, undefined, options),
  post: <T>(path: string, body?: unknown, options: RequestOptions = {}) => request<T>('POST', path, body, options),
  put: <T>(path: string, body?: unknown, options: RequestOptions = {}) => request<T>('PUT', path, body, options),
  patch: <T>(path: string, body?: unknown, options: RequestOptions = {}) => request<T>('PATCH', path, body, options),
  delete: <T>(path: string, options: RequestOptions = {}) => request<T>('DELETE', path, undefined, options),
};

/** The problem details behind any error a query or render can raise. */
export function problemOf(error: unknown): ProblemDetails {
  if (isApiError(error)) return error.problem;
  return {
    type: 'about:blank',
    title: 'Something went wrong in this page',
    status: 0,
    detail: error instanceof Error && error.message ? error.message : 'An unexpected error stopped this page.',
  };
}

/** A short reference line for a problem: its status and, when given, the instance identifier. */
export function problemReference(problem: ProblemDetails): string | undefined {
  const parts: string[] = [];
  if (problem.status > 0) parts.push(`Status ${problem.status}`);
  if (problem.instance) parts.push(`reference ${problem.instance}`);
  return parts.length > 0 ? parts.join(', ') : undefined;
}

/** For a 2xx answer whose JSON is not the shape the client was promised. */
export function unexpectedShape(path: string, expected: string): ApiError {
  return new ApiError({
    type: 'about:blank',
    title: 'Unexpected response',
    status: 200,
    detail: `The server's answer to ${path} did not contain ${expected}. The client and the server may be different versions.`,
  });
}
