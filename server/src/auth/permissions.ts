import type { Role } from '../models/user.ts';

/** Everything a person may be allowed to do. Routes name one of these (or are public / need only a sign-in). */
export const PERMISSIONS = [
  'collections:read',
  'collections:write',
  'subjects:write',
  'items:import',
  'review:write',
  'runs:start',
  'exports:read',
  /** when the weekly coverage-ledger mail goes to the managers */
  'exports:schedule',
  'people:manage',
  'mailbox:read',
] as const;
export type Permission = (typeof PERMISSIONS)[number];

/** The permission matrix: the one place that says which role may do what. The server enforces it on every route. */
export const ROLE_PERMISSIONS: Record<Role, readonly Permission[]> = {
  admin: PERMISSIONS,
  archivist: ['collections:read', 'collections:write', 'subjects:write', 'items:import', 'runs:start', 'review:write', 'exports:read'],
  editor: ['collections:read', 'review:write', 'exports:read'],
  manager: ['collections:read', 'exports:read', 'exports:schedule'],
};

export function can(role: Role, permission: Permission): boolean {
  return ROLE_PERMISSIONS[role].includes(permission);
}

/** Who may call a route: anyone, anyone signed in, or holders of one permission. */
export type Access = { kind: 'public' } | { kind: 'signed-in' } | { kind: 'permission'; permission: Permission };
export const PUBLIC: Access = { kind: 'public' };
export const SIGNED_IN: Access = { kind: 'signed-in' };
export const needs = (permission: Permission): Access => ({ kind: 'permission', permission });
