import { useEffect, useRef } from 'react';
import { Link, NavLink, Outlet, ScrollRestoration, useLocation, useMatches } from 'react-router';
import { useSession, type SessionUser } from '../api/session';
import { SignOutButton } from '../components/auth/sign-out-button';
import { Notice } from '../components/ui/notice';
import { WordmarkGlyph } from '../components/ui/wordmark';
import { cx } from '../components/ui/cx';
import { roleLabels } from '../lib/roles';
import { visibleEntries, type NavEntry } from './navigation';

const container = 'mx-auto w-full max-w-6xl px-4 sm:px-6 lg:px-8';

const navItem =
  'flex min-h-11 items-center justify-between gap-1.5 rounded-control border-2 px-2.5 py-2 leading-tight sm:justify-start sm:gap-2 sm:px-3';

/** What a route can tell the layout through its `handle`. */
export interface RouteHandle {
  /** The screen's content sits in a narrow centred column (the sign-in screens). */
  centred?: boolean;
}

function isCentred(handle: unknown): boolean {
  return typeof handle === 'object' && handle !== null && (handle as RouteHandle).centred === true;
}

/** A one-off message carried to the next screen in the history state, e.g. "You have signed out." */
function flashNotice(state: unknown): string | null {
  if (typeof state !== 'object' || state === null || !('notice' in state)) return null;
  return typeof state.notice === 'string' ? state.notice : null;
}

function PrimaryNav({ entries }: { entries: NavEntry[] }) {
  return (
    <nav aria-label="Primary">
      <ul className="grid grid-cols-2 gap-1.5 sm:flex sm:flex-wrap sm:gap-1.5">
        {entries.map((entry) => (
          <li key={entry.path}>
            {entry.available ? (
              <NavLink
                to={entry.path}
                end
                className={({ isActive }) =>
                  cx(
                    navItem,
                    'font-bold no-underline',
                    isActive
                      ? 'border-ink bg-ink text-paper hover:text-paper'
                      : 'border-line bg-raised text-ink hover:border-ink hover:bg-sunk hover:text-ink',
                  )
                }
              >
                {entry.label}
              </NavLink>
            ) : (
              <span
                role="link"
                aria-disabled="true"
                className={cx(navItem, 'cursor-not-allowed border-dashed border-rule text-muted')}
              >
                <span>{entry.label}</span>
                <span className="sr-only">, </span>
                <span className="rounded border border-muted px-1 text-xs font-bold uppercase tracking-wide">
                  soon
                </span>
              </span>
            )}
          </li>
        ))}
      </ul>
    </nav>
  );
}

function SignedInPerson({ user }: { user: SessionUser }) {
  return (
    <div className="flex min-w-0 items-center gap-3">
      <p className="min-w-0 leading-tight sm:text-right">
        <span className="sr-only">Signed in as </span>
        <span className="block font-bold break-words">{user.displayName}</span>
        <span className="sr-only">, </span>
        <span className="block text-sm text-muted">{roleLabels[user.role]}</span>
      </p>
      <SignOutButton />
    </div>
  );
}

/** Page chrome shared by every screen: skip link, header with navigation, main region, footer. */
export function AppLayout() {
  const mainRef = useRef<HTMLElement>(null);
  const session = useSession();
  const entries = visibleEntries(session);
  const location = useLocation();
  const { pathname } = location;
  const notice = flashNotice(location.state);
  const centred = useMatches().some((match) => isCentred(match.handle));
  const shownPath = useRef(pathname);

  // After moving to another screen (not on first load), start reading and tabbing from the new content.
  useEffect(() => {
    if (shownPath.current === pathname) return;
    shownPath.current = pathname;
    mainRef.current?.focus({ preventScroll: true });
  }, [pathname]);

  return (
    <div className="flex min-h-dvh flex-col">
      <a
        href="#main"
        className={cx(
          'sr-only focus:not-sr-only focus:fixed focus:left-3 focus:top-3 focus:z-50',
          'focus:inline-flex focus:min-h-11 focus:items-center focus:rounded-control focus:border-2',
          'focus:border-ink focus:bg-raised focus:px-4 focus:font-bold focus:text-ink',
        )}
      >
        Skip to main content
      </a>

      <header className="border-b-4 border-double border-line bg-paper">
        <div className={cx(container, 'flex flex-col gap-3 py-3')}>
          <div className="flex flex-wrap items-center justify-between gap-x-6 gap-y-2">
            <Link
              to="/"
              className="inline-flex min-h-11 items-center gap-3 rounded-control text-ink no-underline hover:text-ink"
            >
              <WordmarkGlyph />
              <span className="text-2xl font-bold tracking-tight">Cartouche</span>
            </Link>
            {session.user ? <SignedInPerson user={session.user} /> : null}
          </div>
          {entries.length > 0 ? <PrimaryNav entries={entries} /> : null}
        </div>
      </header>

      <main id="main" ref={mainRef} tabIndex={-1} className={cx(container, 'flex-1 py-8 sm:py-10')}>
        <div role="status">
          {notice ? (
            <Notice className={cx('mb-8', centred ? 'mx-auto max-w-xl' : 'max-w-prose')}>
              <p>{notice}</p>
            </Notice>
          ) : null}
        </div>
        <Outlet />
      </main>

      <footer className="mt-8 border-t border-rule bg-sunk">
        <div className={cx(container, 'py-6 text-sm')}>
          <p className="max-w-prose">
            Suggested subjects and drafted alt text are not descriptions until a person approves them.
            Accessibility obligations differ by jurisdiction: see WCAG 2.2 and your local law; Cartouche claims no
            compliance on your behalf.
          </p>
          <p className="mt-2">
            <a href="https://www.w3.org/TR/WCAG22/" rel="noreferrer" className="inline-flex min-h-11 items-center">
              Read WCAG 2.2 on the W3C website
            </a>
          </p>
        </div>
      </footer>

      <ScrollRestoration />
    </div>
  );
}
