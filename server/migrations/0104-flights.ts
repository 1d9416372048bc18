import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Throws and kicks inside clips. An athlete profile with flights cannot be deleted (RESTRICT): nothing goes silently. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'flights',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      clip_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clips', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      athlete_profile_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'athlete_profiles', key: 'id' },
        onDelete: 'RESTRICT',
        onUpdate: 'CASCADE',
      },
      action: { type: DataTypes.STRING(40), allowNull: false },
      ball_id: { type: DataTypes.STRING(64), allowNull: false },
      frame_start: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      frame_end: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      status: {
        type: DataTypes.ENUM('uploaded', 'traced', 'fitted', 'reviewed', 'needs_attention'),
        allowNull: false,
        defaultValue: 'uploaded',
      },
      attention_reason: { type: DataTypes.TEXT, allowNull: true },
      notes: { type: DataTypes.TEXT, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('flights', ['club_id', 'clip_id'], { name: 'flights_club_clip' });
  await qi.addIndex('flights', ['club_id', 'athlete_profile_id'], { name: 'flights_club_athlete' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('flights');
};
