/** Why single sign-on sent the person back, keyed by the `failure` code of `/sign-in?failure=…`. */
export interface SignInFailure {
  title: string;
  detail: string;
}

const failures: Record<string, SignInFailure> = {
  'saml-invalid': {
    title: 'Your organisation’s answer could not be checked',
    detail:
      'Cartouche could not verify the answer from your organisation’s identity provider, so you are not signed in. ' +
      'Try again; if it happens again, tell your administrator the time it happened.',
  },
  'saml-deactivated': {
    title: 'Your Cartouche account is deactivated',
    detail:
      'Your organisation recognised you, but your account in Cartouche has been deactivated. ' +
      'An administrator can reactivate it.',
  },
  'saml-no-role': {
    title: 'Your account has no role in Cartouche',
    detail:
      'Your organisation recognised you, but your account is not given a Cartouche role (administrator, archivist, ' +
      'editor or manager). Ask an administrator to give you one, then sign in again.',
  },
};

export function signInFailure(code: string | null): SignInFailure | null {
  if (code === null || code === '') return null;
  return (
    failures[code] ?? {
      title: 'Single sign-on did not finish',
      detail: 'You are not signed in. Try again; if it happens again, tell your administrator.',
    }
  );
}
