import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import { ROLES, type Role } from '../../shared/types/api';
import type { Club } from './club';
import type { User } from './user';

/** A user's role in one club (unique per user and club). */
export class Membership extends Model<InferAttributes<Membership>, InferCreationAttributes<Membership>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<User['id']>;
  declare clubId: ForeignKey<Club['id']>;
  declare role: Role;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare user?: NonAttribute<User>;
  declare club?: NonAttribute<Club>;
}

export function initMembership(sequelize: Sequelize): typeof Membership {
  Membership.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      role: { type: DataTypes.ENUM(...ROLES), allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    {
      sequelize,
      tableName: 'memberships',
      modelName: 'Membership',
      indexes: [{ unique: true, fields: ['user_id', 'club_id'] }],
    },
  );
  return Membership;
}
