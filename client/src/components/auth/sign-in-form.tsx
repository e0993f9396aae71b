import { useId, useRef, useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { isApiError, problemOf } from '../../api/http';
import { useSignIn } from '../../api/session';
import { formatTime } from '../../lib/format';
import { Button } from '../ui/button';
import { Checkbox } from '../ui/checkbox';
import { TextField } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';

interface FieldErrors {
  email?: string;
  password?: string;
}

function validate(email: string, password: string): FieldErrors {
  const errors: FieldErrors = {};
  if (email.trim() === '') errors.email = 'Enter the e-mail address you sign in with.';
  else if (!/^[^\s@]+@[^\s@]+$/.test(email.trim()))
    errors.email = 'Enter an e-mail address with an @, like name@kestrelmouth-harbour.example.';
  if (password === '') errors.password = 'Enter your password.';
  return errors;
}

/** When the server asked to wait, the clock time after which a new attempt is allowed. */
function retryAt(seconds: number | undefined): string | null {
  if (seconds === undefined || seconds <= 0) return null;
  return formatTime(new Date(Date.now() + seconds * 1000));
}

/** E-mail and password. On success the person lands on `returnTo`. */
export function SignInForm({ returnTo }: { returnTo: string }) {
  const signIn = useSignIn();
  const navigate = useNavigate();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [showPassword, setShowPassword] = useState(false);
  const [fieldErrors, setFieldErrors] = useState<FieldErrors>({});
  const [retryTime, setRetryTime] = useState<string | null>(null);
  const emailRef = useRef<HTMLInputElement>(null);
  const passwordRef = useRef<HTMLInputElement>(null);
  const problemId = useId();

  const problem = signIn.isError ? problemOf(signIn.error) : null;
  const hasFieldErrors = fieldErrors.email !== undefined || fieldErrors.password !== undefined;

  function onSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (signIn.isPending) return;
    const errors = validate(email, password);
    setFieldErrors(errors);
    if (errors.email || errors.password) {
      signIn.reset();
      (errors.email ? emailRef : passwordRef).current?.focus();
      return;
    }
    signIn.mutate(
      { email: email.trim(), password },
      {
        onSuccess: () => void navigate(returnTo, { replace: true }),
        onError: (error) => {
          setRetryTime(isApiError(error) ? retryAt(error.retryAfterSeconds) : null);
        },
      },
    );
  }

  return (
    <form noValidate onSubmit={onSubmit} aria-describedby={problem ? problemId : undefined} className="space-y-5">
      {problem ? (
        <ProblemNotice
          id={problemId}
          announce
          headingLevel={3}
          title={problem.title}
          detail={retryTime ? `${problem.detail} You can try again after ${retryTime}.` : problem.detail}
        />
      ) : hasFieldErrors ? (
        <p role="alert" className="sr-only">
          {[fieldErrors.email, fieldErrors.password].filter(Boolean).join(' ')}
        </p>
      ) : null}

      <TextField
        ref={emailRef}
        label="E-mail address"
        type="email"
        name="email"
        autoComplete="username"
        inputMode="email"
        spellCheck={false}
        autoCapitalize="none"
        required
        value={email}
        onChange={(event) => setEmail(event.target.value)}
        error={fieldErrors.email}
        aria-invalid={problem && problem.status === 401 ? true : undefined}
        describedByIds={problem ? problemId : undefined}
      />

      <div className="space-y-1">
        <TextField
          ref={passwordRef}
          label="Password"
          type={showPassword ? 'text' : 'password'}
          name="password"
          autoComplete="current-password"
          spellCheck={false}
          autoCapitalize="none"
          required
          value={password}
          onChange={(event) => setPassword(event.target.value)}
          error={fieldErrors.password}
          aria-invalid={problem && problem.status === 401 ? true : undefined}
          describedByIds={problem ? problemId : undefined}
        />
        <Checkbox
          label="Show password"
          checked={showPassword}
          onChange={(event) => setShowPassword(event.target.checked)}
        />
      </div>

      <Button type="submit" variant="primary" aria-disabled={signIn.isPending || undefined} className="w-full sm:w-auto">
        {signIn.isPending ? 'Signing in…' : 'Sign in'}
      </Button>
    </form>
  );
}
