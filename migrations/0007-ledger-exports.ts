import { DataTypes, literal, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

// Exports: each requested export is built by one job (job_id), records its file's name and size, how it was
// triggered (a person, or the weekly ledger mail) and when its mail went out, so a retried weekly job never
// mails twice. The weekly ledger mail has its settings per collection (a missing row means the default:
// on, Mondays at 07:00 in the collection's time zone).

const now3 = literal('CURRENT_TIMESTAMP(3)');

export async function up({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.addColumn('exports', 'job_id', {
    type: DataTypes.BIGINT.UNSIGNED,
    allowNull: true,
    references: { model: 'jobs', key: 'id' },
    onDelete: 'SET NULL',
    onUpdate: 'CASCADE',
  });
  await qi.addIndex('exports', ['job_id'], { unique: true, name: 'exports_job' });
  await qi.addColumn('exports', 'trigger', { type: DataTypes.ENUM('manual', 'weekly'), allowNull: false, defaultValue: 'manual' });
  await qi.addColumn('exports', 'file_name', { type: DataTypes.STRING(255), allowNull: true });
  await qi.addColumn('exports', 'byte_size', { type: DataTypes.BIGINT.UNSIGNED, allowNull: true });
  await qi.addColumn('exports', 'mailed_at', { type: DataTypes.DATE(3), allowNull: true });

  await qi.createTable('ledger_mail_settings', {
    collection_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      allowNull: false,
      references: { model: 'collections', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    /** ISO weekday: 1 Monday … 7 Sunday */
    weekday: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 1 },
    hour: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 7 },
    updated_by: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'SET NULL',
      onUpdate: 'CASCADE',
    },
    created_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
    updated_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  });
}

export async function down({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.dropTable('ledger_mail_settings');
  await qi.removeColumn('exports', 'mailed_at');
  await qi.removeColumn('exports', 'byte_size');
  await qi.removeColumn('exports', 'file_name');
  await qi.removeColumn('exports', 'trigger');
  // the foreign key's name was chosen by Sequelize: look it up rather than guess it
  const [fks] = (await qi.sequelize.query(
    "SELECT CONSTRAINT_NAME AS name FROM information_schema.KEY_COLUMN_USAGE WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = 'exports' AND COLUMN_NAME = 'job_id' AND REFERENCED_TABLE_NAME IS NOT NULL",
  )) as [Array<{ name: string }>, unknown];
  for (const fk of fks) await qi.removeConstraint('exports', fk.name);
  await qi.removeIndex('exports', 'exports_job');
  await qi.removeColumn('exports', 'job_id');
}
