import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'athlete_profiles',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      user_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: true,
        references: { model: 'users', key: 'id' },
        onDelete: 'SET NULL',
        onUpdate: 'CASCADE',
      },
      display_name: { type: DataTypes.STRING(80), allowNull: false },
      birth_year: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      dominant_side: { type: DataTypes.ENUM('left', 'right', 'both'), allowNull: true },
      position: { type: DataTypes.STRING(80), allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  // Note: MariaDB lets several rows share a NULL user_id under this unique index, as profiles without sign-in need.
  await qi.addIndex('athlete_profiles', ['club_id', 'user_id'], { unique: true, name: 'athlete_profiles_club_user_unique' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('athlete_profiles');
};
