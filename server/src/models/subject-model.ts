import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Subject } from './subject.ts';

export const SYNTHESIS_METHODS = ['prototype', 'regressed', 'photo_augmented', 'refined', 'carried', 'trained'] as const;

/** One version of the classifier synthesized for a subject: weights in feature space, how it was made, how it measured. */
export class SubjectModel extends Model<InferAttributes<SubjectModel>, InferCreationAttributes<SubjectModel>> {
  declare id: CreationOptional<number>;
  declare subjectId: ForeignKey<Subject['id']>;
  declare version: number;
  declare method: (typeof SYNTHESIS_METHODS)[number];
  declare embedderId: string;
  declare dimension: number;
  declare weights: Buffer;
  declare bias: CreationOptional<number>;
  declare calibration: Record<string, unknown> | null;
  declare metrics: Record<string, unknown> | null;
  declare madeFrom: Record<string, unknown>;
  declare active: CreationOptional<boolean>;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    SubjectModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        method: { type: DataTypes.ENUM(...SYNTHESIS_METHODS), allowNull: false },
        embedderId: { type: DataTypes.STRING(120), allowNull: false },
        dimension: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
        weights: { type: DataTypes.BLOB('medium'), allowNull: false },
        bias: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        calibration: { type: DataTypes.JSON, allowNull: true },
        metrics: { type: DataTypes.JSON, allowNull: true },
        madeFrom: { type: DataTypes.JSON, allowNull: false },
        active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'subject_models' },
    );
  }
}
