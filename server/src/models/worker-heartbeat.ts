import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One row per night-shift worker process; the API reads it to report the worker's state. */
export class WorkerHeartbeat extends Model<InferAttributes<WorkerHeartbeat>, InferCreationAttributes<WorkerHeartbeat>> {
  declare workerId: string;
  declare hostname: string;
  declare pid: number;
  declare startedAt: Date;
  declare heartbeatAt: Date;
  declare stoppedAt: Date | null;
  declare currentJobId: number | null;

  static initModel(sequelize: Sequelize): void {
    WorkerHeartbeat.init(
      {
        workerId: { type: DataTypes.STRING(120), primaryKey: true },
        hostname: { type: DataTypes.STRING(255), allowNull: false },
        pid: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        startedAt: { type: DataTypes.DATE(3), allowNull: false },
        heartbeatAt: { type: DataTypes.DATE(3), allowNull: false },
        stoppedAt: { type: DataTypes.DATE(3), allowNull: true },
        currentJobId: { type: DataTypes.BIGINT.UNSIGNED, allowNull: true },
      },
      { sequelize, tableName: 'worker_heartbeats', timestamps: false },
    );
  }
}
