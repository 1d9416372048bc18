import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * Invitations by e-mail to join a club. Only the SHA-256 of the link's token is stored; "expired" is
 * not stored but read from `expires_at` of a pending row.
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'invitations',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      email: { type: DataTypes.STRING(254), allowNull: false },
      role: { type: DataTypes.ENUM('admin', 'coach', 'athlete'), allowNull: false },
      athlete_profile_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: true,
        references: { model: 'athlete_profiles', key: 'id' },
        onDelete: 'SET NULL',
        onUpdate: 'CASCADE',
      },
      invited_by_user_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: true,
        references: { model: 'users', key: 'id' },
        onDelete: 'SET NULL',
        onUpdate: 'CASCADE',
      },
      token_hash: { type: DataTypes.CHAR(64), allowNull: false },
      status: { type: DataTypes.ENUM('pending', 'accepted', 'revoked'), allowNull: false, defaultValue: 'pending' },
      expires_at: { type: DataTypes.DATE, allowNull: false },
      sent_at: { type: DataTypes.DATE, allowNull: false },
      accepted_at: { type: DataTypes.DATE, allowNull: true },
      accepted_user_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: true,
        references: { model: 'users', key: 'id' },
        onDelete: 'SET NULL',
        onUpdate: 'CASCADE',
      },
      revoked_at: { type: DataTypes.DATE, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('invitations', ['token_hash'], { unique: true, name: 'invitations_token_hash_unique' });
  await qi.addIndex('invitations', ['club_id', 'status'], { name: 'invitations_club_status' });
  await qi.addIndex('invitations', ['club_id', 'email'], { name: 'invitations_club_email' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('invitations');
};
