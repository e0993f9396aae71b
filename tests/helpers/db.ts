import { QueryTypes, type Sequelize } from 'sequelize';
import { loadConfig, type AppConfig } from '../../server/src/config.ts';
import { openDatabase } from '../../server/src/db/index.ts';
import { createMigrator } from '../../server/src/db/migrator.ts';
import { ensureDevCertificates } from '../../scripts/dev-certs.ts';

/**
 * Opens the test database (migrated) for one test file. Refuses any database whose name does not end in
 * `_test`, so a test can never wipe the demo or a real catalogue.
 */
export async function openTestDatabase(overrides: Partial<AppConfig> = {}): Promise<{ config: AppConfig; sequelize: Sequelize }> {
  const base = loadConfig({ ...process.env, NODE_ENV: 'test' });
  const config = { ...base, ...overrides };
  if (!config.db.name.endsWith('_test')) throw new Error(`refusing to run tests against database "${config.db.name}"`);
  const sequelize = openDatabase(config.db, { pool: 8 });
  await createMigrator(sequelize).up();
  if (config.saml.enabled && config.saml.generateDevCertificates) await ensureDevCertificates(config.saml.certDir);
  return { config, sequelize };
}

/** Empties every table (but the migration log) on one connection, so foreign keys can be switched off for it. */
export async function resetDatabase(sequelize: Sequelize): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    const tables = (await listTables(sequelize)).filter((t) => t !== 'schema_migrations');
    await sequelize.query('SET FOREIGN_KEY_CHECKS = 0', { transaction });
    for (const t of tables) await sequelize.query(`TRUNCATE TABLE \`${t}\``, { transaction });
    await sequelize.query('SET FOREIGN_KEY_CHECKS = 1', { transaction });
  });
}

export async function listTables(sequelize: Sequelize): Promise<string[]> {
  const rows = await sequelize.query<{ name: string }>(
    "SELECT TABLE_NAME AS name FROM information_schema.TABLES WHERE TABLE_SCHEMA = DATABASE() AND TABLE_TYPE = 'BASE TABLE' ORDER BY name",
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => r.name);
}
