import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A stored feature vector (float32, little-endian) of an item or an example, tagged with the embedder that made it. */
export class Embedding extends Model<InferAttributes<Embedding>, InferCreationAttributes<Embedding>> {
  declare id: CreationOptional<number>;
  declare ownerType: 'item' | 'example';
  declare ownerId: number;
  declare embedderId: string;
  declare dimension: number;
  declare vector: Buffer;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Embedding.init(
      {
        id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
        ownerType: { type: DataTypes.ENUM('item', 'example'), allowNull: false },
        ownerId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        embedderId: { type: DataTypes.STRING(120), allowNull: false },
        dimension: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
        vector: { type: DataTypes.BLOB('medium'), allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'embeddings' },
    );
  }
}
