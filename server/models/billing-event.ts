import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A provider webhook event already handled, by the provider's event id. */
export class BillingEvent extends Model<InferAttributes<BillingEvent>, InferCreationAttributes<BillingEvent>> {
  declare id: string;
  declare type: string;
  declare providerCreatedAt: Date;
  declare createdAt: CreationOptional<Date>;
}

export function initBillingEvent(sequelize: Sequelize): typeof BillingEvent {
  BillingEvent.init(
    {
      id: { type: DataTypes.STRING(120), primaryKey: true },
      type: { type: DataTypes.STRING(80), allowNull: false },
      providerCreatedAt: { type: DataTypes.DATE, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'billing_events', modelName: 'BillingEvent', updatedAt: false },
  );
  return BillingEvent;
}
