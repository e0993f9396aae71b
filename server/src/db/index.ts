import type { Sequelize } from 'sequelize';
import type { DbConfig } from '../config.ts';
import { initModels } from '../models/index.ts';
import { createSequelize } from './sequelize.ts';

/** Opens the database and binds the models to it. */
export function openDatabase(db: DbConfig, opts: { pool?: number } = {}): Sequelize {
  const sequelize = createSequelize(db, opts);
  initModels(sequelize);
  return sequelize;
}
