import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Fit history of flights: every fit is a new row (a refit never overwrites). */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'fits',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      flight_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'flights', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      job_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: true,
        references: { model: 'jobs', key: 'id' },
        onDelete: 'SET NULL',
        onUpdate: 'CASCADE',
      },
      calibration_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: true,
        references: { model: 'calibrations', key: 'id' },
        onDelete: 'SET NULL',
        onUpdate: 'CASCADE',
      },
      model: { type: DataTypes.STRING(40), allowNull: false },
      engine_version: { type: DataTypes.STRING(40), allowNull: false },
      status: { type: DataTypes.ENUM('fitted', 'needs_attention'), allowNull: false },
      launch_speed_mps: { type: DataTypes.DOUBLE, allowNull: true },
      launch_angle_deg: { type: DataTypes.DOUBLE, allowNull: true },
      carry_m: { type: DataTypes.DOUBLE, allowNull: true },
      warnings: { type: DataTypes.TEXT, allowNull: false },
      params: { type: DataTypes.TEXT, allowNull: false },
      result: { type: DataTypes.TEXT('long'), allowNull: false },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('fits', ['flight_id', 'id'], { name: 'fits_flight_history' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('fits');
};
