import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { BallCheck, CalibrationInput } from '../../shared/schemas/calibration';
import { jsonText } from './json-text';

/** One calibration of a clip; the current one has `supersededAt` null, older ones stay for the fits that used them. */
export class Calibration extends Model<InferAttributes<Calibration>, InferCreationAttributes<Calibration>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare clipId: number;
  declare input: CalibrationInput;
  declare metresPerPixel: number;
  declare levelAngleDeg: number;
  declare ballCheck: BallCheck | null;
  declare supersededAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initCalibration(sequelize: Sequelize): typeof Calibration {
  Calibration.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      clipId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      input: jsonText<CalibrationInput>('input', { allowNull: false }),
      metresPerPixel: { type: DataTypes.DOUBLE, allowNull: false },
      levelAngleDeg: { type: DataTypes.DOUBLE, allowNull: false },
      ballCheck: jsonText<BallCheck>('ballCheck', { allowNull: true }),
      supersededAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'calibrations', modelName: 'Calibration' },
  );
  return Calibration;
}
