import type { QueryClient } from '@tanstack/react-query';
import { redirect, type LoaderFunctionArgs } from 'react-router';
import { sessionQueryOptions, type Session } from '../api/session';
import { safeReturnTo, signInPath } from '../lib/return-to';

/**
 * Route loaders that decide, before a screen renders, whether the person may see it.
 * They read the session from the query cache (fetching it when absent, refreshing it in the
 * background when stale), so moving between screens costs no extra request.
 */

export function loadSession(queryClient: QueryClient): Promise<Session> {
  return queryClient.ensureQueryData({ ...sessionQueryOptions(), revalidateIfStale: true });
}

/** Every screen but the sign-in ones: nobody signed in goes to `/sign-in?returnTo=<where they were>`. */
export function requireSignIn(queryClient: QueryClient) {
  return async ({ request }: LoaderFunctionArgs) => {
    const session = await loadSession(queryClient);
    if (session.user === null) {
      const url = new URL(request.url);
      throw redirect(signInPath(`${url.pathname}${url.search}`));
    }
    return null;
  };
}

/** `/sign-in` for someone already signed in: straight on to where they were going, or the overview. */
export function redirectSignedIn(queryClient: QueryClient) {
  return async ({ request }: LoaderFunctionArgs) => {
    const session = await loadSession(queryClient);
    if (session.user !== null) {
      const back = safeReturnTo(new URL(request.url).searchParams.get('returnTo'));
      throw redirect(back !== null && !back.startsWith('/sign-in') ? back : '/');
    }
    return null;
  };
}
