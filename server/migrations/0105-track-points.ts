import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Traced ball centres in pixels, one per frame of a flight; times derive from the clip's capture rate. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'track_points',
    {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      flight_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'flights', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      frame: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      x_px: { type: DataTypes.DOUBLE, allowNull: false },
      y_px: { type: DataTypes.DOUBLE, allowNull: false },
      radius_px: { type: DataTypes.DOUBLE, allowNull: true },
      source: { type: DataTypes.ENUM('manual', 'auto'), allowNull: false, defaultValue: 'manual' },
      confidence: { type: DataTypes.DOUBLE, allowNull: true },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('track_points', ['flight_id', 'frame'], { unique: true, name: 'track_points_flight_frame' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('track_points');
};
