import { createBrowserRouter } from 'react-router';
import { AppLayout } from './app-layout';
import { NotFoundRoute } from './not-found';
import { OverviewRoute } from './overview';
import { RootErrorPage, RouteErrorPanel } from './route-error';

export function createRouter() {
  return createBrowserRouter([
    {
      path: '/',
      Component: AppLayout,
      errorElement: <RootErrorPage />,
      children: [
        {
          // Errors in a screen render inside the layout, so navigation stays usable.
          errorElement: <RouteErrorPanel />,
          children: [
            { index: true, Component: OverviewRoute },
            { path: '*', Component: NotFoundRoute },
          ],
        },
      ],
    },
  ]);
}
