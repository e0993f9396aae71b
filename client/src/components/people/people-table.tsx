import { useCallback, useId, useMemo, useRef, useState } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { usePeople, type Person } from '../../api/people';
import { ROLES, type Role } from '../../api/session';
import { formatCount } from '../../lib/format';
import { roleLabels } from '../../lib/roles';
import { Button } from '../ui/button';
import { cx } from '../ui/cx';
import { SelectField, TextField } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';
import { PersonRow, type Announce } from './person-row';
import {
  columnLabels,
  directionWords,
  filterPeople,
  isFiltered,
  noFilters,
  sortPeople,
  type Filters,
  type Sort,
  type SortKey,
} from './people-view';

const sortableColumns: SortKey[] = ['name', 'email', 'role', 'signInMethod', 'status', 'lastSignIn'];
const COLUMN_COUNT = sortableColumns.length + 1;

function peoplePhrase(count: number): string {
  return count === 1 ? '1 person' : `${formatCount(count)} people`;
}

/** Up and down arrows; the one in use is filled. Repeats aria-sort for the eye. */
function SortGlyph({ direction }: { direction: Sort['direction'] | null }) {
  return (
    <svg viewBox="0 0 12 16" width="12" height="16" aria-hidden="true" focusable="false" className="shrink-0">
      <path
        d="M6 1.5L10.5 6.5H1.5z"
        fill={direction === 'ascending' ? 'currentColor' : 'none'}
        stroke="currentColor"
        strokeWidth="1.25"
        strokeLinejoin="round"
      />
      <path
        d="M6 14.5L1.5 9.5H10.5z"
        fill={direction === 'descending' ? 'currentColor' : 'none'}
        stroke="currentColor"
        strokeWidth="1.25"
        strokeLinejoin="round"
      />
    </svg>
  );
}

/** Messages from row actions, read out once; each row also shows its own. */
function useAnnouncer(): [{ polite: string; assertive: string }, Announce] {
  const [messages, setMessages] = useState({ polite: '', assertive: '' });
  const announce = useCallback<Announce>((text, urgency) => {
    // Clearing first makes a repeated message count as a change.
    setMessages({ polite: '', assertive: '' });
    window.setTimeout(() => setMessages((current) => ({ ...current, [urgency]: text })), 50);
  }, []);
  return [messages, announce];
}

/** Everyone with an account: find, filter, sort, and change roles and access row by row. */
export function PeopleTable({ selfId }: { selfId: number }) {
  const people = usePeople();
  const [filters, setFilters] = useState<Filters>(noFilters);
  const [sort, setSort] = useState<Sort>({ key: 'name', direction: 'ascending' });
  const [messages, announce] = useAnnouncer();
  const textRef = useRef<HTMLInputElement>(null);
  const summaryId = useId();

  const all = people.data?.people;
  const shown = useMemo<Person[]>(
    () => (all ? sortPeople(filterPeople(all, filters), sort) : []),
    [all, filters, sort],
  );

  function sortBy(key: SortKey) {
    setSort((current) =>
      current.key === key
        ? { key, direction: current.direction === 'ascending' ? 'descending' : 'ascending' }
        : { key, direction: 'ascending' },
    );
  }

  function clearFilters() {
    setFilters(noFilters);
    textRef.current?.focus();
  }

  if (people.isPending) {
    return (
      <p role="status" className="text-muted">
        Loading people…
      </p>
    );
  }

  if (all === undefined) {
    const problem = problemOf(people.error);
    return (
      <ProblemNotice
        announce
        headingLevel={3}
        title={problem.title}
        detail={problem.detail}
        reference={problemReference(problem)}
        action={
          <Button variant="primary" onClick={() => void people.refetch()}>
            {people.isFetching ? 'Retrying…' : 'Retry'}
          </Button>
        }
      />
    );
  }

  const summary = `Showing ${shown.length === all.length ? `all ${peoplePhrase(all.length)}` : `${formatCount(shown.length)} of ${peoplePhrase(all.length)}`}, sorted by ${columnLabels[sort.key].toLowerCase()}, ${directionWords(sort)}.`;

  return (
    <div className="space-y-4">
      <div role="search" aria-label="Filter people" className="grid grid-cols-1 gap-4 md:grid-cols-[2fr_1fr_1fr_auto] md:items-end">
        <TextField
          ref={textRef}
          label="Find by name or e-mail"
          type="search"
          autoComplete="off"
          spellCheck={false}
          value={filters.text}
          onChange={(event) => setFilters((current) => ({ ...current, text: event.target.value }))}
        />
        <SelectField
          label="Role"
          value={filters.role}
          onChange={(event) =>
            setFilters((current) => ({ ...current, role: event.target.value as Role | 'any' }))
          }
        >
          <option value="any">Any role</option>
          {ROLES.map((role) => (
            <option key={role} value={role}>
              {roleLabels[role]}
            </option>
          ))}
        </SelectField>
        <SelectField
          label="Status"
          value={filters.status}
          onChange={(event) =>
            setFilters((current) => ({ ...current, status: event.target.value as Filters['status'] }))
          }
        >
          <option value="any">Any status</option>
          <option value="active">Active</option>
          <option value="deactivated">Deactivated</option>
        </SelectField>
        <Button onClick={clearFilters} disabled={!isFiltered(filters)}>
          Clear filters
        </Button>
      </div>

      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <p id={summaryId} role="status" className="text-muted">
          {summary}
        </p>
        {people.isError ? (
          <p className="text-sm">
            <span className="font-bold">The latest refresh failed:</span> {problemOf(people.error).title}. The list
            may be out of date.
          </p>
        ) : null}
      </div>

      <p role="status" className="sr-only">
        {messages.polite}
      </p>
      <p role="alert" className="sr-only">
        {messages.assertive}
      </p>

      {/*
        Scrolls sideways on narrow screens. `relative` keeps the visually hidden texts inside it;
        the scroll padding stops a focused control from ending up under the sticky name column.
      */}
      <div
        role="region"
        aria-label="People table"
        tabIndex={0}
        className="relative scroll-pl-40 overflow-x-auto rounded-card border border-line bg-raised"
      >
        <table className="w-full min-w-[68rem] border-collapse text-left" aria-describedby={summaryId}>
          <caption className="sr-only">People with a Cartouche account</caption>
          <thead className="bg-sunk">
            <tr>
              {sortableColumns.map((key) => {
                const active = sort.key === key;
                return (
                  <th
                    key={key}
                    scope="col"
                    aria-sort={active ? sort.direction : undefined}
                    className={cx('px-1.5 py-1.5 align-bottom', key === 'name' && 'sticky left-0 z-10 bg-sunk')}
                  >
                    <button
                      type="button"
                      onClick={() => sortBy(key)}
                      className={cx(
                        'inline-flex min-h-11 w-full items-center gap-2 rounded-control border-2 px-1.5 py-1 text-left font-bold',
                        active ? 'border-line bg-raised' : 'border-transparent hover:border-line hover:bg-raised',
                      )}
                    >
                      <span>{columnLabels[key]}</span>
                      <SortGlyph direction={active ? sort.direction : null} />
                    </button>
                  </th>
                );
              })}
              <th scope="col" className="px-3 py-1.5 align-bottom font-bold">
                <span className="inline-flex min-h-11 items-center">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {shown.map((person) => (
              <PersonRow
                key={person.id}
                person={person}
                isSelf={person.id === selfId}
                columnCount={COLUMN_COUNT}
                announce={announce}
              />
            ))}
            {shown.length === 0 ? (
              <tr className="border-t border-rule">
                <td colSpan={COLUMN_COUNT} className="px-3 py-6">
                  <p className="font-bold">No one matches these filters.</p>
                  <p className="mt-1 text-muted">Change the filters above, or clear them to see everyone.</p>
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}
