import { useId, useRef, useState, type FormEvent } from 'react';
import { problemOf } from '../../api/http';
import { useInvitePerson } from '../../api/people';
import { ROLES, type Role } from '../../api/session';
import { splitFieldErrors } from '../../lib/field-errors';
import { roleLabels, roleSummaries } from '../../lib/roles';
import { Button } from '../ui/button';
import { EmailAddress } from '../ui/email-address';
import { SelectField, TextField } from '../ui/field';
import { Notice } from '../ui/notice';
import { FormErrors } from '../ui/form-errors';

type Field = 'email' | 'displayName' | 'role';
type FieldErrors = Partial<Record<Field, string>>;

const serverFields: Record<string, Field> = { email: 'email', displayName: 'displayName', role: 'role' };

function validate(email: string, displayName: string): FieldErrors {
  const errors: FieldErrors = {};
  const trimmed = email.trim();
  if (trimmed === '') errors.email = 'Enter the e-mail address the invitation goes to.';
  else if (!/^[^\s@]+@[^\s@]+$/.test(trimmed))
    errors.email = 'Enter an e-mail address with an @, like name@saltmere-harbour.example.';
  if (displayName.trim() === '') errors.displayName = 'Enter the name people know them by.';
  return errors;
}

/** Invites someone: Cartouche creates the account and e-mails them a link to choose a password. */
export function InviteForm({ labelledBy }: { labelledBy?: string }) {
  const invite = useInvitePerson();
  const [email, setEmail] = useState('');
  const [displayName, setDisplayName] = useState('');
  const [role, setRole] = useState<Role>('editor');
  const [fieldErrors, setFieldErrors] = useState<FieldErrors>({});
  const [sent, setSent] = useState<{ displayName: string; email: string } | null>(null);
  const emailRef = useRef<HTMLInputElement>(null);
  const nameRef = useRef<HTMLInputElement>(null);
  const problemId = useId();

  const problem = invite.isError ? problemOf(invite.error) : null;
  const { byField, other } = splitFieldErrors(problem, serverFields);
  // A 409 is about the address: it already belongs to an account.
  const emailError =
    fieldErrors.email ?? byField.email ?? (problem?.status === 409 ? problem.detail || problem.title : undefined);

  function onSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (invite.isPending) return;
    const errors = validate(email, displayName);
    setFieldErrors(errors);
    setSent(null);
    if (errors.email || errors.displayName) {
      invite.reset();
      (errors.email ? emailRef : nameRef).current?.focus();
      return;
    }
    const invitation = { email: email.trim(), displayName: displayName.trim(), role };
    invite.mutate(invitation, {
      onSuccess: (person) => {
        setSent({ displayName: person.displayName, email: person.email });
        setEmail('');
        setDisplayName('');
        setRole('editor');
      },
      onError: (error) => {
        const failed = problemOf(error);
        if (failed.status === 409 || splitFieldErrors(failed, serverFields).byField.email) emailRef.current?.focus();
      },
    });
  }

  const clientErrors = [fieldErrors.email, fieldErrors.displayName].filter(Boolean).join(' ');

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-5" aria-labelledby={labelledBy}>
      <div role="status">
        {sent ? (
          <Notice title="Invitation sent">
            <p>
              <span className="font-bold">{sent.displayName}</span> gets a message at{' '}
              <EmailAddress email={sent.email} /> with a link to choose a password. They appear in the
              list below as invited until they sign in.
            </p>
          </Notice>
        ) : null}
      </div>

      {/* a 409 (the address is taken) is shown at the e-mail field itself, so only announced here */}
      <FormErrors
        id={problemId}
        problem={problem && problem.status !== 409 ? problem : null}
        headingLevel={3}
        items={other}
        alert={problem ? emailError : clientErrors}
      />

      <div className="grid grid-cols-1 gap-5 md:grid-cols-3">
        <TextField
          ref={emailRef}
          label="E-mail address"
          type="email"
          name="email"
          autoComplete="off"
          inputMode="email"
          spellCheck={false}
          autoCapitalize="none"
          required
          value={email}
          onChange={(event) => setEmail(event.target.value)}
          error={emailError}
        />
        <TextField
          ref={nameRef}
          label="Name"
          name="displayName"
          autoComplete="off"
          required
          value={displayName}
          onChange={(event) => setDisplayName(event.target.value)}
          error={fieldErrors.displayName ?? byField.displayName}
        />
        <SelectField
          label="Role"
          name="role"
          value={role}
          onChange={(event) => setRole(event.target.value as Role)}
          hint={roleSummaries[role]}
          error={byField.role}
        >
          {ROLES.map((option) => (
            <option key={option} value={option}>
              {roleLabels[option]}
            </option>
          ))}
        </SelectField>
      </div>

      <Button type="submit" variant="primary" aria-disabled={invite.isPending || undefined}>
        {invite.isPending ? 'Sending the invitation…' : 'Send the invitation'}
      </Button>
    </form>
  );
}
