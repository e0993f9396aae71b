import { join } from 'node:path';
import type { QueryInterface, Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';
import { projectRoot } from '../config.ts';
import { logger } from '../logger.ts';

/** The umzug migrator over `migrations/NNNN-name.ts`, recording applied migrations in `schema_migrations`. */
export function createMigrator(sequelize: Sequelize): Umzug<QueryInterface> {
  return new Umzug({
    migrations: {
      glob: ['[0-9][0-9][0-9][0-9]-*.ts', { cwd: join(projectRoot, 'migrations') }],
    },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: {
      info: (m) => logger.info(m, 'migration'),
      warn: (m) => logger.warn(m, 'migration'),
      error: (m) => logger.error(m, 'migration'),
      debug: (m) => logger.debug(m, 'migration'),
    },
  });
}
