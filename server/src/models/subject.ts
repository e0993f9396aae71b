import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Collection } from './collection.ts';

export const SUBJECT_KINDS = ['subject', 'form'] as const;
export const SUBJECT_STATUSES = ['draft', 'active', 'retired'] as const;

export class Subject extends Model<InferAttributes<Subject>, InferCreationAttributes<Subject>> {
  declare id: CreationOptional<number>;
  declare collectionId: ForeignKey<Collection['id']>;
  declare broaderId: number | null;
  declare kind: (typeof SUBJECT_KINDS)[number];
  declare prefLabel: string;
  declare altLabels: string[];
  declare notation: string | null;
  declare scopeNote: string | null;
  declare altTextPhrase: string | null;
  declare conceptUri: string | null;
  declare status: CreationOptional<(typeof SUBJECT_STATUSES)[number]>;
  declare feedsAltText: CreationOptional<boolean>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Subject.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        broaderId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        kind: { type: DataTypes.ENUM(...SUBJECT_KINDS), allowNull: false, defaultValue: 'subject' },
        prefLabel: { type: DataTypes.STRING(200), allowNull: false },
        altLabels: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        notation: { type: DataTypes.STRING(60), allowNull: true },
        scopeNote: { type: DataTypes.TEXT, allowNull: true },
        altTextPhrase: { type: DataTypes.STRING(200), allowNull: true },
        conceptUri: { type: DataTypes.STRING(500), allowNull: true },
        status: { type: DataTypes.ENUM(...SUBJECT_STATUSES), allowNull: false, defaultValue: 'draft' },
        feedsAltText: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'subjects', version: true },
    );
  }
}
