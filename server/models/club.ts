import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { SPORT_FOCUSES, UNITS, type SportFocus, type Units } from '../../shared/schemas/club';

/** A club or team; every other record belongs to exactly one club. */
export class Club extends Model<InferAttributes<Club>, InferCreationAttributes<Club>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare sportFocus: CreationOptional<SportFocus>;
  declare units: CreationOptional<Units>;
  /** IANA time zone of the club's days and weeks. */
  declare timeZone: CreationOptional<string>;
  /** Default flight conditions in SI units (e.g. `{ airTemperatureK, airPressurePa, relativeHumidity }`), or null. */
  declare defaultConditions: Record<string, number> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initClub(sequelize: Sequelize): typeof Club {
  Club.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      sportFocus: { type: DataTypes.STRING(40), allowNull: false, defaultValue: 'multi-sport', validate: { isIn: [[...SPORT_FOCUSES]] } },
      units: { type: DataTypes.ENUM(...UNITS), allowNull: false, defaultValue: 'metric' },
      timeZone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: 'UTC' },
      defaultConditions: { type: DataTypes.JSON, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'clubs', modelName: 'Club' },
  );
  return Club;
}
