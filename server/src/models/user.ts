import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const ROLES = ['admin', 'archivist', 'editor', 'manager'] as const;
export type Role = (typeof ROLES)[number];

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare displayName: string;
  declare role: Role;
  declare passwordHash: string | null;
  declare samlNameId: string | null;
  declare active: CreationOptional<boolean>;
  declare lastSignInAt: Date | null;
  /** optimistic lock for the people admin screen */
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    User.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false, unique: true, validate: { isEmail: true } },
        displayName: { type: DataTypes.STRING(200), allowNull: false },
        role: { type: DataTypes.ENUM(...ROLES), allowNull: false },
        passwordHash: { type: DataTypes.STRING(255), allowNull: true },
        samlNameId: { type: DataTypes.STRING(255), allowNull: true },
        active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        lastSignInAt: { type: DataTypes.DATE(3), allowNull: true },
        version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'users', version: true, defaultScope: { attributes: { exclude: ['passwordHash'] } } },
    );
  }
}
