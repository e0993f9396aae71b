import {
  queryOptions,
  useMutation,
  useQuery,
  useQueryClient,
  useSuspenseQuery,
  type QueryClient,
} from '@tanstack/react-query';
import { http, setCsrfSource, unexpectedShape } from './http';
import { queryKeys } from './query-keys';

export const ROLES = ['admin', 'archivist', 'editor', 'manager'] as const;
export type Role = (typeof ROLES)[number];

/** What a role may do. The server enforces these; the client only hides what a role cannot use. */
export type Permission =
  | 'collections:read'
  | 'collections:write'
  | 'subjects:write'
  | 'items:import'
  | 'review:write'
  | 'runs:start'
  | 'exports:read'
  | 'people:manage'
  | 'mailbox:read';

export interface SessionUser {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  permissions: string[];
}

export interface Session {
  user: SessionUser | null;
  /** Sent with every state-changing request as `x-csrf-token`. */
  csrfToken: string;
  signIn: {
    local: boolean;
    saml: boolean;
    /** Where single sign-on starts: a full page navigation, never a fetch. */
    samlLoginUrl: string;
  };
  /** True when the development mailbox is available on this server. */
  mailbox: boolean;
}

/** The answer to sign-in and to setting a password: the session was rotated. */
export interface SignedIn {
  user: SessionUser;
  csrfToken: string;
}

export type PasswordLinkPurpose = 'invitation' | 'password_reset';

/** What an invitation or password-reset link stands for. */
export interface PasswordLink {
  purpose: PasswordLinkPurpose;
  email: string;
  displayName: string;
  expiresAt: string;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isSessionUser(value: unknown): value is SessionUser {
  return (
    isRecord(value) &&
    typeof value.id === 'number' &&
    typeof value.email === 'string' &&
    typeof value.displayName === 'string' &&
    typeof value.role === 'string' &&
    (ROLES as readonly string[]).includes(value.role) &&
    Array.isArray(value.permissions)
  );
}

function readSignedIn(body: unknown, path: string): SignedIn {
  if (!isRecord(body) || !isSessionUser(body.user) || typeof body.csrfToken !== 'string') {
    throw unexpectedShape(path, 'the signed-in person and a new CSRF token');
  }
  return { user: body.user, csrfToken: body.csrfToken };
}

/** GET /api/auth/session */
export async function getSession(signal?: AbortSignal): Promise<Session> {
  const path = '/api/auth/session';
  const body = await http.get<unknown>(path, { signal });
  if (
    !isRecord(body) ||
    !(body.user === null || isSessionUser(body.user)) ||
    typeof body.csrfToken !== 'string' ||
    !isRecord(body.signIn) ||
    typeof body.signIn.samlLoginUrl !== 'string'
  ) {
    throw unexpectedShape(path, 'a session');
  }
  return {
    user: body.user,
    csrfToken: body.csrfToken,
    signIn: {
      local: body.signIn.local === true,
      saml: body.signIn.saml === true,
      samlLoginUrl: body.signIn.samlLoginUrl,
    },
    mailbox: body.mailbox === true,
  };
}

export function sessionQueryOptions() {
  return queryOptions({
    queryKey: queryKeys.session(),
    queryFn: ({ signal }) => getSession(signal),
    staleTime: 60_000,
  });
}

/**
 * The session. The router's root loader fetches it before any screen renders, so it is
 * always there; it suspends only if that loader was skipped.
 */
export function useSession(): Session {
  return useSuspenseQuery(sessionQueryOptions()).data;
}

export function hasPermission(user: SessionUser | null, permission: Permission): boolean {
  return user !== null && user.permissions.includes(permission);
}

/**
 * Lets every state-changing request carry the cached session's CSRF token, and fetch the
 * session again when the server refuses it. Call once, with the app's query client.
 */
export function connectCsrfToSession(queryClient: QueryClient): void {
  setCsrfSource({
    current: () => queryClient.getQueryData(sessionQueryOptions().queryKey)?.csrfToken,
    refresh: async () => (await queryClient.fetchQuery({ ...sessionQueryOptions(), staleTime: 0 })).csrfToken,
  });
}

/** Answers that belong to the browser tab rather than to the person signed in. */
const notPersonal = new Set<unknown>([queryKeys.session()[0], queryKeys.passwordLink('')[0]]);

/**
 * Drops every cached answer that belongs to the person signed in, so none of it outlives their
 * session. The session itself stays, and so does the password link a screen may be showing.
 */
export function forgetSignedInData(queryClient: QueryClient): void {
  queryClient.removeQueries({ predicate: (query) => !notPersonal.has(query.queryKey[0]) });
}

function storeSession(queryClient: QueryClient, change: Pick<Session, 'user' | 'csrfToken'>): void {
  const previous = queryClient.getQueryData(sessionQueryOptions().queryKey);
  if (previous === undefined) {
    // Not expected (the root loader fetched the session), but never guess the rest of it.
    void queryClient.invalidateQueries({ queryKey: queryKeys.session() });
    return;
  }
  queryClient.setQueryData(sessionQueryOptions().queryKey, { ...previous, ...change });
}

function startSignedIn(queryClient: QueryClient, signedIn: SignedIn): void {
  forgetSignedInData(queryClient);
  storeSession(queryClient, signedIn);
  // what the person may see beyond their permissions (e.g. the development mailbox) comes with the full session
  void queryClient.invalidateQueries({ queryKey: queryKeys.session() });
}

/**
 * A request was answered 401 although the cache says someone is signed in: the session ended
 * on the server (expired, or the person was deactivated). Ask for the session again; the
 * signed-in area reacts when it comes back without a person.
 */
export function sessionMayHaveEnded(queryClient: QueryClient): void {
  const session = queryClient.getQueryData(sessionQueryOptions().queryKey);
  if (session?.user) void queryClient.invalidateQueries({ queryKey: queryKeys.session() });
}

/** POST /api/auth/login */
export async function signIn(credentials: { email: string; password: string }): Promise<SignedIn> {
  const path = '/api/auth/login';
  return readSignedIn(await http.post<unknown>(path, credentials), path);
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: (signedIn) => startSignedIn(queryClient, signedIn),
  });
}

/** POST /api/auth/logout */
export async function signOut(): Promise<{ csrfToken: string }> {
  const path = '/api/auth/logout';
  const body = await http.post<unknown>(path);
  if (!isRecord(body) || typeof body.csrfToken !== 'string') throw unexpectedShape(path, 'a new CSRF token');
  return { csrfToken: body.csrfToken };
}

/**
 * Signs out. The cached session says "nobody" at once; the caller leaves the signed-in screens
 * and then calls `forgetSignedInData`, so no screen refetches its data in between.
 */
export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signOut,
    onSuccess: ({ csrfToken }) => storeSession(queryClient, { user: null, csrfToken }),
  });
}

/** POST /api/auth/password-reset. The answer never says whether an account exists. */
export async function requestPasswordReset(input: { email: string }): Promise<void> {
  await http.post<unknown>('/api/auth/password-reset', input);
}

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: requestPasswordReset });
}

/** GET /api/auth/tokens/:token */
export async function getPasswordLink(token: string, signal?: AbortSignal): Promise<PasswordLink> {
  const path = `/api/auth/tokens/${encodeURIComponent(token)}`;
  const body = await http.get<unknown>(path, { signal });
  if (
    !isRecord(body) ||
    (body.purpose !== 'invitation' && body.purpose !== 'password_reset') ||
    typeof body.email !== 'string' ||
    typeof body.displayName !== 'string' ||
    typeof body.expiresAt !== 'string'
  ) {
    throw unexpectedShape('/api/auth/tokens/…', 'what the link is for');
  }
  return { purpose: body.purpose, email: body.email, displayName: body.displayName, expiresAt: body.expiresAt };
}

export function passwordLinkQueryOptions(token: string) {
  return queryOptions({
    queryKey: queryKeys.passwordLink(token),
    queryFn: ({ signal }) => getPasswordLink(token, signal),
    staleTime: Infinity,
    refetchOnWindowFocus: false,
  });
}

export function usePasswordLink(token: string) {
  return useQuery({ ...passwordLinkQueryOptions(token), enabled: token !== '' });
}

/** POST /api/auth/password: sets the password a link allows, and signs the person in. */
export async function setPassword(input: { token: string; password: string }): Promise<SignedIn> {
  const path = '/api/auth/password';
  return readSignedIn(await http.post<unknown>(path, input), path);
}

export function useSetPassword() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: setPassword,
    onSuccess: (signedIn) => startSignedIn(queryClient, signedIn),
  });
}

/** The rule the server applies to new passwords. */
export const PASSWORD_LENGTH = { min: 12, max: 256 } as const;
