/**
 * Demo people of the invented demo institution, one (or more) per Cartouche role, offered by
 * the local fake identity provider. Their SAML attributes are what an organisation's identity
 * provider would send: `email`, `displayName`, `firstName`, `lastName` and `cartoucheRole`.
 *
 * One person carries a role value Cartouche does not know (`cartouche-volunteer`), so the
 * service provider's default-role mapping can be exercised.
 */

import { DEMO_INSTITUTION, demoPeople, type DemoPerson } from '../scripts/demo/scenario.ts';

/** The SAML attribute that carries a person's Cartouche role. */
export const ROLE_ATTRIBUTE = 'cartoucheRole';

/** The role values the organisation's identity provider sends for Cartouche's roles. */
export const ROLE_VALUES = {
  admin: 'cartouche-admin',
  archivist: 'cartouche-archivist',
  editor: 'cartouche-editor',
  manager: 'cartouche-manager',
} as const;

export interface DemoIdentity {
  /** short, URL-safe key used by the sign-in page (`identity=<key>`) */
  key: string;
  email: string;
  displayName: string;
  firstName: string;
  lastName: string;
  /** value of the `cartoucheRole` attribute */
  role: string;
  /** what this person does at the museum, shown on the sign-in page */
  description: string;
}

const DESCRIPTIONS: Record<DemoPerson['role'], string> = {
  admin: 'Administrator: looks after people, roles, sign-in and mail settings.',
  archivist: 'Archivist: defines the subjects of the harbour collections and imports new scans.',
  editor: 'Editor: works through the review desk and writes alt text.',
  manager: 'Collections manager: follows coverage and exports the coverage ledger.',
};

/**
 * The demo staff of the scenario (the same people who have local demo accounts), keyed `admin`,
 * `admin-2`, `editor`, `editor-2`, …, plus one volunteer whose role value maps to no Cartouche role.
 */
export const demoIdentities: readonly DemoIdentity[] = Object.freeze([
  ...demoPeople().map((person, _i, all): DemoIdentity => {
    const sameRole = all.filter((p) => p.role === person.role);
    const n = sameRole.indexOf(person);
    const [firstName = person.displayName, ...rest] = person.displayName.split(' ');
    return {
      key: n === 0 ? person.role : `${person.role}-${n + 1}`,
      email: person.email,
      displayName: person.displayName,
      firstName,
      lastName: rest.join(' '),
      role: ROLE_VALUES[person.role],
      description: n === 0 ? DESCRIPTIONS[person.role] : `${DESCRIPTIONS[person.role]} (another ${person.role}, for trying two people on one task)`,
    };
  }),
  {
    key: 'volunteer',
    email: `wren.tolliver@${DEMO_INSTITUTION.domain}`,
    displayName: 'Wren Tolliver',
    firstName: 'Wren',
    lastName: 'Tolliver',
    role: 'cartouche-volunteer',
    description: 'Volunteer: the identity provider sends a role value Cartouche does not map, so the default role applies.',
  },
]);

export function findDemoIdentity(key: string): DemoIdentity | undefined {
  return demoIdentities.find((identity) => identity.key === key);
}
