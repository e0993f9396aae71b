/** The product's screens, in navigation order. Only entries marked available have a route yet. */
export interface NavEntry {
  label: string;
  path: string;
  available: boolean;
}

export const navEntries: readonly NavEntry[] = [
  { label: 'Overview', path: '/', available: true },
  { label: 'Review desk', path: '/review', available: false },
  { label: 'Subjects', path: '/subjects', available: false },
  { label: 'Intake', path: '/intake', available: false },
  { label: 'Ledger', path: '/ledger', available: false },
  { label: 'People', path: '/people', available: false },
];

/** The screen that will live at a path, if one is planned there but not built. */
export function plannedEntryAt(pathname: string): NavEntry | undefined {
  const normalised = pathname.replace(/\/+$/, '') || '/';
  return navEntries.find(
    (entry) => !entry.available && (normalised === entry.path || normalised.startsWith(`${entry.path}/`)),
  );
}
