import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * One subscription state per club, kept in step with the payment provider by its webhooks.
 * `last_event_at` is the creation time of the newest provider event applied, so an older event arriving
 * late never overwrites a newer state.
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'club_subscriptions',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        unique: true,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
      },
      plan_key: { type: DataTypes.STRING(40), allowNull: true },
      billing_interval: { type: DataTypes.STRING(10), allowNull: true },
      athlete_seats: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      status: { type: DataTypes.STRING(24), allowNull: false },
      trial_ends_at: { type: DataTypes.DATE, allowNull: true },
      current_period_end: { type: DataTypes.DATE, allowNull: true },
      cancel_at_period_end: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      provider_customer_id: { type: DataTypes.STRING(120), allowNull: true, unique: true },
      provider_subscription_id: { type: DataTypes.STRING(120), allowNull: true, unique: true },
      last_event_at: { type: DataTypes.DATE, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('club_subscriptions');
};
