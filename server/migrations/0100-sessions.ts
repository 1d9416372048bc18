import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Training or match days with their conditions, all SI (temperature in kelvin). */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'sessions',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      date: { type: DataTypes.DATEONLY, allowNull: false },
      venue: { type: DataTypes.STRING(120), allowNull: false },
      notes: { type: DataTypes.TEXT, allowNull: true },
      air_temperature_k: { type: DataTypes.DOUBLE, allowNull: true },
      air_pressure_pa: { type: DataTypes.DOUBLE, allowNull: true },
      altitude_m: { type: DataTypes.DOUBLE, allowNull: true },
      relative_humidity_pct: { type: DataTypes.DOUBLE, allowNull: true },
      wind_speed_mps: { type: DataTypes.DOUBLE, allowNull: true },
      wind_direction_deg: { type: DataTypes.DOUBLE, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('sessions', ['club_id', 'date'], { name: 'sessions_club_date' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('sessions');
};
