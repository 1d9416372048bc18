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
import { DOMINANT_SIDES, type DominantSide } from '../../shared/schemas/club';
import type { Club } from './club';
import type { User } from './user';

/**
 * An athlete of a club. `userId` links the profile to a member who signs in as an athlete;
 * profiles without sign-in (null userId) are kept by coaches.
 */
export class AthleteProfile extends Model<InferAttributes<AthleteProfile>, InferCreationAttributes<AthleteProfile>> {
  declare id: CreationOptional<number>;
  declare clubId: ForeignKey<Club['id']>;
  declare userId: ForeignKey<User['id']> | null;
  declare displayName: string;
  /** Used for youth workload cautions. */
  declare birthYear: number | null;
  declare dominantSide: DominantSide | null;
  /** Position or event, free text ("punter", "javelin"). */
  declare position: string | null;
  /** Usual release height of the athlete's throws (m above the ground), offered for their flights. */
  declare releaseHeightM: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare club?: NonAttribute<Club>;
  declare user?: NonAttribute<User | null>;
}

export function initAthleteProfile(sequelize: Sequelize): typeof AthleteProfile {
  AthleteProfile.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      displayName: { type: DataTypes.STRING(80), allowNull: false },
      birthYear: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      dominantSide: { type: DataTypes.ENUM(...DOMINANT_SIDES), allowNull: true },
      position: { type: DataTypes.STRING(80), allowNull: true },
      releaseHeightM: { type: DataTypes.DOUBLE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    {
      sequelize,
      tableName: 'athlete_profiles',
      modelName: 'AthleteProfile',
      indexes: [{ unique: true, fields: ['club_id', 'user_id'] }],
    },
  );
  return AthleteProfile;
}
