// Applies pending migrations to the configured database (`npm run migrate`; `-- down` reverts the last one).
import { loadConfig } from '../server/src/config.ts';
import { createMigrator } from '../server/src/db/migrator.ts';
import { createSequelize } from '../server/src/db/sequelize.ts';

const config = loadConfig();
const sequelize = createSequelize(config.db, { pool: 2 });
try {
  const migrator = createMigrator(sequelize);
  if (process.argv[2] === 'down') {
    const reverted = await migrator.down();
    console.log(`reverted: ${reverted.map((m) => m.name).join(', ') || 'nothing'}`);
  } else {
    const applied = await migrator.up();
    console.log(
      applied.length ? `applied ${applied.length} migration(s): ${applied.map((m) => m.name).join(', ')}` : 'schema is up to date',
    );
  }
} finally {
  await sequelize.close();
}
