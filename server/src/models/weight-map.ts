import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Collection } from './collection.ts';

export const WEIGHT_MAP_PURPOSES = ['regressed', 'carried'] as const;
export type WeightMapPurpose = (typeof WEIGHT_MAP_PURPOSES)[number];

/**
 * One trained version of a collection's weight map T (few-shot weights → many-shot weights), with what it was
 * trained on and how it measured on held-out subjects against the method it would replace.
 */
export class WeightMapVersion extends Model<InferAttributes<WeightMapVersion>, InferCreationAttributes<WeightMapVersion>> {
  declare id: CreationOptional<number>;
  declare collectionId: ForeignKey<Collection['id']>;
  declare sourceCollectionId: number | null;
  declare purpose: WeightMapPurpose;
  declare version: number;
  declare embedderId: string;
  declare kind: string;
  declare mapId: string;
  declare dimension: number;
  declare weights: Buffer;
  declare fingerprint: string;
  declare trainedOn: Record<string, unknown>;
  declare validation: Record<string, unknown>;
  declare baselineAp: number;
  declare mapAp: number;
  declare chosen: CreationOptional<boolean>;
  declare reason: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    WeightMapVersion.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        sourceCollectionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        purpose: { type: DataTypes.ENUM(...WEIGHT_MAP_PURPOSES), allowNull: false },
        version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        embedderId: { type: DataTypes.STRING(120), allowNull: false },
        kind: { type: DataTypes.STRING(16), allowNull: false },
        mapId: { type: DataTypes.STRING(64), allowNull: false },
        dimension: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
        weights: { type: DataTypes.BLOB('medium'), allowNull: false },
        fingerprint: { type: DataTypes.CHAR(64), allowNull: false },
        trainedOn: { type: DataTypes.JSON, allowNull: false },
        validation: { type: DataTypes.JSON, allowNull: false },
        baselineAp: { type: DataTypes.DOUBLE, allowNull: false },
        mapAp: { type: DataTypes.DOUBLE, allowNull: false },
        chosen: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        reason: { type: DataTypes.STRING(500), allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'weight_maps' },
    );
  }
}
