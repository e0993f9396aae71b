/**
 * Demo people of the invented Saltmere Harbour Museum, one (or more) per Cartouche role, offered by
 * the local fake identity provider. Their SAML attributes are what an organisation's identity
 * provider would send: `email`, `displayName`, `firstName`, `lastName` and `cartoucheRole`.
 *
 * One person carries a role value Cartouche does not know (`cartouche-volunteer`), so the
 * service provider's default-role mapping can be exercised.
 */

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

export const demoIdentities: readonly DemoIdentity[] = Object.freeze([
  {
    key: 'admin',
    email: 'morwenna.tallack@saltmere-harbour.example',
    displayName: 'Morwenna Tallack',
    firstName: 'Morwenna',
    lastName: 'Tallack',
    role: ROLE_VALUES.admin,
    description: 'Systems registrar: looks after users, roles, sign-in and mail settings.',
  },
  {
    key: 'archivist',
    email: 'idris.penhallow@saltmere-harbour.example',
    displayName: 'Idris Penhallow',
    firstName: 'Idris',
    lastName: 'Penhallow',
    role: ROLE_VALUES.archivist,
    description: 'Archivist: defines the subjects of the harbour collections and imports new scans.',
  },
  {
    key: 'editor',
    email: 'ottilie.brennock@saltmere-harbour.example',
    displayName: 'Ottilie Brennock',
    firstName: 'Ottilie',
    lastName: 'Brennock',
    role: ROLE_VALUES.editor,
    description: 'Editor: works through the review desk and writes alt text.',
  },
  {
    key: 'editor-2',
    email: 'ruan.esterhuys@saltmere-harbour.example',
    displayName: 'Ruan Esterhuys',
    firstName: 'Ruan',
    lastName: 'Esterhuys',
    role: ROLE_VALUES.editor,
    description: 'Second editor, for trying two editors on the same item.',
  },
  {
    key: 'manager',
    email: 'halima.quarrie@saltmere-harbour.example',
    displayName: 'Halima Quarrie',
    firstName: 'Halima',
    lastName: 'Quarrie',
    role: ROLE_VALUES.manager,
    description: 'Collections manager: follows coverage and exports the coverage ledger.',
  },
  {
    key: 'volunteer',
    email: 'jory.annear@saltmere-harbour.example',
    displayName: 'Jory Annear',
    firstName: 'Jory',
    lastName: 'Annear',
    role: 'cartouche-volunteer',
    description: 'Volunteer with a role value Cartouche does not know: shows the default role.',
  },
] satisfies DemoIdentity[]);

export function findDemoIdentity(key: string): DemoIdentity | undefined {
  return demoIdentities.find((identity) => identity.key === key);
}
