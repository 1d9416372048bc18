import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Ids of the provider's webhook events already handled: a replayed event is answered and ignored. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'billing_events',
    {
      id: { type: DataTypes.STRING(120), primaryKey: true },
      type: { type: DataTypes.STRING(80), allowNull: false },
      provider_created_at: { type: DataTypes.DATE, allowNull: false },
      created_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('billing_events');
};
