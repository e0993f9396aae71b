import { existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const projectRoot = resolve(fileURLToPath(new URL('../..', import.meta.url)));

export interface DbConfig {
  host: string;
  port: number;
  user: string;
  password: string;
  name: string;
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
  const pkg = JSON.parse(readFileSync(join(projectRoot, 'package.json'), 'utf8')) as { version: string };
  return {
    env: nodeEnv,
    version: pkg.version,
    dataDir,
    storageDir: resolve(env.CARTOUCHE_STORAGE_DIR ?? join(dataDir, 'storage')),
    clientDir: resolve(env.CARTOUCHE_CLIENT_DIR ?? join(projectRoot, 'dist', 'client')),
    apiPort,
    publicUrl: env.CARTOUCHE_PUBLIC_URL ?? `http://127.0.0.1:${apiPort}`,
    db: {
      host: env.CARTOUCHE_DB_HOST ?? secrets.host ?? '127.0.0.1',
      port: num(env.CARTOUCHE_DB_PORT, secrets.port ?? 4311, 'CARTOUCHE_DB_PORT'),
      user: env.CARTOUCHE_DB_USER ?? secrets.user ?? 'cartouche',
      password: env.CARTOUCHE_DB_PASSWORD ?? secrets.password ?? '',
      name: env.CARTOUCHE_DB_NAME ?? (nodeEnv === 'test' ? 'cartouche_test' : 'cartouche'),
    },
    workerStaleAfterMs: num(env.CARTOUCHE_WORKER_STALE_MS, 90_000, 'CARTOUCHE_WORKER_STALE_MS'),
  };
}
