import { useSession } from '../api/session';
import { InviteForm } from '../components/people/invite-form';
import { PeopleTable } from '../components/people/people-table';
import { Card } from '../components/ui/card';

/** Administrators: who can sign in, with which role, and inviting someone new. */
export function PeopleRoute() {
  const { user } = useSession();
  return (
    <>
      <title>People · Cartouche</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">People</h1>
          <p className="max-w-prose text-lg text-muted">
            Everyone who can sign in to Cartouche, the role that decides what they can do, and how they sign in.
          </p>
        </div>

        <Card as="section" aria-labelledby="invite-heading" className="space-y-4">
          <div className="space-y-1">
            <h2 id="invite-heading" className="text-2xl font-bold">
              Invite someone
            </h2>
            <p className="max-w-prose text-muted">
              Cartouche creates the account and e-mails a link to choose a password. People whose organisation signs
              them in can use that instead.
            </p>
          </div>
          <InviteForm labelledBy="invite-heading" />
        </Card>

        <section aria-labelledby="everyone-heading" className="space-y-4">
          <h2 id="everyone-heading" className="text-2xl font-bold">
            Everyone
          </h2>
          {user ? <PeopleTable selfId={user.id} /> : null}
        </section>
      </div>
    </>
  );
}
