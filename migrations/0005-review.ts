import { DataTypes, literal, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

// The review desk: what OCR read in each item (and whether the item is mostly text, WCAG SC 1.4.5), the
// catalogue's search text with a FULLTEXT index, each collection's share of items reviewed twice, the blind
// second reviews themselves, and the skips of the item queue.

const now3 = literal('CURRENT_TIMESTAMP(3)');
const ref = (table: string, onDelete: 'CASCADE' | 'SET NULL', allowNull = false) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: 'id' },
  onDelete,
  onUpdate: 'CASCADE',
});

export async function up({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.createTable('item_text_reads', {
    item_id: { ...ref('items', 'CASCADE'), primaryKey: true },
    /** which OCR engine, language data and filter read it; a new one reads every item again */
    engine: { type: DataTypes.STRING(120), allowNull: false },
    /** the lines kept (confident words only), as stored in items.ocr_text */
    text: { type: DataTypes.TEXT, allowNull: true },
    /** mean confidence (0–100) of the words kept */
    confidence: { type: DataTypes.FLOAT, allowNull: true },
    /** share of the image area covered by confident text lines */
    text_area: { type: DataTypes.FLOAT, allowNull: true },
    /** the item is mostly text (WCAG 2.2 SC 1.4.5 Images of Text): its words belong in the alt or long description */
    mostly_text: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    /** why the image could not be read, when it could not */
    error: { type: DataTypes.TEXT, allowNull: true },
    read_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  });
  await qi.addIndex('item_text_reads', ['engine'], { name: 'item_text_reads_engine' });

  await qi.addColumn('items', 'search_text', { type: DataTypes.TEXT('medium'), allowNull: true });
  await qi.addColumn('items', 'search_synced_at', { type: DataTypes.DATE(3), allowNull: true });
  await qi.sequelize.query('ALTER TABLE items ADD FULLTEXT INDEX items_search_text (search_text)');

  await qi.createTable('review_settings', {
    collection_id: { ...ref('collections', 'CASCADE'), primaryKey: true },
    /** share of the collection's items (0–1) that a second editor reviews blind */
    double_review_share: { type: DataTypes.DECIMAL(4, 3), allowNull: false, defaultValue: 0.1 },
    updated_by: ref('users', 'SET NULL', true),
    updated_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  });

  await qi.createTable('second_reviews', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true, allowNull: false },
    item_id: ref('items', 'CASCADE'),
    reviewer_id: ref('users', 'SET NULL', true),
    /** the editor who approved the item first (whose decisions the second reviewer did not see) */
    first_reviewer_id: ref('users', 'SET NULL', true),
    /** [{ subjectId, present, subjectModelId }] for every subject the second reviewer judged */
    judgements: { type: DataTypes.JSON, allowNull: false },
    created_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  });
  await qi.addIndex('second_reviews', ['item_id'], { unique: true, name: 'second_reviews_item' });

  await qi.createTable('review_skips', {
    item_id: { ...ref('items', 'CASCADE'), primaryKey: true },
    user_id: { ...ref('users', 'CASCADE'), primaryKey: true },
    skipped_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  });
}

export async function down({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.dropTable('review_skips');
  await qi.dropTable('second_reviews');
  await qi.dropTable('review_settings');
  await qi.removeIndex('items', 'items_search_text');
  await qi.removeColumn('items', 'search_synced_at');
  await qi.removeColumn('items', 'search_text');
  await qi.dropTable('item_text_reads');
}
