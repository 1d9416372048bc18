import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'memberships',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      user_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'users', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      role: { type: DataTypes.ENUM('admin', 'coach', 'athlete'), allowNull: false },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('memberships', ['user_id', 'club_id'], { unique: true, name: 'memberships_user_club_unique' });
  await qi.addIndex('memberships', ['club_id', 'role'], { name: 'memberships_club_role' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('memberships');
};
