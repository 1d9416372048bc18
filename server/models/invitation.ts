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
import { INVITATION_STATUSES, type InvitationStatus } from '../../shared/schemas/invitation';
import { ROLES, type Role } from '../../shared/types/api';
import type { AthleteProfile } from './athlete-profile';
import type { Club } from './club';
import type { User } from './user';

/**
 * An invitation to join a club by e-mail. `tokenHash` is the SHA-256 (hex) of the token in the link, which
 * itself is never stored. A pending invitation past `expiresAt` is expired.
 */
export class Invitation extends Model<InferAttributes<Invitation>, InferCreationAttributes<Invitation>> {
  declare id: CreationOptional<number>;
  declare clubId: ForeignKey<Club['id']>;
  /** Stored lower-cased and trimmed. */
  declare email: string;
  declare role: Role;
  /** The athlete profile the invitee takes over on accepting (athlete invitations only). */
  declare athleteProfileId: ForeignKey<AthleteProfile['id']> | null;
  declare invitedByUserId: ForeignKey<User['id']> | null;
  declare tokenHash: string;
  declare status: CreationOptional<InvitationStatus>;
  declare expiresAt: Date;
  /** When the e-mail was last sent (creation or resend). */
  declare sentAt: Date;
  declare acceptedAt: CreationOptional<Date | null>;
  declare acceptedUserId: CreationOptional<ForeignKey<User['id']> | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare club?: NonAttribute<Club>;
  declare invitedBy?: NonAttribute<User | null>;
  declare athleteProfile?: NonAttribute<AthleteProfile | null>;
}

export function initInvitation(sequelize: Sequelize): typeof Invitation {
  Invitation.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      email: { type: DataTypes.STRING(254), allowNull: false },
      role: { type: DataTypes.ENUM(...ROLES), allowNull: false },
      tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
      status: { type: DataTypes.ENUM(...INVITATION_STATUSES), allowNull: false, defaultValue: 'pending' },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      sentAt: { type: DataTypes.DATE, allowNull: false },
      acceptedAt: { type: DataTypes.DATE, allowNull: true },
      acceptedUserId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      revokedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'invitations', modelName: 'Invitation' },
  );
  return Invitation;
}
