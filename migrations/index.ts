import type { QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';
import * as m0001 from './0001-initial-schema.ts';
import * as m0002 from './0002-user-tokens.ts';
import * as m0003 from './0003-intake.ts';
import * as m0004 from './0004-weight-maps.ts';
import * as m0005 from './0005-review.ts';
import * as m0007 from './0007-ledger-exports.ts';
import * as m0008 from './0008-collection-read-text.ts';
import * as m0009 from './0009-review-margin.ts';

export interface MigrationModule {
  up(params: MigrationParams<QueryInterface>): Promise<void>;
  down(params: MigrationParams<QueryInterface>): Promise<void>;
}

/**
 * Every migration, in order. Listed statically (not globbed) so the same code runs under tsx, vitest and a
 * bundler. Add a new file `NNNN-what-it-does.ts` and one line here; never edit a migration that has shipped.
 */
export const migrations: Array<[name: string, module: MigrationModule]> = [
  ['0001-initial-schema', m0001],
  ['0002-user-tokens', m0002],
  ['0003-intake', m0003],
  ['0004-weight-maps', m0004],
  ['0005-review', m0005],
  ['0007-ledger-exports', m0007],
  ['0008-collection-read-text', m0008],
  ['0009-review-margin', m0009],
];
