import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Collection } from './collection.ts';

export const ITEM_STATES = ['new', 'suggested', 'approved'] as const;
export type ItemState = (typeof ITEM_STATES)[number];

export class Item extends Model<InferAttributes<Item>, InferCreationAttributes<Item>> {
  declare id: CreationOptional<number>;
  declare collectionId: ForeignKey<Collection['id']>;
  declare identifier: string;
  declare fileName: string;
  declare fileKey: string | null;
  /** storage key of the thumbnail (about 320 px on its long side), made at intake */
  declare thumbKey: CreationOptional<string | null>;
  /** storage key of the review-size image (about 1600 px on its long side), made at intake */
  declare viewKey: CreationOptional<string | null>;
  declare mimeType: string | null;
  declare width: number | null;
  declare height: number | null;
  declare byteSize: number | null;
  declare caption: string | null;
  declare creator: string | null;
  declare dateText: string | null;
  declare rights: string | null;
  declare captionFlagged: CreationOptional<boolean>;
  declare captionFlagNote: string | null;
  declare state: CreationOptional<ItemState>;
  declare altText: string | null;
  declare longDescription: string | null;
  declare decorative: CreationOptional<boolean>;
  declare ocrText: string | null;
  declare approvedBy: number | null;
  declare approvedAt: Date | null;
  /** optimistic lock: every update checks and bumps it */
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Item.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        identifier: { type: DataTypes.STRING(120), allowNull: false },
        fileName: { type: DataTypes.STRING(255), allowNull: false },
        fileKey: { type: DataTypes.CHAR(64), allowNull: true },
        thumbKey: { type: DataTypes.CHAR(64), allowNull: true },
        viewKey: { type: DataTypes.CHAR(64), allowNull: true },
        mimeType: { type: DataTypes.STRING(60), allowNull: true },
        width: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        height: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        byteSize: { type: DataTypes.BIGINT.UNSIGNED, allowNull: true },
        caption: { type: DataTypes.TEXT, allowNull: true },
        creator: { type: DataTypes.STRING(300), allowNull: true },
        dateText: { type: DataTypes.STRING(100), allowNull: true },
        rights: { type: DataTypes.STRING(500), allowNull: true },
        captionFlagged: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        captionFlagNote: { type: DataTypes.TEXT, allowNull: true },
        state: { type: DataTypes.ENUM(...ITEM_STATES), allowNull: false, defaultValue: 'new' },
        altText: { type: DataTypes.TEXT, allowNull: true },
        longDescription: { type: DataTypes.TEXT, allowNull: true },
        decorative: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        ocrText: { type: DataTypes.TEXT, allowNull: true },
        approvedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        approvedAt: { type: DataTypes.DATE(3), allowNull: true },
        version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'items', version: true },
    );
  }
}
