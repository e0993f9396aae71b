import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { embedderSelectionFromEnv, type EmbedderSelection } from './ml/backbone/selection.ts';

export const projectRoot = resolve(fileURLToPath(new URL('../..', import.meta.url)));

export interface DbConfig {
  host: string;
  port: number;
  user: string;
  password: string;
  name: string;
}

export type RoleName = 'admin' | 'archivist' | 'editor' | 'manager';
const ROLE_NAMES: readonly RoleName[] = ['admin', 'archivist', 'editor', 'manager'];

export interface SamlConfig {
  enabled: boolean;
  /** the identity provider's single sign-on URL (HTTP-Redirect binding) */
  entryPoint: string;
  /** the identity provider's entity id, expected as the assertion's Issuer */
  idpIssuer: string | null;
  /** our entity id: the Audience every assertion must name */
  spEntityId: string;
  /** our assertion consumer service: the Recipient every assertion must name */
  acsUrl: string;
  idpCertFile: string;
  spKeyFile: string;
  spCertFile: string;
  /** development: generate the fake IdP's and our certificates under certDir when missing */
  generateDevCertificates: boolean;
  certDir: string;
  roleAttribute: string;
  roleMap: Record<string, RoleName>;
  /** role given to a new person whose assertion maps to no role; null refuses them */
  defaultRole: RoleName | null;
  emailAttribute: string;
  nameAttribute: string;
  clockSkewMs: number;
}

export interface AppConfig {
  env: 'development' | 'test' | 'production';
  version: string;
  dataDir: string;
  storageDir: string;
  clientDir: string;
  apiPort: number;
  publicUrl: string;
  db: DbConfig;
  /** a worker whose last heartbeat is older than this is reported as stale */
  workerStaleAfterMs: number;
  sessionSecret: string;
  sessionMaxAgeMs: number;
  saml: SamlConfig;
  smtp: { host: string; port: number; from: string };
  mailDir: string;
  /** the development mailbox page (captured mail of the local fake SMTP server); never in production */
  mailboxEnabled: boolean;
  login: { maxAttempts: number; windowMs: number };
  /** which embedder the API and the worker use (CARTOUCHE_EMBEDDER, CARTOUCHE_EMBEDDER_CONFIG, CARTOUCHE_MODEL_CACHE_DIR) */
  embedder: EmbedderSelection;
}

/** `a=admin,b=editor` → { a: 'admin', b: 'editor' }, refusing unknown roles. */
export function parseRoleMap(text: string): Record<string, RoleName> {
  const map: Record<string, RoleName> = {};
  for (const pair of text.split(',').map((p) => p.trim()).filter(Boolean)) {
    const i = pair.lastIndexOf('=');
    const value = pair.slice(0, i).trim();
    const role = pair.slice(i + 1).trim() as RoleName;
    if (i <= 0 || !ROLE_NAMES.includes(role)) throw new Error(`CARTOUCHE_SAML_ROLE_MAP: "${pair}" is not value=role with role one of ${ROLE_NAMES.join(', ')}`);
    map[value] = role;
  }
  return map;
}

function parseDefaultRole(text: string | undefined): RoleName | null {
  if (text === undefined || text === '') return 'editor';
  if (text === 'none') return null;
  if (!ROLE_NAMES.includes(text as RoleName)) throw new Error(`CARTOUCHE_SAML_DEFAULT_ROLE must be one of ${ROLE_NAMES.join(', ')} or none, got "${text}"`);
  return text as RoleName;
}

/** The session secret: from the environment, else generated once into the data folder. */
function sessionSecret(env: NodeJS.ProcessEnv, dataDir: string): string {
  if (env.CARTOUCHE_SESSION_SECRET) return env.CARTOUCHE_SESSION_SECRET;
  const file = join(dataDir, 'session-secret');
  if (!existsSync(file)) {
    mkdirSync(dataDir, { recursive: true });
    try {
      writeFileSync(file, randomBytes(32).toString('base64url') + '\n', { mode: 0o600, flag: 'wx' });
    } catch (err) {
      // another process of ours wrote it first: use theirs
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
    }
  }
  return readFileSync(file, 'utf8').trim();
}

function num(value: string | undefined, fallback: number, name: string): number {
  if (value === undefined || value === '') return fallback;
  const n = Number(value);
  if (!Number.isInteger(n) || n <= 0) throw new Error(`${name} must be a positive integer, got "${value}"`);
  return n;
}

/**
 * Reads the configuration from the environment. The bootstrap script writes the database
 * credentials of the project's private MariaDB to `.data/db.json`; they are used when the
 * environment does not name them (e.g. when a developer runs `npx vitest` by hand).
 */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): AppConfig {
  const dataDir = resolve(env.CARTOUCHE_DATA_DIR ?? join(projectRoot, '.data'));
  const secretsFile = join(dataDir, 'db.json');
  const secrets: Partial<DbConfig> = existsSync(secretsFile)
    ? (JSON.parse(readFileSync(secretsFile, 'utf8')) as Partial<DbConfig>)
    : {};
  const nodeEnv = env.NODE_ENV === 'production' || env.NODE_ENV === 'test' ? env.NODE_ENV : 'development';
  const apiPort = num(env.CARTOUCHE_API_PORT, 4310, 'CARTOUCHE_API_PORT');
  const publicUrl = (env.CARTOUCHE_PUBLIC_URL ?? `http://127.0.0.1:${apiPort}`).replace(/\/$/, '');
  const certDir = resolve(env.CARTOUCHE_CERT_DIR ?? join(dataDir, 'certs'));
  const idpPort = num(env.CARTOUCHE_IDP_PORT, 4312, 'CARTOUCHE_IDP_PORT');
  const pkg = JSON.parse(readFileSync(join(projectRoot, 'package.json'), 'utf8')) as { version: string };
  return {
    env: nodeEnv,
    version: pkg.version,
    dataDir,
    storageDir: resolve(env.CARTOUCHE_STORAGE_DIR ?? join(dataDir, 'storage')),
    clientDir: resolve(env.CARTOUCHE_CLIENT_DIR ?? join(projectRoot, 'dist', 'client')),
    apiPort,
    publicUrl,
    db: {
      host: env.CARTOUCHE_DB_HOST ?? secrets.host ?? '127.0.0.1',
      port: num(env.CARTOUCHE_DB_PORT, secrets.port ?? 4311, 'CARTOUCHE_DB_PORT'),
      user: env.CARTOUCHE_DB_USER ?? secrets.user ?? 'cartouche',
      password: env.CARTOUCHE_DB_PASSWORD ?? secrets.password ?? '',
      name: env.CARTOUCHE_DB_NAME ?? (nodeEnv === 'test' ? 'cartouche_test' : 'cartouche'),
    },
    workerStaleAfterMs: num(env.CARTOUCHE_WORKER_STALE_MS, 90_000, 'CARTOUCHE_WORKER_STALE_MS'),
    sessionSecret: sessionSecret(env, dataDir),
    sessionMaxAgeMs: num(env.CARTOUCHE_SESSION_HOURS, 12, 'CARTOUCHE_SESSION_HOURS') * 3_600_000,
    saml: {
      enabled: env.CARTOUCHE_SAML_ENABLED !== 'false',
      entryPoint: env.CARTOUCHE_SAML_ENTRY_POINT ?? `http://127.0.0.1:${idpPort}/saml/sso`,
      idpIssuer: env.CARTOUCHE_SAML_IDP_ISSUER ?? null,
      spEntityId: env.CARTOUCHE_SAML_SP_ENTITY_ID ?? `${publicUrl}/api/auth/saml/metadata`,
      acsUrl: env.CARTOUCHE_SAML_ACS_URL ?? `${publicUrl}/api/auth/saml/acs`,
      idpCertFile: env.CARTOUCHE_SAML_IDP_CERT ?? join(certDir, 'idp.crt'),
      spKeyFile: env.CARTOUCHE_SAML_SP_KEY ?? join(certDir, 'sp.key'),
      spCertFile: env.CARTOUCHE_SAML_SP_CERT ?? join(certDir, 'sp.crt'),
      generateDevCertificates: nodeEnv !== 'production' && env.CARTOUCHE_SAML_IDP_CERT === undefined,
      certDir,
      roleAttribute: env.CARTOUCHE_SAML_ROLE_ATTRIBUTE ?? 'cartoucheRole',
      roleMap: parseRoleMap(
        env.CARTOUCHE_SAML_ROLE_MAP ?? 'cartouche-admin=admin,cartouche-archivist=archivist,cartouche-editor=editor,cartouche-manager=manager',
      ),
      defaultRole: parseDefaultRole(env.CARTOUCHE_SAML_DEFAULT_ROLE),
      emailAttribute: env.CARTOUCHE_SAML_EMAIL_ATTRIBUTE ?? 'email',
      nameAttribute: env.CARTOUCHE_SAML_NAME_ATTRIBUTE ?? 'displayName',
      clockSkewMs: num(env.CARTOUCHE_SAML_CLOCK_SKEW_MS, 5_000, 'CARTOUCHE_SAML_CLOCK_SKEW_MS'),
    },
    smtp: {
      host: env.CARTOUCHE_SMTP_HOST ?? '127.0.0.1',
      port: num(env.CARTOUCHE_SMTP_PORT, 4313, 'CARTOUCHE_SMTP_PORT'),
      from: env.CARTOUCHE_MAIL_FROM ?? 'Cartouche <cartouche@localhost>',
    },
    mailDir: resolve(env.CARTOUCHE_MAIL_DIR ?? join(dataDir, 'mail')),
    mailboxEnabled: nodeEnv !== 'production',
    login: {
      maxAttempts: num(env.CARTOUCHE_LOGIN_MAX_ATTEMPTS, 5, 'CARTOUCHE_LOGIN_MAX_ATTEMPTS'),
      windowMs: num(env.CARTOUCHE_LOGIN_WINDOW_MINUTES, 15, 'CARTOUCHE_LOGIN_WINDOW_MINUTES') * 60_000,
    },
    embedder: embedderSelectionFromEnv({ ...env, CARTOUCHE_DATA_DIR: dataDir }, projectRoot),
  };
}
