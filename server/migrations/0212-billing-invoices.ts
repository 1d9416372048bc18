import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** The club's invoices as the provider's invoice events reported them (amounts in whole cents). */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'billing_invoices',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
      },
      provider_invoice_id: { type: DataTypes.STRING(120), allowNull: false, unique: true },
      number: { type: DataTypes.STRING(60), allowNull: true },
      status: { type: DataTypes.STRING(16), allowNull: false },
      amount_cents: { type: DataTypes.INTEGER, allowNull: false },
      currency: { type: DataTypes.STRING(3), allowNull: false },
      period_start: { type: DataTypes.DATE, allowNull: true },
      period_end: { type: DataTypes.DATE, allowNull: true },
      issued_at: { type: DataTypes.DATE, allowNull: false },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('billing_invoices', ['club_id', 'issued_at']);
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('billing_invoices');
};
