import { DataTypes, literal, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

// Intake: the keys of each item's derivatives (a thumbnail and a review-size image, both content-addressed
// in storage), an index for finding an item by the hash of its bytes within a collection (duplicates), and
// the catalogue-metadata import batches whose preview is kept until it is applied.

const now3 = literal('CURRENT_TIMESTAMP(3)');
const userRef = {
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: true,
  references: { model: 'users', key: 'id' },
  onDelete: 'SET NULL',
  onUpdate: 'CASCADE',
};

export async function up({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.addColumn('items', 'thumb_key', { type: DataTypes.CHAR(64), allowNull: true });
  await qi.addColumn('items', 'view_key', { type: DataTypes.CHAR(64), allowNull: true });
  await qi.addIndex('items', ['collection_id', 'file_key'], { name: 'items_collection_file_key' });

  await qi.createTable('import_batches', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true, allowNull: false },
    collection_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'collections', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    source_name: { type: DataTypes.STRING(255), allowNull: false },
    source_format: { type: DataTypes.ENUM('csv', 'xlsx'), allowNull: false },
    status: { type: DataTypes.ENUM('previewed', 'applied'), allowNull: false, defaultValue: 'previewed' },
    /** which sheet column feeds which item field, and the columns that were ignored */
    columns: { type: DataTypes.JSON, allowNull: false },
    /** the preview: one entry per data row with its match, its planned changes (and the item version they were planned against) or its problem */
    rows: { type: DataTypes.JSON, allowNull: false },
    summary: { type: DataTypes.JSON, allowNull: false },
    /** what applying did, row by row */
    result: { type: DataTypes.JSON, allowNull: true },
    created_by: userRef,
    applied_by: userRef,
    applied_at: { type: DataTypes.DATE(3), allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
    updated_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  });
  await qi.addIndex('import_batches', ['collection_id', 'created_at'], { name: 'import_batches_collection' });
}

export async function down({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.dropTable('import_batches');
  await qi.removeIndex('items', 'items_collection_file_key');
  await qi.removeColumn('items', 'view_key');
  await qi.removeColumn('items', 'thumb_key');
}
