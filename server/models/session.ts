import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A training or match day of a club, with its conditions in SI units (temperature in kelvin). */
export class Session extends Model<InferAttributes<Session>, InferCreationAttributes<Session>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  /** Calendar day, `YYYY-MM-DD`. */
  declare date: string;
  declare venue: string;
  declare notes: string | null;
  declare airTemperatureK: number | null;
  declare airPressurePa: number | null;
  declare altitudeM: number | null;
  declare relativeHumidityPct: number | null;
  declare windSpeedMps: number | null;
  /** Direction the wind blows towards, relative to the direction of play (0 = tailwind). */
  declare windDirectionDeg: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initSession(sequelize: Sequelize): typeof Session {
  Session.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      date: { type: DataTypes.DATEONLY, allowNull: false },
      venue: { type: DataTypes.STRING(120), allowNull: false },
      notes: { type: DataTypes.TEXT, allowNull: true },
      airTemperatureK: { type: DataTypes.DOUBLE, allowNull: true },
      airPressurePa: { type: DataTypes.DOUBLE, allowNull: true },
      altitudeM: { type: DataTypes.DOUBLE, allowNull: true },
      relativeHumidityPct: { type: DataTypes.DOUBLE, allowNull: true },
      windSpeedMps: { type: DataTypes.DOUBLE, allowNull: true },
      windDirectionDeg: { type: DataTypes.DOUBLE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'sessions', modelName: 'Session' },
  );
  return Session;
}
