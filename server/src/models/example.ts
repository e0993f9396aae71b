import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Subject } from './subject.ts';

export const EXAMPLE_MEDIA = ['sketch', 'illustration', 'photo'] as const;
export const EXAMPLE_ORIGINS = ['drawn', 'uploaded', 'promoted'] as const;

export class Example extends Model<InferAttributes<Example>, InferCreationAttributes<Example>> {
  declare id: CreationOptional<number>;
  declare subjectId: ForeignKey<Subject['id']>;
  declare medium: (typeof EXAMPLE_MEDIA)[number];
  declare origin: (typeof EXAMPLE_ORIGINS)[number];
  declare fileKey: string;
  declare itemId: number | null;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Example.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        medium: { type: DataTypes.ENUM(...EXAMPLE_MEDIA), allowNull: false },
        origin: { type: DataTypes.ENUM(...EXAMPLE_ORIGINS), allowNull: false },
        fileKey: { type: DataTypes.CHAR(64), allowNull: false },
        itemId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'examples' },
    );
  }
}
