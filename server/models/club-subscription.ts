import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { BillingInterval, PlanKey, SubscriptionStatus } from '../../shared/billing/plans';
import type { Club } from './club';

/** A club's subscription: its trial, or the state the payment provider's webhooks last reported. */
export class ClubSubscription extends Model<InferAttributes<ClubSubscription>, InferCreationAttributes<ClubSubscription>> {
  declare id: CreationOptional<number>;
  declare clubId: ForeignKey<Club['id']>;
  declare planKey: PlanKey | null;
  declare billingInterval: BillingInterval | null;
  declare athleteSeats: number;
  declare status: SubscriptionStatus;
  declare trialEndsAt: Date | null;
  declare currentPeriodEnd: Date | null;
  declare cancelAtPeriodEnd: CreationOptional<boolean>;
  declare providerCustomerId: string | null;
  declare providerSubscriptionId: string | null;
  /** Creation time of the newest provider event applied to this row. */
  declare lastEventAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initClubSubscription(sequelize: Sequelize): typeof ClubSubscription {
  ClubSubscription.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      planKey: { type: DataTypes.STRING(40), allowNull: true },
      billingInterval: { type: DataTypes.STRING(10), allowNull: true },
      athleteSeats: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      status: { type: DataTypes.STRING(24), allowNull: false },
      trialEndsAt: { type: DataTypes.DATE, allowNull: true },
      currentPeriodEnd: { type: DataTypes.DATE, allowNull: true },
      cancelAtPeriodEnd: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      providerCustomerId: { type: DataTypes.STRING(120), allowNull: true },
      providerSubscriptionId: { type: DataTypes.STRING(120), allowNull: true },
      lastEventAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'club_subscriptions', modelName: 'ClubSubscription' },
  );
  return ClubSubscription;
}
