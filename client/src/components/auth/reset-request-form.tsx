import { useId, useRef, useState, type FormEvent } from 'react';
import { Link } from 'react-router';
import { problemOf } from '../../api/http';
import { useRequestPasswordReset } from '../../api/session';
import { splitFieldErrors } from '../../lib/field-errors';
import { Button } from '../ui/button';
import { EmailAddress } from '../ui/email-address';
import { TextField } from '../ui/field';
import { Notice } from '../ui/notice';
import { FormErrors } from '../ui/form-errors';

/**
 * Asks for a password-reset link. The answer is the same whether or not an account exists,
 * so this form never tells anyone which addresses have one.
 */
export function ResetRequestForm() {
  const reset = useRequestPasswordReset();
  const [email, setEmail] = useState('');
  const [emailError, setEmailError] = useState<string | undefined>();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const emailRef = useRef<HTMLInputElement>(null);
  const problemId = useId();

  const problem = reset.isError ? problemOf(reset.error) : null;
  const { byField, other } = splitFieldErrors(problem, { email: 'email' });
  const shownEmailError = emailError ?? byField.email;

  function onSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (reset.isPending) return;
    const trimmed = email.trim();
    const error =
      trimmed === ''
        ? 'Enter the e-mail address of your Cartouche account.'
        : /^[^\s@]+@[^\s@]+$/.test(trimmed)
          ? undefined
          : 'Enter an e-mail address with an @, like name@kestrelmouth-harbour.example.';
    setEmailError(error);
    if (error) {
      reset.reset();
      emailRef.current?.focus();
      return;
    }
    reset.mutate({ email: trimmed }, { onSuccess: () => setSentTo(trimmed) });
  }

  return (
    <div className="space-y-5">
      <div role="status">
        {sentTo !== null ? (
          <Notice title="Check your e-mail">
            <p>
              If an account exists for that address, a message with a link is on its way. The link works once, for 2
              hours.
            </p>
            <p className="text-sm">
              You asked for <EmailAddress email={sentTo} className="font-bold" />. Nothing arrived after a few
              minutes? Check the address and your spam folder, then ask again.
            </p>
          </Notice>
        ) : null}
      </div>

      <form noValidate onSubmit={onSubmit} className="space-y-5">
        <FormErrors id={problemId} problem={problem} items={other} alert={emailError} />

        <TextField
          ref={emailRef}
          label="E-mail address"
          hint="The address you sign in to Cartouche with."
          type="email"
          name="email"
          autoComplete="username"
          inputMode="email"
          spellCheck={false}
          autoCapitalize="none"
          required
          value={email}
          onChange={(event) => setEmail(event.target.value)}
          error={shownEmailError}
          describedByIds={problem ? problemId : undefined}
        />

        <div className="flex flex-wrap items-center gap-x-6 gap-y-3">
          <Button type="submit" variant="primary" aria-disabled={reset.isPending || undefined}>
            {reset.isPending ? 'Sending…' : sentTo !== null ? 'Send the link again' : 'Send me a link'}
          </Button>
          <Link to="/sign-in" className="inline-flex min-h-11 items-center font-bold">
            Back to sign in
          </Link>
        </div>
      </form>
    </div>
  );
}
