import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http, isApiError, unexpectedShape } from './http';
import { queryKeys } from './query-keys';
import { sessionQueryOptions, type Role } from './session';

/** How a person signs in: a Cartouche password, the organisation's single sign-on, or not yet (invited). */
export type SignInMethod = 'password' | 'saml' | 'invited';

export interface Person {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  active: boolean;
  signInMethod: SignInMethod;
  lastSignInAt: string | null;
  createdAt: string;
  /** Optimistic lock: a change names the version it was made from. */
  version: number;
}

export interface PeopleResponse {
  people: Person[];
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isPerson(value: unknown): value is Person {
  return (
    isRecord(value) &&
    typeof value.id === 'number' &&
    typeof value.email === 'string' &&
    typeof value.displayName === 'string' &&
    typeof value.role === 'string' &&
    typeof value.active === 'boolean' &&
    typeof value.signInMethod === 'string' &&
    typeof value.version === 'number'
  );
}

function readPerson(body: unknown, path: string): Person {
  if (!isRecord(body) || !isPerson(body.person)) throw unexpectedShape(path, 'the person');
  return body.person;
}

/** GET /api/people */
export async function getPeople(signal?: AbortSignal): Promise<PeopleResponse> {
  const path = '/api/people';
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.people) || !body.people.every(isPerson)) {
    throw unexpectedShape(path, 'a list of people');
  }
  return { people: body.people };
}

export function peopleQueryOptions() {
  return queryOptions({
    queryKey: queryKeys.people.list(),
    queryFn: ({ signal }) => getPeople(signal),
  });
}

export function usePeople() {
  return useQuery(peopleQueryOptions());
}

export interface Invitation {
  email: string;
  displayName: string;
  role: Role;
}

/** POST /api/people/invitations: creates the account and e-mails a link to choose a password. */
export async function invitePerson(invitation: Invitation): Promise<Person> {
  const path = '/api/people/invitations';
  return readPerson(await http.post<unknown>(path, invitation), path);
}

export function useInvitePerson() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: invitePerson,
    onSuccess: (person) => {
      queryClient.setQueryData(peopleQueryOptions().queryKey, (previous) =>
        previous ? { people: [...previous.people.filter((entry) => entry.id !== person.id), person] } : previous,
      );
      void queryClient.invalidateQueries({ queryKey: queryKeys.people.all });
    },
  });
}

export interface PersonChange {
  id: number;
  /** The version the change was made from. */
  version: number;
  role?: Role;
  active?: boolean;
}

/** PATCH /api/people/:id */
export async function updatePerson({ id, ...change }: PersonChange): Promise<Person> {
  const path = `/api/people/${id}`;
  return readPerson(await http.patch<unknown>(path, change), path);
}

/** A 409 answer: someone changed the person meanwhile, or the change would break a rule. */
export function isConflict(error: unknown): boolean {
  return isApiError(error) && error.status === 409;
}

export function useUpdatePerson() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: updatePerson,
    onSuccess: (person) => {
      queryClient.setQueryData(peopleQueryOptions().queryKey, (previous) =>
        previous ? { people: previous.people.map((entry) => (entry.id === person.id ? person : entry)) } : previous,
      );
      // A change to one's own role changes what one may do: read the session again.
      if (queryClient.getQueryData(sessionQueryOptions().queryKey)?.user?.id === person.id) {
        void queryClient.invalidateQueries({ queryKey: queryKeys.session() });
      }
    },
    onError: (error) => {
      // The copy on screen is out of date (or the rule depends on others): show the server's.
      if (isConflict(error)) void queryClient.invalidateQueries({ queryKey: queryKeys.people.all });
    },
  });
}

/** POST /api/people/:id/invitation: sends the invitation again (only before a first sign-in). */
export async function resendInvitation(id: number): Promise<void> {
  await http.post<unknown>(`/api/people/${id}/invitation`);
}

export function useResendInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: resendInvitation,
    onError: (error) => {
      if (isConflict(error)) void queryClient.invalidateQueries({ queryKey: queryKeys.people.all });
    },
  });
}
