import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { Club } from './club';

export const INVOICE_STATUSES = ['paid', 'open', 'failed'] as const;
export type InvoiceStatus = (typeof INVOICE_STATUSES)[number];

/** One of the club's invoices as the provider reported it; amounts in whole cents. */
export class BillingInvoice extends Model<InferAttributes<BillingInvoice>, InferCreationAttributes<BillingInvoice>> {
  declare id: CreationOptional<number>;
  declare clubId: ForeignKey<Club['id']>;
  declare providerInvoiceId: string;
  declare number: string | null;
  declare status: InvoiceStatus;
  declare amountCents: number;
  declare currency: string;
  declare periodStart: Date | null;
  declare periodEnd: Date | null;
  declare issuedAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initBillingInvoice(sequelize: Sequelize): typeof BillingInvoice {
  BillingInvoice.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      providerInvoiceId: { type: DataTypes.STRING(120), allowNull: false },
      number: { type: DataTypes.STRING(60), allowNull: true },
      status: { type: DataTypes.STRING(16), allowNull: false, validate: { isIn: [[...INVOICE_STATUSES]] } },
      amountCents: { type: DataTypes.INTEGER, allowNull: false },
      currency: { type: DataTypes.STRING(3), allowNull: false },
      periodStart: { type: DataTypes.DATE, allowNull: true },
      periodEnd: { type: DataTypes.DATE, allowNull: true },
      issuedAt: { type: DataTypes.DATE, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'billing_invoices', modelName: 'BillingInvoice' },
  );
  return BillingInvoice;
}
