import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'clubs',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      sport_focus: { type: DataTypes.STRING(40), allowNull: false, defaultValue: 'multi-sport' },
      units: { type: DataTypes.ENUM('metric', 'imperial'), allowNull: false, defaultValue: 'metric' },
      default_conditions: { type: DataTypes.JSON, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('clubs');
};
