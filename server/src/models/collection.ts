import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class Collection extends Model<InferAttributes<Collection>, InferCreationAttributes<Collection>> {
  declare id: CreationOptional<number>;
  declare slug: string;
  declare name: string;
  declare description: string;
  declare medium: string;
  declare altTextLanguage: CreationOptional<string>;
  declare altTextMaxLength: CreationOptional<number>;
  declare houseStyle: string;
  declare scheduleCron: CreationOptional<string>;
  declare scheduleTimezone: CreationOptional<string>;
  declare scheduleEnabled: CreationOptional<boolean>;
  declare dropFolder: string | null;
  /** the night shift reads the text in this collection's scans (OCR) */
  declare readText: CreationOptional<boolean>;
  declare archivedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Collection.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        slug: { type: DataTypes.STRING(80), allowNull: false, unique: true, validate: { is: /^[a-z0-9]+(?:-[a-z0-9]+)*$/ } },
        name: { type: DataTypes.STRING(200), allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false },
        medium: { type: DataTypes.STRING(60), allowNull: false },
        altTextLanguage: { type: DataTypes.STRING(35), allowNull: false, defaultValue: 'en' },
        altTextMaxLength: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false, defaultValue: 125 },
        houseStyle: { type: DataTypes.TEXT, allowNull: false },
        scheduleCron: { type: DataTypes.STRING(100), allowNull: false, defaultValue: '0 2 * * *' },
        scheduleTimezone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: 'UTC' },
        scheduleEnabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        dropFolder: { type: DataTypes.STRING(1000), allowNull: true },
        readText: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        archivedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'collections' },
    );
  }
}
