import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { POINT_SOURCES, type PointSource } from '../../shared/schemas/track';

/** A traced ball centre in pixels (top-left origin, y down) on one 0-based frame of a flight. */
export class TrackPoint extends Model<InferAttributes<TrackPoint>, InferCreationAttributes<TrackPoint>> {
  declare id: CreationOptional<number>;
  declare flightId: number;
  declare frame: number;
  declare xPx: number;
  declare yPx: number;
  declare radiusPx: number | null;
  declare source: CreationOptional<PointSource>;
  /** 0–1 from auto-follow; null for manual points. */
  declare confidence: number | null;
}

export function initTrackPoint(sequelize: Sequelize): typeof TrackPoint {
  TrackPoint.init(
    {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true, get() { return Number(this.getDataValue('id')); } },
      flightId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      frame: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      xPx: { type: DataTypes.DOUBLE, allowNull: false },
      yPx: { type: DataTypes.DOUBLE, allowNull: false },
      radiusPx: { type: DataTypes.DOUBLE, allowNull: true },
      source: { type: DataTypes.ENUM(...POINT_SOURCES), allowNull: false, defaultValue: 'manual' },
      confidence: { type: DataTypes.DOUBLE, allowNull: true },
    },
    { sequelize, tableName: 'track_points', modelName: 'TrackPoint', timestamps: false },
  );
  return TrackPoint;
}
