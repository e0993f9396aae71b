import { useId, useRef, useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { problemOf } from '../../api/http';
import { PASSWORD_LENGTH, useSetPassword, type PasswordLink } from '../../api/session';
import { splitFieldErrors } from '../../lib/field-errors';
import { Button } from '../ui/button';
import { Checkbox } from '../ui/checkbox';
import { TextField } from '../ui/field';
import { FormErrors } from '../ui/form-errors';

interface FieldErrors {
  password?: string;
  repeat?: string;
}

function validate(password: string, repeat: string): FieldErrors {
  const errors: FieldErrors = {};
  const length = [...password].length;
  if (password === '') errors.password = 'Choose a password.';
  else if (length < PASSWORD_LENGTH.min)
    errors.password = `Use at least ${PASSWORD_LENGTH.min} characters; this one has ${length}.`;
  else if (length > PASSWORD_LENGTH.max)
    errors.password = `Use at most ${PASSWORD_LENGTH.max} characters; this one has ${length}.`;
  if (!errors.password && repeat !== password) errors.repeat = 'The two passwords are not the same. Type it again.';
  return errors;
}

/**
 * Chooses a password for the account a link stands for (an invitation or a reset).
 * The server signs the person in; they then land on the overview.
 */
export function SetPasswordForm({
  token,
  link,
  onLinkGone,
}: {
  token: string;
  link: PasswordLink;
  /** The server says the link is unknown, used or expired (404). */
  onLinkGone: () => void;
}) {
  const setPassword = useSetPassword();
  const navigate = useNavigate();
  const [password, setPasswordValue] = useState('');
  const [repeat, setRepeat] = useState('');
  const [show, setShow] = useState(false);
  const [fieldErrors, setFieldErrors] = useState<FieldErrors>({});
  const passwordRef = useRef<HTMLInputElement>(null);
  const repeatRef = useRef<HTMLInputElement>(null);
  const problemId = useId();

  const problem = setPassword.isError ? problemOf(setPassword.error) : null;
  const { byField, other } = splitFieldErrors(problem, { password: 'password' });
  const passwordError = fieldErrors.password ?? byField.password;
  const invitation = link.purpose === 'invitation';

  function onSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (setPassword.isPending) return;
    const errors = validate(password, repeat);
    setFieldErrors(errors);
    if (errors.password || errors.repeat) {
      setPassword.reset();
      (errors.password ? passwordRef : repeatRef).current?.focus();
      return;
    }
    setPassword.mutate(
      { token, password },
      {
        onSuccess: () =>
          void navigate('/', {
            replace: true,
            state: {
              notice: invitation
                ? 'Welcome to Cartouche. Your password is set and you are signed in.'
                : 'Your new password is set and you are signed in.',
            },
          }),
        onError: (error) => {
          if (problemOf(error).status === 404) onLinkGone();
          else if (splitFieldErrors(problemOf(error), { password: 'password' }).byField.password)
            passwordRef.current?.focus();
        },
      },
    );
  }

  const clientErrors = [fieldErrors.password, fieldErrors.repeat].filter(Boolean).join(' ');

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-5">
      <FormErrors id={problemId} problem={problem} items={other} alert={clientErrors} />

      {/* Lets password managers store the new password with the right account. */}
      <input type="text" name="username" autoComplete="username" value={link.email} readOnly hidden />

      <TextField
        ref={passwordRef}
        label={invitation ? 'Password' : 'New password'}
        hint={`At least ${PASSWORD_LENGTH.min} characters, at most ${PASSWORD_LENGTH.max}. A few unrelated words make a password that is long and easy to remember.`}
        type={show ? 'text' : 'password'}
        name="new-password"
        autoComplete="new-password"
        spellCheck={false}
        autoCapitalize="none"
        required
        value={password}
        onChange={(event) => setPasswordValue(event.target.value)}
        error={passwordError}
        describedByIds={problem ? problemId : undefined}
      />
      <TextField
        ref={repeatRef}
        label="Type the password again"
        type={show ? 'text' : 'password'}
        name="repeat-password"
        autoComplete="new-password"
        spellCheck={false}
        autoCapitalize="none"
        required
        value={repeat}
        onChange={(event) => setRepeat(event.target.value)}
        error={fieldErrors.repeat}
      />
      <Checkbox label="Show the passwords" checked={show} onChange={(event) => setShow(event.target.checked)} />

      <Button type="submit" variant="primary" aria-disabled={setPassword.isPending || undefined}>
        {setPassword.isPending ? 'Saving…' : invitation ? 'Set my password and sign in' : 'Save the new password'}
      </Button>
    </form>
  );
}
