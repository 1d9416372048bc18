import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import { FLIGHT_STATUSES, type FlightStatus } from '../../shared/schemas/flight';
import type { AthleteProfile } from './athlete-profile';

/**
 * One throw or kick inside a clip. `athleteProfileId` is named as `scopeAthlete()` expects, so an athlete's
 * queries add `{ athleteProfileId }` directly; the API calls it `athleteId`.
 */
export class Flight extends Model<InferAttributes<Flight>, InferCreationAttributes<Flight>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare clipId: number;
  declare athleteProfileId: number;
  declare action: string;
  declare ballId: string;
  declare frameStart: number;
  declare frameEnd: number;
  /** The frame the coach marked as contact or release; null when not marked. */
  declare releaseFrame: CreationOptional<number | null>;
  /** "Released at height H" (m above the ground); null when not given. A marked frame wins over it. */
  declare releaseHeightM: CreationOptional<number | null>;
  declare status: CreationOptional<FlightStatus>;
  declare attentionReason: string | null;
  declare notes: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare athlete?: NonAttribute<AthleteProfile>;
}

export function initFlight(sequelize: Sequelize): typeof Flight {
  Flight.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      clipId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      athleteProfileId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      action: { type: DataTypes.STRING(40), allowNull: false },
      ballId: { type: DataTypes.STRING(64), allowNull: false },
      frameStart: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      frameEnd: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      releaseFrame: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      releaseHeightM: { type: DataTypes.DOUBLE, allowNull: true },
      status: { type: DataTypes.ENUM(...FLIGHT_STATUSES), allowNull: false, defaultValue: 'uploaded' },
      attentionReason: { type: DataTypes.TEXT, allowNull: true },
      notes: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'flights', modelName: 'Flight' },
  );
  return Flight;
}
