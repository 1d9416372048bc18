import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'users',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      email: { type: DataTypes.STRING(254), allowNull: false },
      password_hash: { type: DataTypes.STRING(255), allowNull: true },
      google_sub: { type: DataTypes.STRING(255), allowNull: true },
      display_name: { type: DataTypes.STRING(80), allowNull: false },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('users', ['email'], { unique: true, name: 'users_email_unique' });
  await qi.addIndex('users', ['google_sub'], { unique: true, name: 'users_google_sub_unique' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('users');
};
