import type { Permission, Role } from '../api/session';

/** Role names as people read them. */
export const roleLabels: Record<Role, string> = {
  admin: 'Administrator',
  archivist: 'Archivist',
  editor: 'Editor',
  manager: 'Manager',
};

/** What each role is for, in one line (shown where a role is chosen). */
export const roleSummaries: Record<Role, string> = {
  admin: 'Everything, including people, sign-in and the development mailbox.',
  archivist: 'Defines subjects, imports scans, starts runs, reviews items and exports.',
  editor: 'Reviews suggested subjects and writes alt text; can export.',
  manager: 'Reads collections and exports coverage.',
};

/** What a permission lets someone do, completing "This screen is for people who can …". */
export const permissionPhrases: Record<Permission, string> = {
  'collections:read': 'read collections',
  'collections:write': 'change collections',
  'subjects:write': 'define subjects',
  'items:import': 'import scans',
  'review:write': 'review items',
  'runs:start': 'start runs',
  'exports:read': 'export coverage',
  'people:manage': 'manage people',
  'mailbox:read': 'read the development mailbox',
};
