import { hasPermission, type Permission, type Session } from '../api/session';

/** The product's screens, in navigation order. Only entries marked available have a route yet. */
export interface NavEntry {
  label: string;
  path: string;
  available: boolean;
  /** Shown only to a role with this permission. */
  permission?: Permission;
  /** Shown only when the server offers the development mailbox. */
  needsMailbox?: boolean;
}

export const navEntries: readonly NavEntry[] = [
  { label: 'Overview', path: '/', available: true },
  { label: 'Review desk', path: '/review', available: true, permission: 'review:write' },
  { label: 'Catalogue', path: '/catalogue', available: true, permission: 'collections:read' },
  { label: 'Subjects', path: '/subjects', available: true, permission: 'subjects:write' },
  { label: 'Intake', path: '/intake', available: true, permission: 'items:import' },
  { label: 'Night shift', path: '/night-shift', available: true, permission: 'collections:read' },
  { label: 'Ledger', path: '/ledger', available: true, permission: 'exports:read' },
  { label: 'People', path: '/people', available: true, permission: 'people:manage' },
  { label: 'Mailbox', path: '/mailbox', available: true, permission: 'mailbox:read', needsMailbox: true },
];

/** The entries this session can use; none before someone signs in. */
export function visibleEntries(session: Session): NavEntry[] {
  if (session.user === null) return [];
  return navEntries.filter(
    (entry) =>
      (entry.permission === undefined || hasPermission(session.user, entry.permission)) &&
      (!entry.needsMailbox || session.mailbox),
  );
}

/** The screen that will live at a path, if one is planned there but not built. */
export function plannedEntryAt(pathname: string): NavEntry | undefined {
  const normalised = pathname.replace(/\/+$/, '') || '/';
  return navEntries.find(
    (entry) => !entry.available && (normalised === entry.path || normalised.startsWith(`${entry.path}/`)),
  );
}
