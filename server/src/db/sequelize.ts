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
    define: { underscored: true, timestamps: true, createdAt: 'created_at', updatedAt: 'updated_at' },
    dialectOptions: { timezone: 'Z', connectTimeout: 10_000 },
    timezone: '+00:00',
  });
}
