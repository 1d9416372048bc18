import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Single-use password-reset links; only the SHA-256 of the link's token is stored. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'password_resets',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      user_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'users', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      token_hash: { type: DataTypes.CHAR(64), allowNull: false },
      expires_at: { type: DataTypes.DATE, allowNull: false },
      used_at: { type: DataTypes.DATE, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('password_resets', ['token_hash'], { unique: true, name: 'password_resets_token_hash_unique' });
  await qi.addIndex('password_resets', ['user_id'], { name: 'password_resets_user' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('password_resets');
};
