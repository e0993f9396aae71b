import { DataTypes, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

// Whether the night shift reads the text in a collection's scans (OCR). On for every collection, existing ones
// included: the text feeds catalogue search and the alt-text checks. An archivist can turn it off per collection;
// CARTOUCHE_NIGHTSHIFT_OCR=off turns it off for the whole site.

export async function up({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.addColumn('collections', 'read_text', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true });
}

export async function down({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.removeColumn('collections', 'read_text');
}
