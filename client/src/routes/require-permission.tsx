import type { ReactNode } from 'react';
import { Link } from 'react-router';
import { hasPermission, useSession, type Permission } from '../api/session';
import { permissionPhrases, roleLabels } from '../lib/roles';

/** What someone sees on a screen their role does not include: why, and what to do. */
export function NoAccess({ screen, permission }: { screen: string; permission: Permission }) {
  const { user } = useSession();
  const role = user ? roleLabels[user.role] : null;
  return (
    <>
      <title>{`No access to ${screen} · Cartouche`}</title>
      <div className="max-w-prose space-y-4">
        <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">You don’t have access to this screen</h1>
        <p className="text-lg">
          {screen} is for people who can {permissionPhrases[permission]}.
          {role ? (
            <>
              {' '}
              You are signed in with the role <span className="font-bold">{role}</span>, which does not include
              that.
            </>
          ) : null}
        </p>
        <p>If your work needs it, ask an administrator to change your role.</p>
        <p>
          <Link to="/" className="inline-flex min-h-11 items-center font-bold">
            Go to the overview
          </Link>
        </p>
      </div>
    </>
  );
}

/** Renders the screen only for a role with the permission. The server enforces the same rule. */
export function RequirePermission({
  permission,
  screen,
  children,
}: {
  permission: Permission;
  /** The screen's name as the navigation shows it. */
  screen: string;
  children: ReactNode;
}) {
  const { user } = useSession();
  if (!hasPermission(user, permission)) return <NoAccess screen={screen} permission={permission} />;
  return children;
}
