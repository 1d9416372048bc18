import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { FitWarning } from '../../shared/schemas/flight';
import { jsonText } from './json-text';

/** One fit of a flight by the physics engine. Rows are only added: the history is the record of every refit. */
export class Fit extends Model<InferAttributes<Fit>, InferCreationAttributes<Fit>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare flightId: number;
  declare jobId: number | null;
  declare calibrationId: number | null;
  declare model: string;
  declare engineVersion: string;
  declare status: 'fitted' | 'needs_attention';
  declare launchSpeedMps: number | null;
  declare launchAngleDeg: number | null;
  declare carryM: number | null;
  declare warnings: FitWarning[];
  declare params: Record<string, unknown>;
  declare result: Record<string, unknown>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initFit(sequelize: Sequelize): typeof Fit {
  Fit.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      flightId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      jobId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      calibrationId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      model: { type: DataTypes.STRING(40), allowNull: false },
      engineVersion: { type: DataTypes.STRING(40), allowNull: false },
      status: { type: DataTypes.ENUM('fitted', 'needs_attention'), allowNull: false },
      launchSpeedMps: { type: DataTypes.DOUBLE, allowNull: true },
      launchAngleDeg: { type: DataTypes.DOUBLE, allowNull: true },
      carryM: { type: DataTypes.DOUBLE, allowNull: true },
      warnings: jsonText<FitWarning[]>('warnings', { allowNull: false }),
      params: jsonText<Record<string, unknown>>('params', { allowNull: false }),
      result: jsonText<Record<string, unknown>>('result', { allowNull: false, long: true }),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'fits', modelName: 'Fit' },
  );
  return Fit;
}
