import { Link, useLocation } from 'react-router';
import { plannedEntryAt } from './navigation';

/** Any address without a screen: says so plainly and leads home. */
export function NotFoundRoute() {
  const { pathname } = useLocation();
  const planned = plannedEntryAt(pathname);
  const heading = planned ? `${planned.label} is not available yet` : 'No page at this address';

  return (
    <>
      <title>{`${heading} · Cartouche`}</title>
      <div className="max-w-prose space-y-4">
        <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">{heading}</h1>
        {planned ? (
          <p className="text-lg">This part of Cartouche is still being built.</p>
        ) : (
          <p className="text-lg">
            Nothing in Cartouche lives at <code className="break-all rounded bg-sunk px-1.5 py-0.5">{pathname}</code>.
            The link may be mistyped or out of date.
          </p>
        )}
        <p>
          <Link to="/" className="inline-flex min-h-11 items-center font-bold">
            Go to the overview
          </Link>
        </p>
      </div>
    </>
  );
}
