import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Reps a coach counted that were not filmed, per athlete, action and club-local day. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'workload_entries',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'clubs', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
      athlete_profile_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'athlete_profiles', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      action: { type: DataTypes.STRING(40), allowNull: false },
      day: { type: DataTypes.DATEONLY, allowNull: false },
      count: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
      note: { type: DataTypes.STRING(200), allowNull: true },
      created_by_user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL', onUpdate: 'CASCADE' },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('workload_entries', ['club_id', 'day'], { name: 'workload_entries_club_day' });
  await qi.addIndex('workload_entries', ['athlete_profile_id', 'day'], { name: 'workload_entries_athlete_day' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('workload_entries');
};
