import { useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { problemOf, problemReference } from '../api/http';
import { usePasswordLink, type PasswordLinkPurpose } from '../api/session';
import { AuthPanel } from '../components/auth/auth-panel';
import { SetPasswordForm } from '../components/auth/set-password-form';
import { Button } from '../components/ui/button';
import { EmailAddress } from '../components/ui/email-address';
import { ProblemNotice } from '../components/ui/problem-notice';
import { formatDateTime } from '../lib/format';

const titles: Record<PasswordLinkPurpose, string> = {
  invitation: 'Welcome to Cartouche',
  password_reset: 'Choose a new password',
};

/** What to do when a link cannot be used any more. */
function LinkGone({ purpose }: { purpose: PasswordLinkPurpose }) {
  return (
    <ProblemNotice
      announce
      headingLevel={2}
      title="This link no longer works"
      detail={
        purpose === 'invitation'
          ? 'An invitation link works once and only for a limited time; this one has been used, has expired or was never issued. Ask an administrator to send the invitation again.'
          : 'A password link works once, for 2 hours; this one has been used, has expired or was never issued. Ask for a new one below.'
      }
      action={
        purpose === 'invitation' ? (
          <Link to="/sign-in" className="inline-flex min-h-11 items-center font-bold">
            Go to sign in
          </Link>
        ) : (
          <Link to="/reset-password" className="inline-flex min-h-11 items-center font-bold">
            Ask for a new link
          </Link>
        )
      }
    />
  );
}

/**
 * `/welcome?token=…` (an invitation) and `/set-password?token=…` (a reset): one screen for both.
 * The link itself decides which it is; the address only sets the wording before it is read.
 */
export function SetPasswordRoute({ expected }: { expected: PasswordLinkPurpose }) {
  const [params] = useSearchParams();
  const token = params.get('token')?.trim() ?? '';
  const link = usePasswordLink(token);
  const [gone, setGone] = useState(false);
  const purpose = link.data?.purpose ?? expected;
  const title = titles[purpose];

  if (token === '') {
    return (
      <AuthPanel title={title}>
        <ProblemNotice
          headingLevel={2}
          title="This address is missing its link"
          detail="Open the link from your e-mail message in full; it ends with a long code. If you copied it, check that nothing was cut off."
        />
      </AuthPanel>
    );
  }

  if (link.isPending) {
    return (
      <AuthPanel title={title}>
        <p role="status" className="text-muted">
          Checking your link…
        </p>
      </AuthPanel>
    );
  }

  if (gone || (link.isError && problemOf(link.error).status === 404)) {
    return (
      <AuthPanel title={title}>
        <LinkGone purpose={purpose} />
      </AuthPanel>
    );
  }

  if (link.data === undefined) {
    const problem = problemOf(link.error);
    return (
      <AuthPanel title={title}>
        <ProblemNotice
          announce
          headingLevel={2}
          title={problem.title}
          detail={problem.detail}
          reference={problemReference(problem)}
          action={
            <Button variant="primary" onClick={() => void link.refetch()}>
              {link.isFetching ? 'Checking…' : 'Try again'}
            </Button>
          }
        />
      </AuthPanel>
    );
  }

  const data = link.data;
  const until = formatDateTime(data.expiresAt);
  return (
    <AuthPanel
      title={title}
      intro={
        <p>
          {data.purpose === 'invitation'
            ? 'Choose a password to finish setting up your account. You are signed in straight after.'
            : 'Choose the password you will sign in with from now on. You are signed in straight after.'}
        </p>
      }
    >
      <dl className="grid grid-cols-1 gap-x-4 gap-y-2 sm:grid-cols-[max-content_1fr]">
        <dt className="text-muted">{data.purpose === 'invitation' ? 'Account for' : 'Account of'}</dt>
        <dd className="font-bold">{data.displayName}</dd>
        <dt className="text-muted">E-mail address</dt>
        <dd className="font-bold">
          <EmailAddress email={data.email} />
        </dd>
        {until ? (
          <>
            <dt className="text-muted">Link works until</dt>
            <dd>{until}</dd>
          </>
        ) : null}
      </dl>
      <SetPasswordForm token={token} link={data} onLinkGone={() => setGone(true)} />
    </AuthPanel>
  );
}
