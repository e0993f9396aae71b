import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const EXPORT_KINDS = ['ledger_xlsx', 'items_csv', 'xmp_zip', 'iiif_manifest'] as const;

/** A requested export (coverage ledger, CSV, XMP sidecars, IIIF manifest) and the stored file it produced. */
export class ExportFile extends Model<InferAttributes<ExportFile>, InferCreationAttributes<ExportFile>> {
  declare id: CreationOptional<number>;
  declare collectionId: number | null;
  declare kind: (typeof EXPORT_KINDS)[number];
  declare periodFrom: string | null;
  declare periodTo: string | null;
  declare status: CreationOptional<'queued' | 'running' | 'ready' | 'failed'>;
  declare fileKey: string | null;
  declare rowCount: number | null;
  declare requestedBy: number | null;
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
        status: { type: DataTypes.ENUM('queued', 'running', 'ready', 'failed'), allowNull: false, defaultValue: 'queued' },
        fileKey: { type: DataTypes.CHAR(64), allowNull: true },
        rowCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        requestedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'exports' },
    );
  }
}
