import { useEffect, useId, useRef, useState } from 'react';
import { problemOf } from '../../api/http';
import { isConflict, useResendInvitation, useUpdatePerson, type Person } from '../../api/people';
import { ROLES, type Role } from '../../api/session';
import { formatDateTime } from '../../lib/format';
import { roleLabels } from '../../lib/roles';
import { Button } from '../ui/button';
import { cx } from '../ui/cx';
import { EmailAddress } from '../ui/email-address';
import { controlClass, ErrorGlyph } from '../ui/field';
import { StatusBadge } from '../ui/status-badge';
import { signInMethodLabels, statusLabel } from './people-view';

export interface Announce {
  (text: string, urgency: 'polite' | 'assertive'): void;
}

interface RowNotice {
  tone: 'done' | 'problem';
  text: string;
}

function failureText(error: unknown): string {
  const problem = problemOf(error);
  const reason = problem.detail || problem.title;
  return isConflict(error)
    ? `Not saved: ${reason} The row now shows the latest details.`
    : `Not saved: ${problem.title}. ${problem.detail}`;
}

const cell = 'px-3 py-3 align-top';

/**
 * One person in the People table, with a role to change, an account to (re)activate and an invitation to resend.
 * The table scrolls sideways on narrow screens: the name column and the messages under a row stay in view.
 */
export function PersonRow({
  person,
  isSelf,
  columnCount,
  announce,
}: {
  person: Person;
  isSelf: boolean;
  columnCount: number;
  announce: Announce;
}) {
  const roleUpdate = useUpdatePerson();
  const activeUpdate = useUpdatePerson();
  const resend = useResendInvitation();
  // A choice made on an older copy of the person is dropped when the row is refreshed.
  const [draft, setDraft] = useState<{ version: number; role: Role } | null>(null);
  const draftRole = draft !== null && draft.version === person.version ? draft.role : person.role;
  const [confirming, setConfirming] = useState(false);
  const [notice, setNotice] = useState<RowNotice | null>(null);
  const toggleRef = useRef<HTMLButtonElement>(null);
  const selectRef = useRef<HTMLSelectElement>(null);
  const confirmRef = useRef<HTMLDivElement>(null);
  const confirmId = useId();
  const questionId = useId();
  const selfHintId = useId();
  const name = person.displayName;
  const lastSignIn = person.lastSignInAt === null ? null : formatDateTime(person.lastSignInAt);

  useEffect(() => {
    if (confirming) confirmRef.current?.focus();
  }, [confirming]);

  function report(next: RowNotice) {
    setNotice(next);
    announce(next.text, next.tone === 'problem' ? 'assertive' : 'polite');
  }

  function saveRole() {
    if (roleUpdate.isPending || draftRole === person.role) return;
    const role = draftRole;
    roleUpdate.mutate(
      { id: person.id, version: person.version, role },
      {
        // The save button turns inactive once nothing is left to save: keep focus on the role.
        onSuccess: (saved) => {
          setDraft(null);
          selectRef.current?.focus();
          report({ tone: 'done', text: `${saved.displayName}’s role is now ${roleLabels[saved.role]}.` });
        },
        onError: (error) => {
          if (isConflict(error)) {
            // The row is refreshed from the server; show its role, not the refused choice.
            setDraft(null);
            selectRef.current?.focus();
          }
          report({ tone: 'problem', text: failureText(error) });
        },
      },
    );
  }

  function closeConfirmation() {
    setConfirming(false);
    toggleRef.current?.focus();
  }

  function toggleActive() {
    if (activeUpdate.isPending) return;
    const active = !person.active;
    activeUpdate.mutate(
      { id: person.id, version: person.version, active },
      {
        onSuccess: (saved) => {
          closeConfirmation();
          report({
            tone: 'done',
            text: saved.active
              ? `${saved.displayName} is active again and can sign in.`
              : `${saved.displayName} is deactivated and can no longer sign in.`,
          });
        },
        onError: (error) => {
          closeConfirmation();
          report({ tone: 'problem', text: failureText(error) });
        },
      },
    );
  }

  function resendInvitation() {
    if (resend.isPending) return;
    resend.mutate(person.id, {
      onSuccess: () => report({ tone: 'done', text: `The invitation went to ${person.email} again.` }),
      onError: (error) => report({ tone: 'problem', text: failureText(error) }),
    });
  }

  const changed = draftRole !== person.role;

  return (
    <>
      <tr className="border-t border-rule">
        <th scope="row" className={cx(cell, 'sticky left-0 z-10 w-36 min-w-36 bg-raised text-left font-bold')}>
          <span className="break-words">{name}</span>
          {isSelf ? <span className="block text-sm font-normal text-muted">That’s you</span> : null}
        </th>
        <td className={cell}>
          <EmailAddress email={person.email} />
        </td>
        <td className={cell}>
          <div className="flex flex-wrap items-center gap-2">
            <label className="sr-only" htmlFor={`role-${person.id}`}>
              Role of {name}
            </label>
            <select
              ref={selectRef}
              id={`role-${person.id}`}
              value={draftRole}
              onChange={(event) => setDraft({ version: person.version, role: event.target.value as Role })}
              aria-describedby={isSelf && changed && draftRole !== 'admin' ? selfHintId : undefined}
              className={cx(controlClass, 'w-40')}
            >
              {ROLES.map((option) => (
                <option key={option} value={option}>
                  {roleLabels[option]}
                </option>
              ))}
            </select>
            <Button onClick={saveRole} disabled={!changed} aria-disabled={roleUpdate.isPending || undefined}>
              {roleUpdate.isPending ? 'Saving…' : 'Save role'}
              <span className="sr-only"> of {name}</span>
            </Button>
          </div>
          {isSelf && changed && draftRole !== 'admin' ? (
            <p id={selfHintId} className="mt-1 max-w-56 text-sm">
              Saving this takes the People screen away from you.
            </p>
          ) : null}
        </td>
        <td className={cell}>{signInMethodLabels[person.signInMethod]}</td>
        <td className={cell}>
          <StatusBadge tone={person.active ? 'good' : 'down'}>{statusLabel(person)}</StatusBadge>
        </td>
        <td className={cell}>{lastSignIn ?? <span className="text-muted">Never</span>}</td>
        <td className={cell}>
          <div className="flex flex-col items-start gap-2">
            {isSelf ? (
              <span className="text-sm text-muted">You cannot deactivate yourself.</span>
            ) : (
              <Button
                ref={toggleRef}
                onClick={() => setConfirming((open) => !open)}
                aria-expanded={confirming}
                aria-controls={confirming ? confirmId : undefined}
              >
                {person.active ? 'Deactivate' : 'Reactivate'}
                <span className="sr-only"> {name}</span>
              </Button>
            )}
            {person.signInMethod === 'invited' ? (
              <Button onClick={resendInvitation} aria-disabled={resend.isPending || undefined}>
                {resend.isPending ? 'Sending…' : 'Resend invitation'}
                <span className="sr-only"> to {name}</span>
              </Button>
            ) : null}
          </div>
        </td>
      </tr>

      {confirming ? (
        <tr>
          <td colSpan={columnCount} className="bg-sunk px-3 py-4">
            <div
              id={confirmId}
              ref={confirmRef}
              tabIndex={-1}
              role="group"
              aria-labelledby={questionId}
              className="sticky left-3 max-w-[min(65ch,calc(100vw_-_5rem))] space-y-3 rounded-control"
            >
              <p id={questionId} className="font-bold">
                {person.active ? `Deactivate ${name}?` : `Reactivate ${name}?`}
              </p>
              <p>
                {person.active
                  ? 'They can no longer sign in, neither with a password nor through your organisation, and any session they have open ends. Their work stays in Cartouche, and you can reactivate the account at any time.'
                  : `They can sign in again, with the role ${roleLabels[person.role]}.`}
              </p>
              <div className="flex flex-wrap gap-3">
                <Button variant="primary" onClick={toggleActive} aria-disabled={activeUpdate.isPending || undefined}>
                  {activeUpdate.isPending
                    ? person.active
                      ? 'Deactivating…'
                      : 'Reactivating…'
                    : person.active
                      ? `Deactivate ${name}`
                      : `Reactivate ${name}`}
                </Button>
                <Button onClick={closeConfirmation}>{person.active ? 'Keep active' : 'Keep deactivated'}</Button>
              </div>
            </div>
          </td>
        </tr>
      ) : null}

      {notice ? (
        <tr>
          <td colSpan={columnCount} className="px-3 pb-3">
            <div
              className={cx(
                'sticky left-3 flex max-w-[calc(100vw_-_5rem)] items-start gap-2 rounded-control border-2 px-3 py-2',
                notice.tone === 'problem' ? 'border-ink border-l-[6px] bg-raised' : 'border-line bg-accent-tint',
              )}
            >
              {notice.tone === 'problem' ? <ErrorGlyph /> : null}
              <p className="min-w-0 flex-1">
                <span className="font-bold">{notice.tone === 'problem' ? 'Problem: ' : 'Done: '}</span>
                {notice.text}
              </p>
              <Button className="shrink-0" onClick={() => setNotice(null)}>
                Dismiss<span className="sr-only"> the message about {name}</span>
              </Button>
            </div>
          </td>
        </tr>
      ) : null}
    </>
  );
}
