import { Link, useSearchParams } from 'react-router';
import { useSession } from '../api/session';
import { AuthPanel } from '../components/auth/auth-panel';
import { signInFailure } from '../components/auth/sign-in-failures';
import { SignInForm } from '../components/auth/sign-in-form';
import { ProblemNotice } from '../components/ui/problem-notice';
import { safeReturnTo } from '../lib/return-to';

const buttonLink =
  'inline-flex min-h-11 w-full items-center justify-center rounded-control border-2 border-accent bg-accent px-4 py-2 ' +
  'font-bold leading-tight text-on-accent no-underline hover:border-accent-strong hover:bg-accent-strong hover:text-on-accent sm:w-auto';

/** The organisation's single sign-on starts with a full page load, never a fetch. */
function samlHref(loginUrl: string, returnTo: string): string {
  const url = new URL(loginUrl, window.location.origin);
  if (returnTo !== '/') url.searchParams.set('returnTo', returnTo);
  return url.origin === window.location.origin ? `${url.pathname}${url.search}` : url.href;
}

/** Sign in with the organisation's single sign-on, with a Cartouche password, or both. */
export function SignInRoute() {
  const { signIn } = useSession();
  const [params] = useSearchParams();
  const returnTo = safeReturnTo(params.get('returnTo')) ?? '/';
  const failure = signInFailure(params.get('failure'));
  const both = signIn.saml && signIn.local;

  return (
    <AuthPanel
      title="Sign in to Cartouche"
      intro={returnTo !== '/' ? <p>Sign in to go on to the screen you asked for.</p> : undefined}
    >
      {failure ? <ProblemNotice announce headingLevel={2} title={failure.title} detail={failure.detail} /> : null}

      {signIn.saml ? (
        <section aria-labelledby="sign-in-organisation" className="space-y-3">
          <h2 id="sign-in-organisation" className="text-xl font-bold">
            {both ? 'With your organisation' : 'Your organisation signs you in'}
          </h2>
          <p className="text-muted">Use the account you already have at work; no Cartouche password needed.</p>
          <a href={samlHref(signIn.samlLoginUrl, returnTo)} className={buttonLink}>
            Sign in with your organisation
          </a>
        </section>
      ) : null}

      {signIn.local ? (
        <section
          aria-labelledby="sign-in-password"
          className={both ? 'space-y-4 border-t border-rule pt-6' : 'space-y-4'}
        >
          <h2 id="sign-in-password" className="text-xl font-bold">
            {both ? 'Or with a Cartouche password' : 'With your e-mail address and password'}
          </h2>
          <SignInForm returnTo={returnTo} />
          <p>
            <Link to="/reset-password" className="inline-flex min-h-11 items-center font-bold">
              Forgotten your password?
            </Link>
          </p>
        </section>
      ) : null}

      {!signIn.saml && !signIn.local ? (
        <ProblemNotice
          headingLevel={2}
          title="No way to sign in is switched on"
          detail="This Cartouche server accepts neither passwords nor single sign-on at the moment. Ask the person who runs it."
        />
      ) : null}
    </AuthPanel>
  );
}
