import { Sequelize } from 'sequelize';
import type { DbConfig } from '../config.ts';
import { logger } from '../logger.ts';

/** Opens a Sequelize connection pool to the project's MariaDB. */
export function createSequelize(db: DbConfig, opts: { pool?: number } = {}): Sequelize {
  return new Sequelize(db.name, db.user, db.password, {
    host: db.host,
    port: db.port,
    dialect: 'mariadb',
    logging: (sql) => logger.trace({ sql }, 'sql'),
    pool: { max: opts.pool ?? 10, min: 0, idle: 10_000, acquire: 30_000 },
    // underscored maps the createdAt and updatedAt attributes to created_at and updated_at; naming the columns here
    // as well would make a second attribute for each, and a saved instance would keep its old updatedAt
    define: { underscored: true, timestamps: true },
    dialectOptions: { timezone: 'Z', connectTimeout: 10_000 },
    timezone: '+00:00',
  });
}
