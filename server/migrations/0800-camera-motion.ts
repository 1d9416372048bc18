import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * A camera that moved while filming: the coach's "camera was still" on a clip (auto-follow then skips the
 * estimate), and the camera motion auto-follow found for a flight, one rigid map per frame to the frame the
 * calibration was marked on (JSON `[frame, tx, ty, rotationDeg]` rows), with its largest pan and roll.
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.addColumn('clips', 'camera_still', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });
  await qi.createTable(
    'flight_camera_motions',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      flight_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        unique: true,
        references: { model: 'flights', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      reference_frame: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      maps: { type: DataTypes.TEXT('long'), allowNull: false },
      max_pan_px: { type: DataTypes.DOUBLE, allowNull: false },
      max_roll_deg: { type: DataTypes.DOUBLE, allowNull: false },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('flight_camera_motions');
  await qi.removeColumn('clips', 'camera_still');
};
