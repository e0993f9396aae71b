import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

import { EXPORT_KINDS, EXPORT_STATUSES, type ExportKind, type ExportStatus } from '../../../common/api/exports.ts';

export { EXPORT_KINDS, EXPORT_STATUSES, type ExportKind, type ExportStatus };

/** A requested export (coverage ledger, CSV, XMP sidecars, IIIF manifest) and the stored file it produced. */
export class ExportFile extends Model<InferAttributes<ExportFile>, InferCreationAttributes<ExportFile>> {
  declare id: CreationOptional<number>;
  declare collectionId: number | null;
  declare kind: ExportKind;
  /** first day of the period (inclusive, in the collection's time zone); null: from the beginning */
  declare periodFrom: string | null;
  /** last day of the period (inclusive); null: up to when the export is built */
  declare periodTo: string | null;
  declare status: CreationOptional<ExportStatus>;
  declare fileKey: string | null;
  declare fileName: CreationOptional<string | null>;
  declare byteSize: CreationOptional<number | null>;
  declare rowCount: number | null;
  declare requestedBy: number | null;
  /** the job that builds it (one export per job, so a retried job finds its export again) */
  declare jobId: CreationOptional<number | null>;
  declare trigger: CreationOptional<'manual' | 'weekly'>;
  /** when the weekly ledger mail with this file was sent */
  declare mailedAt: CreationOptional<Date | null>;
  declare error: string | null;
  declare finishedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    ExportFile.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        collectionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        kind: { type: DataTypes.ENUM(...EXPORT_KINDS), allowNull: false },
        periodFrom: { type: DataTypes.DATEONLY, allowNull: true },
        periodTo: { type: DataTypes.DATEONLY, allowNull: true },
        status: { type: DataTypes.ENUM(...EXPORT_STATUSES), allowNull: false, defaultValue: 'queued' },
        fileKey: { type: DataTypes.CHAR(64), allowNull: true },
        fileName: { type: DataTypes.STRING(255), allowNull: true },
        byteSize: { type: DataTypes.BIGINT.UNSIGNED, allowNull: true },
        rowCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        requestedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        jobId: { type: DataTypes.BIGINT.UNSIGNED, allowNull: true },
        trigger: { type: DataTypes.ENUM('manual', 'weekly'), allowNull: false, defaultValue: 'manual' },
        mailedAt: { type: DataTypes.DATE(3), allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'exports' },
    );
  }
}

/** When the weekly coverage-ledger mail goes to a collection's managers. No row: the defaults below. */
export class LedgerMailSetting extends Model<InferAttributes<LedgerMailSetting>, InferCreationAttributes<LedgerMailSetting>> {
  declare collectionId: number;
  declare enabled: boolean;
  /** ISO weekday, 1 Monday … 7 Sunday */
  declare weekday: number;
  declare hour: number;
  declare updatedBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    LedgerMailSetting.init(
      {
        collectionId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        weekday: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 1, validate: { min: 1, max: 7 } },
        hour: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 7, validate: { min: 0, max: 23 } },
        updatedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'ledger_mail_settings' },
    );
  }
}

export const LEDGER_MAIL_DEFAULTS = { enabled: true, weekday: 1, hour: 7 } as const;
