import { useQueryClient } from '@tanstack/react-query';
import { useNavigate } from 'react-router';
import { problemOf } from '../../api/http';
import { forgetSignedInData, useSignOut } from '../../api/session';
import { Button } from '../ui/button';

/**
 * Ends the session, leaves the signed-in screens, then drops everything cached for this person
 * (in that order, so no open screen asks for its data again on the way out).
 */
export function SignOutButton() {
  const signOut = useSignOut();
  const navigate = useNavigate();
  const queryClient = useQueryClient();

  function onClick() {
    if (signOut.isPending) return;
    signOut.mutate(undefined, {
      onSuccess: async () => {
        await navigate('/sign-in', { replace: true, state: { notice: 'You have signed out.' } });
        forgetSignedInData(queryClient);
      },
    });
  }

  return (
    <div className="flex flex-col items-end gap-1">
      <Button onClick={onClick} aria-disabled={signOut.isPending || undefined}>
        {signOut.isPending ? 'Signing out…' : 'Sign out'}
      </Button>
      {signOut.isError ? (
        <p role="alert" className="max-w-xs text-right text-sm font-bold">
          Not signed out: {problemOf(signOut.error).title}. Try again.
        </p>
      ) : null}
    </div>
  );
}
