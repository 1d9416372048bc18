import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * Calibrations of clips. A recalibration adds a row and marks the previous one superseded, so a fit can
 * name the calibration it used; the current calibration is the clip's row with `superseded_at` NULL.
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'calibrations',
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
      input: { type: DataTypes.TEXT, allowNull: false },
      metres_per_pixel: { type: DataTypes.DOUBLE, allowNull: false },
      level_angle_deg: { type: DataTypes.DOUBLE, allowNull: false },
      ball_check: { type: DataTypes.TEXT, allowNull: true },
      superseded_at: { type: DataTypes.DATE, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('calibrations', ['clip_id', 'superseded_at'], { name: 'calibrations_clip_current' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('calibrations');
};
