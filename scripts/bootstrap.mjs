#!/usr/bin/env node
// Cartouche bootstrap: brings a fresh Debian machine with Node.js 20 to a running product
// (`node scripts/bootstrap.mjs run`) or a full test run (`node scripts/bootstrap.mjs test`).
// It uses Node built-ins only, because it runs before `npm ci`.
import { spawn, spawnSync } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const mode = process.argv[2] ?? 'run';
if (!['run', 'test', 'db'].includes(mode)) {
  console.error(`usage: node scripts/bootstrap.mjs run|test|db   (got "${mode}")`);
  process.exit(2);
}
const extraArgs = process.argv.slice(3);

const dataDir = resolve(process.env.CARTOUCHE_DATA_DIR ?? join(root, '.data'));
const ports = {
  api: Number(process.env.CARTOUCHE_API_PORT ?? 4310),
  db: Number(process.env.CARTOUCHE_DB_PORT ?? 4311),
  idp: Number(process.env.CARTOUCHE_IDP_PORT ?? 4312),
  smtp: Number(process.env.CARTOUCHE_SMTP_PORT ?? 4313),
};
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
const children = new Set();
let stopping = false;

function log(msg) {
  console.log(`\x1b[2m[bootstrap]\x1b[0m ${msg}`);
}

class BootstrapFailure extends Error {}
function fail(msg) {
  console.error(`[bootstrap] ${msg}`);
  shutdown(1);
  throw new BootstrapFailure(msg);
}
process.on('uncaughtException', (err) => {
  if (!(err instanceof BootstrapFailure)) console.error(err);
  shutdown(1);
});

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: 'inherit', cwd: root, ...opts });
  if (r.error) throw r.error;
  return r.status ?? 1;
}

function which(name, extra = []) {
  const dirs = [...(process.env.PATH ?? '').split(':'), '/usr/sbin', '/usr/local/sbin', '/sbin', ...extra];
  for (const d of dirs) {
    if (d && existsSync(join(d, name))) return join(d, name);
  }
  return null;
}

// ---------------------------------------------------------------- system packages
let aptUpdated = false;
function aptInstall(packages) {
  if (!isRoot && !which('sudo')) fail(`missing ${packages.join(', ')} and no root or sudo to install them with apt-get`);
  const aptGet = (args) => (isRoot ? run('apt-get', args, { env }) : run('sudo', ['apt-get', ...args], { env }));
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  if (!aptUpdated) {
    log('apt-get update');
    aptGet(['update', '-qq']);
    aptUpdated = true;
  }
  log(`apt-get install ${packages.join(' ')}`);
  const status = aptGet(['install', '-y', '-qq', ...packages]);
  if (status !== 0) fail(`apt-get install ${packages.join(' ')} failed (exit ${status})`);
}

function ensureSystemPackages() {
  const need = [];
  if (!which('mariadbd') || !which('mariadb-install-db')) need.push('mariadb-server-core');
  if (!which('mariadb')) need.push('mariadb-client-core');
  if (mode === 'test' && !existsSync('/usr/bin/chromium')) need.push('chromium');
  // public-domain clip art: the open dataset the subject-model checks run on
  if (mode === 'test' && !existsSync('/usr/share/openclipart/png')) need.push('openclipart-png');
  if (need.length) aptInstall(need);
}

// ---------------------------------------------------------------- npm dependencies
function lockHash() {
  return createHash('sha256').update(readFileSync(join(root, 'package-lock.json'))).digest('hex');
}

function ensureNodeModules() {
  const stamp = join(root, 'node_modules', '.cartouche-lock-hash');
  const want = lockHash();
  if (existsSync(stamp) && readFileSync(stamp, 'utf8').trim() === want) return;
  log('installing npm dependencies (npm ci)');
  const status = run('npm', ['ci', '--no-audit', '--no-fund']);
  if (status !== 0) fail(`npm ci failed (exit ${status})`);
  writeFileSync(stamp, want + '\n');
}

// ---------------------------------------------------------------- private MariaDB
const dbDir = join(dataDir, 'mariadb');
const dbDataDir = join(dbDir, 'data');
function socketPath() {
  const p = join(dbDir, 'mariadb.sock');
  // unix socket paths are limited to 107 bytes; fall back to a short path derived from the data dir
  if (Buffer.byteLength(p) < 100) return p;
  return join(tmpdir(), `cartouche-${createHash('sha1').update(dbDir).digest('hex').slice(0, 12)}.sock`);
}
const socket = socketPath();
const dbSecretsFile = join(dataDir, 'db.json');

function mariadbAsRoot(sql, { quiet = false } = {}) {
  const r = spawnSync(which('mariadb'), ['--no-defaults', `--socket=${socket}`, '-uroot', '--batch', '--skip-column-names', '-e', sql], {
    encoding: 'utf8',
  });
  if (!quiet && r.status !== 0) process.stderr.write(r.stderr);
  return r;
}

function dbResponds() {
  return existsSync(socket) && mariadbAsRoot('SELECT 1', { quiet: true }).status === 0;
}

async function startMariadb() {
  mkdirSync(dbDir, { recursive: true });
  if (dbResponds()) {
    log(`MariaDB already running on 127.0.0.1:${ports.db} (reusing it)`);
    return null;
  }
  if (!existsSync(join(dbDataDir, 'mysql'))) {
    log('initialising a private MariaDB data directory in .data/mariadb');
    const args = ['--no-defaults', `--datadir=${dbDataDir}`, '--auth-root-authentication-method=socket', '--skip-test-db'];
    if (isRoot) args.splice(1, 0, '--user=root');
    const r = spawnSync(which('mariadb-install-db'), args, { encoding: 'utf8' });
    if (r.status !== 0) {
      process.stderr.write(r.stdout + r.stderr);
      fail('mariadb-install-db failed');
    }
  }
  const args = [
    '--no-defaults',
    ...(isRoot ? ['--user=root'] : []),
    `--datadir=${dbDataDir}`,
    `--socket=${socket}`,
    `--port=${ports.db}`,
    '--bind-address=127.0.0.1',
    '--skip-name-resolve',
    `--pid-file=${join(dbDir, 'mariadbd.pid')}`,
    `--log-error=${join(dbDir, 'error.log')}`,
    '--character-set-server=utf8mb4',
    '--collation-server=utf8mb4_unicode_ci',
    '--innodb-buffer-pool-size=256M',
    '--innodb-flush-log-at-trx-commit=2',
    '--max-connections=200',
  ];
  log(`starting MariaDB on 127.0.0.1:${ports.db}`);
  const child = spawn(which('mariadbd'), args, { stdio: ['ignore', 'ignore', 'inherit'] });
  child.on('exit', (code) => {
    children.delete(child);
    if (!stopping) fail(`MariaDB exited unexpectedly (code ${code}); see ${join(dbDir, 'error.log')}`);
  });
  const deadline = Date.now() + 60_000;
  while (!dbResponds()) {
    if (Date.now() > deadline) fail(`MariaDB did not answer within 60 s; see ${join(dbDir, 'error.log')}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  children.add(child);
  return child;
}

function ensureDatabase(name, { fresh = false } = {}) {
  let secrets;
  if (existsSync(dbSecretsFile)) secrets = JSON.parse(readFileSync(dbSecretsFile, 'utf8'));
  else {
    secrets = { host: '127.0.0.1', port: ports.db, user: 'cartouche', password: randomBytes(18).toString('base64url') };
    writeFileSync(dbSecretsFile, JSON.stringify(secrets, null, 2) + '\n', { mode: 0o600 });
  }
  const pw = secrets.password.replace(/'/g, "''");
  const sql = [
    fresh ? `DROP DATABASE IF EXISTS \`${name}\`` : null,
    `CREATE DATABASE IF NOT EXISTS \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
    `CREATE USER IF NOT EXISTS '${secrets.user}'@'127.0.0.1' IDENTIFIED BY '${pw}'`,
    `ALTER USER '${secrets.user}'@'127.0.0.1' IDENTIFIED BY '${pw}'`,
    `GRANT ALL PRIVILEGES ON \`${name}\`.* TO '${secrets.user}'@'127.0.0.1'`,
  ]
    .filter(Boolean)
    .join('; ');
  if (mariadbAsRoot(sql).status !== 0) fail(`could not create database ${name}`);
  return { ...secrets, port: ports.db, name };
}

// ---------------------------------------------------------------- children
function bin(name) {
  return join(root, 'node_modules', '.bin', name);
}

function startService(label, script, env) {
  const child = spawn(bin('tsx'), [script], { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] });
  const prefix = `\x1b[36m${label.padEnd(6)}\x1b[0m│ `;
  const pipe = (stream, out) => {
    let buf = '';
    stream.on('data', (chunk) => {
      buf += chunk;
      let i;
      while ((i = buf.indexOf('\n')) >= 0) {
        out.write(prefix + buf.slice(0, i) + '\n');
        buf = buf.slice(i + 1);
      }
    });
  };
  pipe(child.stdout, process.stdout);
  pipe(child.stderr, process.stderr);
  child.on('exit', (code, signal) => {
    children.delete(child);
    if (!stopping) fail(`${label} stopped unexpectedly (${signal ?? `exit ${code}`})`);
  });
  children.add(child);
  return child;
}

function runStep(label, script, env, args = []) {
  const status = run(bin('tsx'), [script, ...args], { env });
  if (status !== 0) fail(`${label} failed (exit ${status})`);
}

function newestMtime(dir) {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(p) : statSync(p).mtimeMs);
  }
  return newest;
}

function buildClient(env) {
  const out = join(root, 'dist', 'client', 'index.html');
  const sources = Math.max(
    newestMtime(join(root, 'client')),
    newestMtime(join(root, 'fonts')),
    statSync(join(root, 'vite.config.ts')).mtimeMs,
    statSync(join(root, 'package-lock.json')).mtimeMs,
  );
  if (existsSync(out) && statSync(out).mtimeMs >= sources) {
    log('client build is up to date');
    return;
  }
  log('building the client (vite build)');
  const status = run(bin('vite'), ['build', '--logLevel', 'warn'], { env });
  if (status !== 0) fail(`vite build failed (exit ${status})`);
}

let shuttingDown = false;
function shutdown(code) {
  if (shuttingDown) return;
  shuttingDown = true;
  stopping = true;
  const list = [...children];
  for (const c of list) c.kill('SIGTERM');
  const done = () => process.exit(code);
  if (list.length === 0) return done();
  let left = list.length;
  for (const c of list) c.once('exit', () => --left === 0 && done());
  setTimeout(() => {
    for (const c of list) c.kill('SIGKILL');
    done();
  }, 15_000).unref();
}
process.on('SIGINT', () => {
  log('stopping everything this command started');
  shutdown(130);
});
process.on('SIGTERM', () => shutdown(143));

// ---------------------------------------------------------------- main
async function main() {
  ensureSystemPackages();
  ensureNodeModules();
  mkdirSync(dataDir, { recursive: true });
  await startMariadb();

  const dbName = mode === 'test' ? 'cartouche_test' : (process.env.CARTOUCHE_DB_NAME ?? 'cartouche');
  const db = ensureDatabase(dbName, { fresh: mode === 'test' });
  const env = {
    ...process.env,
    CARTOUCHE_DATA_DIR: dataDir,
    CARTOUCHE_DB_HOST: db.host,
    CARTOUCHE_DB_PORT: String(db.port),
    CARTOUCHE_DB_USER: db.user,
    CARTOUCHE_DB_PASSWORD: db.password,
    CARTOUCHE_DB_NAME: db.name,
    CARTOUCHE_API_PORT: String(ports.api),
    CARTOUCHE_IDP_PORT: String(ports.idp),
    CARTOUCHE_SMTP_PORT: String(ports.smtp),
    CARTOUCHE_PUBLIC_URL: process.env.CARTOUCHE_PUBLIC_URL ?? `http://127.0.0.1:${ports.api}`,
  };
  if (mode === 'test') {
    env.NODE_ENV = 'test';
    env.CARTOUCHE_STORAGE_DIR = join(dataDir, 'storage-test');
  }

  runStep('migrations', 'scripts/migrate.ts', env);
  if (mode === 'db') {
    // for running tests by hand (npx vitest): the test database exists too, migrated by the tests themselves
    ensureDatabase('cartouche_test');
    log(`databases ${db.name} and cartouche_test are ready on 127.0.0.1:${db.port}; Ctrl-C stops MariaDB`);
    return;
  }

  if (mode === 'test') {
    buildClient(env);
    const results = join(dataDir, 'test-results.json');
    log('running the test suite (unit, reference, API, browser)');
    const status = run(
      bin('vitest'),
      ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${results}`, ...extraArgs],
      { env },
    );
    let summary = null;
    if (existsSync(results)) {
      const r = JSON.parse(readFileSync(results, 'utf8'));
      summary = { passed: r.numPassedTests, failed: r.numFailedTests + (r.numRuntimeErrorTestSuites ?? 0), skipped: r.numPendingTests + (r.numTodoTests ?? 0) };
    }
    if (summary === null) summary = { passed: 0, failed: 1, skipped: 0 };
    const failed = status !== 0 && summary.failed === 0 ? 1 : summary.failed;
    console.log(`${summary.passed} passed, ${failed} failed` + (summary.skipped ? `, ${summary.skipped} skipped` : ''));
    shutdown(status === 0 && failed === 0 ? 0 : 1);
    return;
  }

  runStep('demo data', 'scripts/load-demo.ts', env);
  buildClient(env);
  startService('smtp', 'server/src/mail/fake-smtp.ts', env);
  startService('idp', 'idp-fake/main.ts', env);
  startService('worker', 'jobs/src/index.ts', env);
  startService('api', 'server/src/index.ts', env);
  await waitForHttp(`http://127.0.0.1:${ports.api}/api/health`, 60_000);
  runStep('sign-ins', 'scripts/load-demo.ts', env, ['--print-sign-ins']);
  console.log(`\n  Cartouche is running at \x1b[1mhttp://127.0.0.1:${ports.api}/\x1b[0m`);
  console.log(`  Fake IdP: http://127.0.0.1:${ports.idp}/   Captured mail: ${join(dataDir, 'mail')}`);
  console.log('  Press Ctrl-C to stop everything this command started.\n');
}

async function waitForHttp(url, ms) {
  const deadline = Date.now() + ms;
  for (;;) {
    try {
      const res = await fetch(url);
      if (res.status < 500) return;
    } catch {
      /* not up yet */
    }
    if (Date.now() > deadline) fail(`${url} did not answer within ${ms / 1000} s`);
    await new Promise((r) => setTimeout(r, 300));
  }
}

main().catch((err) => {
  if (!(err instanceof BootstrapFailure)) console.error(err);
  shutdown(1);
});
