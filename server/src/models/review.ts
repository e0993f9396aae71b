import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** What OCR read in one item's review-size image, by which engine (a new engine version reads again). */
export class ItemTextRead extends Model<InferAttributes<ItemTextRead>, InferCreationAttributes<ItemTextRead>> {
  declare itemId: number;
  declare engine: string;
  declare text: string | null;
  declare confidence: number | null;
  declare textArea: number | null;
  declare mostlyText: boolean;
  declare error: string | null;
  declare readAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    ItemTextRead.init(
      {
        itemId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        engine: { type: DataTypes.STRING(120), allowNull: false },
        text: { type: DataTypes.TEXT, allowNull: true },
        confidence: { type: DataTypes.FLOAT, allowNull: true },
        textArea: { type: DataTypes.FLOAT, allowNull: true },
        mostlyText: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        error: { type: DataTypes.TEXT, allowNull: true },
        readAt: { type: DataTypes.DATE(3), allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'item_text_reads', timestamps: false },
    );
  }
}

export interface SecondJudgement {
  subjectId: number;
  present: boolean;
  /** the model version whose suggestion the second reviewer answered, when there was one */
  subjectModelId: number | null;
}

/** A blind second review of an item: which subjects the second editor judged present or absent. */
export class SecondReview extends Model<InferAttributes<SecondReview>, InferCreationAttributes<SecondReview>> {
  declare id: CreationOptional<number>;
  declare itemId: number;
  declare reviewerId: number | null;
  declare firstReviewerId: number | null;
  declare judgements: SecondJudgement[];
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    SecondReview.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        itemId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        reviewerId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        firstReviewerId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        judgements: { type: DataTypes.JSON, allowNull: false },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'second_reviews', updatedAt: false },
    );
  }
}
