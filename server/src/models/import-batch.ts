import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Collection } from './collection.ts';

export const IMPORT_FORMATS = ['csv', 'xlsx'] as const;
export type ImportFormat = (typeof IMPORT_FORMATS)[number];
export const IMPORT_STATUSES = ['previewed', 'applied'] as const;
export type ImportStatus = (typeof IMPORT_STATUSES)[number];

/**
 * One catalogue-metadata sheet brought in for a collection: its preview (kept here, so applying uses exactly
 * what the archivist saw) and, once applied, what applying did. The JSON shapes belong to services/metadata-import.ts.
 */
export class ImportBatch extends Model<InferAttributes<ImportBatch>, InferCreationAttributes<ImportBatch>> {
  declare id: CreationOptional<number>;
  declare collectionId: ForeignKey<Collection['id']>;
  declare sourceName: string;
  declare sourceFormat: ImportFormat;
  declare status: CreationOptional<ImportStatus>;
  declare columns: unknown;
  declare rows: unknown;
  declare summary: unknown;
  declare result: unknown;
  declare createdBy: number | null;
  declare appliedBy: number | null;
  declare appliedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    ImportBatch.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        sourceName: { type: DataTypes.STRING(255), allowNull: false },
        sourceFormat: { type: DataTypes.ENUM(...IMPORT_FORMATS), allowNull: false },
        status: { type: DataTypes.ENUM(...IMPORT_STATUSES), allowNull: false, defaultValue: 'previewed' },
        columns: { type: DataTypes.JSON, allowNull: false },
        rows: { type: DataTypes.JSON, allowNull: false },
        summary: { type: DataTypes.JSON, allowNull: false },
        result: { type: DataTypes.JSON, allowNull: true },
        createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        appliedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        appliedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'import_batches' },
    );
  }
}
