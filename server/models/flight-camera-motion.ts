import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { jsonText } from './json-text';

/** One frame's rigid map to the reference frame, compact: `[frame, tx, ty, rotationDeg]` (ref = R·p + t, clip pixels). */
export type StoredCameraMap = [number, number, number, number];

/** The camera motion the latest auto-follow of a flight found, frame by frame, to its reference frame. */
export class FlightCameraMotion extends Model<InferAttributes<FlightCameraMotion>, InferCreationAttributes<FlightCameraMotion>> {
  declare id: CreationOptional<number>;
  declare flightId: number;
  /** The frame the maps lead to: the calibration's frame when the follow ran (else the follow's start frame). */
  declare referenceFrame: number;
  declare maps: StoredCameraMap[];
  declare maxPanPx: number;
  declare maxRollDeg: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initFlightCameraMotion(sequelize: Sequelize): typeof FlightCameraMotion {
  FlightCameraMotion.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      flightId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, unique: true },
      referenceFrame: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      maps: jsonText<StoredCameraMap[]>('maps', { allowNull: false, long: true }),
      maxPanPx: { type: DataTypes.DOUBLE, allowNull: false },
      maxRollDeg: { type: DataTypes.DOUBLE, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'flight_camera_motions', modelName: 'FlightCameraMotion' },
  );
  return FlightCameraMotion;
}
