import type { Person, SignInMethod } from '../../api/people';
import type { Role } from '../../api/session';
import { roleLabels } from '../../lib/roles';

/** How each way of signing in reads in the table. */
export const signInMethodLabels: Record<SignInMethod, string> = {
  password: 'Cartouche password',
  saml: 'Organisation sign-on',
  invited: 'Invited, not signed in yet',
};

export function statusLabel(person: Pick<Person, 'active'>): string {
  return person.active ? 'Active' : 'Deactivated';
}

export type SortKey = 'name' | 'email' | 'role' | 'signInMethod' | 'status' | 'lastSignIn';
export type SortDirection = 'ascending' | 'descending';

export interface Sort {
  key: SortKey;
  direction: SortDirection;
}

export interface Filters {
  text: string;
  role: Role | 'any';
  status: 'any' | 'active' | 'deactivated';
}

export const noFilters: Filters = { text: '', role: 'any', status: 'any' };

export function isFiltered(filters: Filters): boolean {
  return filters.text.trim() !== '' || filters.role !== 'any' || filters.status !== 'any';
}

/** Lower case without accents, so "zoe" finds "Zoë". */
function fold(value: string): string {
  return value.normalize('NFD').replace(/\p{M}/gu, '').toLocaleLowerCase();
}

export function filterPeople(people: readonly Person[], filters: Filters): Person[] {
  const needle = fold(filters.text.trim());
  return people.filter(
    (person) =>
      (needle === '' || fold(person.displayName).includes(needle) || fold(person.email).includes(needle)) &&
      (filters.role === 'any' || person.role === filters.role) &&
      (filters.status === 'any' || (filters.status === 'active') === person.active),
  );
}

const collator = new Intl.Collator(undefined, { sensitivity: 'base', numeric: true });

function compareBy(key: SortKey, a: Person, b: Person): number {
  switch (key) {
    case 'name':
      return collator.compare(a.displayName, b.displayName);
    case 'email':
      return collator.compare(a.email, b.email);
    case 'role':
      return collator.compare(roleLabels[a.role], roleLabels[b.role]);
    case 'signInMethod':
      return collator.compare(signInMethodLabels[a.signInMethod], signInMethodLabels[b.signInMethod]);
    case 'status':
      return collator.compare(statusLabel(a), statusLabel(b));
    case 'lastSignIn': {
      // Never signed in counts as the earliest.
      const at = (person: Person) => (person.lastSignInAt === null ? -Infinity : Date.parse(person.lastSignInAt));
      const difference = at(a) - at(b);
      return Number.isNaN(difference) ? 0 : Math.sign(difference);
    }
  }
}

/** A stable sort; ties fall back to the name, then the id. */
export function sortPeople(people: readonly Person[], sort: Sort): Person[] {
  const factor = sort.direction === 'ascending' ? 1 : -1;
  return [...people].sort(
    (a, b) =>
      factor * compareBy(sort.key, a, b) || collator.compare(a.displayName, b.displayName) || a.id - b.id,
  );
}

export const columnLabels: Record<SortKey, string> = {
  name: 'Name',
  email: 'E-mail address',
  role: 'Role',
  signInMethod: 'Sign-in method',
  status: 'Status',
  lastSignIn: 'Last sign-in',
};

/** The order in words, e.g. "A to Z", "newest first". */
export function directionWords(sort: Sort): string {
  if (sort.key === 'lastSignIn') return sort.direction === 'ascending' ? 'oldest first' : 'newest first';
  return sort.direction === 'ascending' ? 'A to Z' : 'Z to A';
}
