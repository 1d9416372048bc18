import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** The club's own caution thresholds per action and youth age band; none are shipped. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'workload_thresholds',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'clubs', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
      action: { type: DataTypes.STRING(40), allowNull: false },
      age_band: { type: DataTypes.STRING(8), allowNull: false },
      daily_max: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      weekly_max: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('workload_thresholds', ['club_id', 'action', 'age_band'], { unique: true, name: 'workload_thresholds_club_action_band' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('workload_thresholds');
};
