import { DataTypes, literal, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

// Weight maps: the learned maps T from few-shot subject weights to many-shot weights, one version per
// training. `purpose` regressed = trained on one collection's own subjects (used by from-examples models);
// carried = trained between a source collection's subject models and this collection's confirmed items
// (used by carried models). Each version keeps what it was trained on, how it measured against the method it
// would replace on held-out subjects, and whether it was chosen.

const now3 = literal('CURRENT_TIMESTAMP(3)');

export async function up({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.createTable('weight_maps', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true, allowNull: false },
    collection_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'collections', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    /** for carry maps: the collection the subject models come from */
    source_collection_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'collections', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    purpose: { type: DataTypes.ENUM('regressed', 'carried'), allowNull: false },
    version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    embedder_id: { type: DataTypes.STRING(120), allowNull: false },
    /** linear, mlp or ensemble */
    kind: { type: DataTypes.STRING(16), allowNull: false },
    /** the map's own id (a hash of its parameters) */
    map_id: { type: DataTypes.STRING(64), allowNull: false },
    dimension: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
    weights: { type: DataTypes.BLOB('medium'), allowNull: false },
    /** SHA-256 of the training inputs (subjects, their examples and decisions): the same inputs never train twice */
    fingerprint: { type: DataTypes.CHAR(64), allowNull: false },
    /** the subjects it was trained on, with their example and judgement counts */
    trained_on: { type: DataTypes.JSON, allowNull: false },
    /** held-out comparison: folds, per-subject AP of both methods */
    validation: { type: DataTypes.JSON, allowNull: false },
    /** mean held-out AP of the method it would replace (prototype, or re-centring for carry maps) and of the map */
    baseline_ap: { type: DataTypes.DOUBLE, allowNull: false },
    map_ap: { type: DataTypes.DOUBLE, allowNull: false },
    chosen: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    /** why it was (not) chosen, in words */
    reason: { type: DataTypes.STRING(500), allowNull: false },
    created_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
    updated_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  });
  await qi.addIndex('weight_maps', ['collection_id', 'purpose', 'source_collection_id', 'embedder_id', 'version'], { name: 'weight_maps_version' });
  await qi.addIndex('weight_maps', ['collection_id', 'purpose', 'embedder_id', 'fingerprint'], { name: 'weight_maps_fingerprint' });
}

export async function down({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.dropTable('weight_maps');
}
