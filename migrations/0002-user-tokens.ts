import { DataTypes, literal, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

// Single-use, expiring tokens for invitations and password resets. Only the SHA-256 of a token is stored,
// so a leaked database does not leak working links.
export async function up({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.createTable('user_tokens', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true, allowNull: false },
    user_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    purpose: { type: DataTypes.ENUM('invitation', 'password_reset'), allowNull: false },
    token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE(3), allowNull: false },
    used_at: { type: DataTypes.DATE(3), allowNull: true },
    created_by: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'SET NULL',
      onUpdate: 'CASCADE',
    },
    created_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: literal('CURRENT_TIMESTAMP(3)') },
  });
  await qi.addIndex('user_tokens', ['user_id', 'purpose'], { name: 'user_tokens_user' });
  await qi.addColumn('users', 'version', { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 });
}

export async function down({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.removeColumn('users', 'version');
  await qi.dropTable('user_tokens');
}
