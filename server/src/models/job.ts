import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const JOB_STATUSES = ['pending', 'running', 'done', 'failed'] as const;

/** A unit of work for the night-shift worker, claimed with SELECT … FOR UPDATE SKIP LOCKED. */
export class Job extends Model<InferAttributes<Job>, InferCreationAttributes<Job>> {
  declare id: CreationOptional<number>;
  declare kind: string;
  declare payload: Record<string, unknown>;
  declare runId: number | null;
  declare idempotencyKey: string | null;
  declare status: CreationOptional<(typeof JOB_STATUSES)[number]>;
  declare attempts: CreationOptional<number>;
  declare maxAttempts: CreationOptional<number>;
  declare runAfter: CreationOptional<Date>;
  declare leaseUntil: Date | null;
  declare lockedBy: string | null;
  declare progress: Record<string, unknown> | null;
  declare result: Record<string, unknown> | null;
  declare lastError: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Job.init(
      {
        id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
        kind: { type: DataTypes.STRING(60), allowNull: false },
        payload: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        idempotencyKey: { type: DataTypes.STRING(190), allowNull: true, unique: true },
        status: { type: DataTypes.ENUM(...JOB_STATUSES), allowNull: false, defaultValue: 'pending' },
        attempts: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false, defaultValue: 0 },
        maxAttempts: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false, defaultValue: 5 },
        runAfter: { type: DataTypes.DATE(3), allowNull: false, defaultValue: DataTypes.NOW },
        leaseUntil: { type: DataTypes.DATE(3), allowNull: true },
        lockedBy: { type: DataTypes.STRING(120), allowNull: true },
        progress: { type: DataTypes.JSON, allowNull: true },
        result: { type: DataTypes.JSON, allowNull: true },
        lastError: { type: DataTypes.TEXT, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'jobs' },
    );
  }
}
