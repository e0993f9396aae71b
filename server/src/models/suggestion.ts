import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize, type Transaction } from 'sequelize';
import type { Item } from './item.ts';
import { refreshReviewMargins } from './review-margin.ts';
import type { Subject } from './subject.ts';

export const SUGGESTION_STATES = ['proposed', 'accepted', 'rejected', 'added'] as const;
export type SuggestionState = (typeof SUGGESTION_STATES)[number];

export class Suggestion extends Model<InferAttributes<Suggestion>, InferCreationAttributes<Suggestion>> {
  declare id: CreationOptional<number>;
  declare itemId: ForeignKey<Item['id']>;
  declare subjectId: ForeignKey<Subject['id']>;
  declare subjectModelId: number | null;
  declare runId: number | null;
  declare score: number | null;
  declare probability: number | null;
  declare state: SuggestionState;
  declare decidedBy: number | null;
  declare decidedAt: Date | null;
  /** optimistic lock: every update checks and bumps it */
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Suggestion.init(
      {
        id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
        subjectModelId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        score: { type: DataTypes.DOUBLE, allowNull: true },
        probability: { type: DataTypes.DOUBLE, allowNull: true, validate: { min: 0, max: 1 } },
        state: { type: DataTypes.ENUM(...SUGGESTION_STATES), allowNull: false },
        decidedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        decidedAt: { type: DataTypes.DATE(3), allowNull: true },
        version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'suggestions', version: true },
    );
    // the item's place in the review queue follows its proposals (models/review-margin.ts)
    const refresh = (rows: readonly Suggestion[], transaction?: Transaction | null) => refreshReviewMargins(sequelize, rows.map((r) => r.itemId), transaction);
    Suggestion.afterCreate((row, options) => refresh([row], options.transaction));
    Suggestion.afterBulkCreate((rows, options) => refresh(rows, options.transaction));
    Suggestion.afterDestroy((row, options) => refresh([row], options.transaction));
    Suggestion.afterUpdate((row, options) => refresh([row], options.transaction));
  }
}
