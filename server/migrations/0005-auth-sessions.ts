import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * Sign-in sessions of express-session, read and written by connect-session-sequelize
 * (model `AuthSession`, see server/http/session.ts). Named apart from the training `sessions` table.
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'auth_sessions',
    {
      sid: { type: DataTypes.STRING(36), primaryKey: true },
      expires: { type: DataTypes.DATE, allowNull: true },
      data: { type: DataTypes.TEXT, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('auth_sessions', ['expires'], { name: 'auth_sessions_expires' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('auth_sessions');
};
