import type { QueryClient } from '@tanstack/react-query';
import { createBrowserRouter } from 'react-router';
import { AppLayout, type RouteHandle } from './app-layout';
import { loadSession, redirectSignedIn, requireSignIn } from './guards';
import { IntakeRoute } from './intake';
import { LedgerRoute } from './ledger';
import { CatalogueRoute } from './catalogue';
import { ItemRecordRoute } from './item-record';
import { MailboxRoute } from './mailbox';
import { NightShiftRoute } from './night-shift';
import { NotFoundRoute } from './not-found';
import { OverviewRoute } from './overview';
import { PeopleRoute } from './people';
import { RequirePermission } from './require-permission';
import { ResetPasswordRoute } from './reset-password';
import { ReviewRoute } from './review';
import { RootErrorPage, RouteErrorPanel } from './route-error';
import { SetPasswordRoute } from './set-password';
import { SignInRoute } from './sign-in';
import { SignedInArea } from './signed-in-area';
import { SubjectsRoute } from './subjects';
import { SubjectRoute } from './subjects-subject';
import { CollectionsRoute } from './collections';
import { CollectionSettingsRoute } from './collections-settings';
import { StartingUp } from './starting-up';

const centred: RouteHandle = { centred: true };

export function createRouter(queryClient: QueryClient) {
  return createBrowserRouter([
    {
      path: '/',
      Component: AppLayout,
      HydrateFallback: StartingUp,
      errorElement: <RootErrorPage />,
      // Nothing renders before the session is known: the header, the guards and the screens all read it.
      loader: async () => {
        await loadSession(queryClient);
        return null;
      },
      children: [
        {
          // Errors in a screen render inside the layout, so navigation stays usable.
          errorElement: <RouteErrorPanel />,
          children: [
            // Open to everyone: signing in and choosing a password. Their content is centred.
            { path: 'sign-in', loader: redirectSignedIn(queryClient), Component: SignInRoute, handle: centred },
            { path: 'reset-password', Component: ResetPasswordRoute, handle: centred },
            { path: 'welcome', element: <SetPasswordRoute expected="invitation" />, handle: centred },
            { path: 'set-password', element: <SetPasswordRoute expected="password_reset" />, handle: centred },
            {
              // Everything else needs someone signed in.
              loader: requireSignIn(queryClient),
              Component: SignedInArea,
              children: [
                { index: true, Component: OverviewRoute },
                {
                  path: 'people',
                  element: (
                    <RequirePermission permission="people:manage" screen="People">
                      <PeopleRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'intake',
                  element: (
                    <RequirePermission permission="items:import" screen="Intake">
                      <IntakeRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'subjects',
                  element: (
                    <RequirePermission permission="collections:read" screen="Subjects">
                      <SubjectsRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'subjects/:subjectId',
                  element: (
                    <RequirePermission permission="collections:read" screen="Subjects">
                      <SubjectRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'collections',
                  element: (
                    <RequirePermission permission="collections:read" screen="Collections">
                      <CollectionsRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'collections/:collectionId',
                  element: (
                    <RequirePermission permission="collections:read" screen="Collections">
                      <CollectionSettingsRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'night-shift',
                  element: (
                    <RequirePermission permission="collections:read" screen="Night shift">
                      <NightShiftRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'review',
                  element: (
                    <RequirePermission permission="review:write" screen="Review desk">
                      <ReviewRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'catalogue',
                  element: (
                    <RequirePermission permission="collections:read" screen="Catalogue">
                      <CatalogueRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'catalogue/items/:id',
                  element: (
                    <RequirePermission permission="collections:read" screen="Catalogue">
                      <ItemRecordRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'ledger',
                  element: (
                    <RequirePermission permission="exports:read" screen="Ledger">
                      <LedgerRoute />
                    </RequirePermission>
                  ),
                },
                {
                  path: 'mailbox',
                  element: (
                    <RequirePermission permission="mailbox:read" screen="Mailbox">
                      <MailboxRoute />
                    </RequirePermission>
                  ),
                },
                { path: '*', Component: NotFoundRoute },
              ],
            },
          ],
        },
      ],
    },
  ]);
}
