import type { Sequelize } from 'sequelize';
import type { AppConfig } from './config.ts';

/** What routes and services need from the running process; built once in index.ts or by a test. */
export interface AppContext {
  config: AppConfig;
  sequelize: Sequelize;
}
