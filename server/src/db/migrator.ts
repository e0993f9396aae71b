import type { QueryInterface, Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';
import { migrations } from '../../../migrations/index.ts';
import { logger } from '../logger.ts';

/** The umzug migrator over `migrations/`, recording applied migrations in `schema_migrations`. */
export function createMigrator(sequelize: Sequelize): Umzug<QueryInterface> {
  return new Umzug({
    migrations: migrations.map(([name, m]) => ({ name, up: m.up, down: m.down })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: {
      info: (m) => logger.debug(m, 'migration'),
      warn: (m) => logger.warn(m, 'migration'),
      error: (m) => logger.error(m, 'migration'),
      debug: (m) => logger.debug(m, 'migration'),
    },
  });
}
