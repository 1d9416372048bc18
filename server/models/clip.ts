import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ClipStatus } from '../../shared/schemas/clip';
import { jsonText } from './json-text';

/** Layout of a clip's thumbnail strip as stored (the API adds its URL). */
export interface StoredStrip {
  tileCount: number;
  tileWidth: number;
  tileHeight: number;
  frames: number[];
}

/**
 * An uploaded video or frame set. `sourceKey` is the storage key of the video file, or the storage prefix of the frames.
 * Frame indices are 0-based; every time derives from `captureFps` (t = frame / captureFps), never from the playback rate.
 */
export class Clip extends Model<InferAttributes<Clip>, InferCreationAttributes<Clip>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare sessionId: number;
  declare label: string;
  declare kind: 'video' | 'frames';
  declare originalName: string;
  declare sizeBytes: number;
  declare sourceKey: string;
  declare container: string | null;
  declare codec: string | null;
  /** The clip's own picture size after rotation: points, calibration and auto-follow use these pixels. */
  declare width: number;
  declare height: number;
  declare rotationDeg: CreationOptional<number>;
  declare playbackFps: number | null;
  declare captureFps: number;
  declare slowMotion: CreationOptional<boolean>;
  declare frameCount: number | null;
  /** Size of the extracted frame images (scaled down for large clips); null until extracted. */
  declare frameWidth: number | null;
  declare frameHeight: number | null;
  declare framesReady: CreationOptional<boolean>;
  /** printf-style name of the extracted frame files, e.g. `frame-%06d.jpg`; the number is the 0-based frame index. */
  declare frameNamePattern: string | null;
  declare strip: StoredStrip | null;
  /** A variable-rate clip's frame presentation times (seconds at the playback rate from frame 0); null for a constant rate. */
  declare frameTimes: CreationOptional<number[] | null>;
  /** The rate those timestamps count in (the stream's nominal rate). */
  declare timestampRate: CreationOptional<number | null>;
  /** What the upload found odd about the timestamps (jumps, repeats), in words for the coach. */
  declare timestampWarning: CreationOptional<string | null>;
  /** The coach says the camera did not move: auto-follow skips the camera-motion estimate. */
  declare cameraStill: CreationOptional<boolean>;
  declare status: CreationOptional<ClipStatus>;
  declare failureReason: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initClip(sequelize: Sequelize): typeof Clip {
  Clip.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      sessionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      label: { type: DataTypes.STRING(120), allowNull: false },
      kind: { type: DataTypes.ENUM('video', 'frames'), allowNull: false },
      originalName: { type: DataTypes.STRING(255), allowNull: false },
      sizeBytes: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false, get() { return Number(this.getDataValue('sizeBytes')); } },
      sourceKey: { type: DataTypes.STRING(255), allowNull: false },
      container: { type: DataTypes.STRING(60), allowNull: true },
      codec: { type: DataTypes.STRING(60), allowNull: true },
      width: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      height: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      rotationDeg: { type: DataTypes.SMALLINT, allowNull: false, defaultValue: 0 },
      playbackFps: { type: DataTypes.DOUBLE, allowNull: true },
      captureFps: { type: DataTypes.DOUBLE, allowNull: false },
      slowMotion: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      frameCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      frameWidth: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      frameHeight: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      framesReady: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      frameNamePattern: { type: DataTypes.STRING(80), allowNull: true },
      strip: jsonText<StoredStrip>('strip', { allowNull: true }),
      frameTimes: jsonText<number[]>('frameTimes', { allowNull: true, long: true }),
      timestampRate: { type: DataTypes.DOUBLE, allowNull: true },
      timestampWarning: { type: DataTypes.TEXT, allowNull: true },
      cameraStill: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      status: { type: DataTypes.ENUM('processing', 'ready', 'failed'), allowNull: false, defaultValue: 'processing' },
      failureReason: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'clips', modelName: 'Clip' },
  );
  return Clip;
}
