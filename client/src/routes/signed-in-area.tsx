import { useEffect } from 'react';
import { Outlet, useRevalidator } from 'react-router';
import { useSession } from '../api/session';

/**
 * The screens that need someone signed in. The route loader (guards.ts) turns visitors away
 * before anything renders; this component covers the session ending while a screen is open
 * (signed out elsewhere, expired, deactivated): the loaders run again and send the person to sign in.
 */
export function SignedInArea() {
  const { user } = useSession();
  const { revalidate } = useRevalidator();
  const signedIn = user !== null;

  useEffect(() => {
    if (!signedIn) void revalidate();
  }, [signedIn, revalidate]);

  if (!signedIn) {
    return (
      <p role="status" className="text-lg">
        You are signed out.
      </p>
    );
  }
  return <Outlet />;
}
