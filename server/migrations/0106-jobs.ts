import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * The job queue. Workers claim rows with `SELECT ... FOR UPDATE SKIP LOCKED` and hold a lease
 * (`lease_until`, database time) that they renew while running; an expired lease makes the job claimable again.
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'jobs',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      type: { type: DataTypes.STRING(40), allowNull: false },
      payload: { type: DataTypes.TEXT, allowNull: false },
      status: { type: DataTypes.ENUM('queued', 'running', 'done', 'failed'), allowNull: false, defaultValue: 'queued' },
      progress: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 0 },
      attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
      max_attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 3 },
      run_after: { type: DataTypes.DATE(3), allowNull: false },
      lease_until: { type: DataTypes.DATE(3), allowNull: true },
      worker_id: { type: DataTypes.STRING(120), allowNull: true },
      error: { type: DataTypes.TEXT, allowNull: true },
      result: { type: DataTypes.TEXT, allowNull: true },
      clip_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: true,
        references: { model: 'clips', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      flight_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: true,
        references: { model: 'flights', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      started_at: { type: DataTypes.DATE(3), allowNull: true },
      finished_at: { type: DataTypes.DATE(3), allowNull: true },
      created_at: { type: DataTypes.DATE(3), allowNull: false },
      updated_at: { type: DataTypes.DATE(3), allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('jobs', ['status', 'run_after'], { name: 'jobs_claim_queued' });
  await qi.addIndex('jobs', ['status', 'lease_until'], { name: 'jobs_claim_expired' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('jobs');
};
