import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Collection } from './collection.ts';

export const RUN_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;

/** One execution of the night shift for a collection. */
export class Run extends Model<InferAttributes<Run>, InferCreationAttributes<Run>> {
  declare id: CreationOptional<number>;
  declare collectionId: ForeignKey<Collection['id']>;
  declare trigger: 'schedule' | 'manual';
  declare status: (typeof RUN_STATUSES)[number];
  declare requestedBy: number | null;
  declare startedAt: Date | null;
  declare finishedAt: Date | null;
  declare counts: Record<string, number>;
  declare report: Record<string, unknown> | null;
  declare error: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Run.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        trigger: { type: DataTypes.ENUM('schedule', 'manual'), allowNull: false },
        status: { type: DataTypes.ENUM(...RUN_STATUSES), allowNull: false },
        requestedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        startedAt: { type: DataTypes.DATE(3), allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        counts: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
        report: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'runs' },
    );
  }
}
