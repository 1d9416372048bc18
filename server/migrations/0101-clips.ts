import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Uploaded videos or frame sets. Files live in storage under `clubs/<club>/clips/<clip>/`. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'clips',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      session_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'sessions', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      label: { type: DataTypes.STRING(120), allowNull: false },
      kind: { type: DataTypes.ENUM('video', 'frames'), allowNull: false },
      original_name: { type: DataTypes.STRING(255), allowNull: false },
      size_bytes: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false },
      source_key: { type: DataTypes.STRING(255), allowNull: false },
      container: { type: DataTypes.STRING(60), allowNull: true },
      codec: { type: DataTypes.STRING(60), allowNull: true },
      width: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      height: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      rotation_deg: { type: DataTypes.SMALLINT, allowNull: false, defaultValue: 0 },
      playback_fps: { type: DataTypes.DOUBLE, allowNull: true },
      capture_fps: { type: DataTypes.DOUBLE, allowNull: false },
      slow_motion: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      frame_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      frames_ready: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      frame_name_pattern: { type: DataTypes.STRING(80), allowNull: true },
      strip: { type: DataTypes.TEXT, allowNull: true },
      status: { type: DataTypes.ENUM('processing', 'ready', 'failed'), allowNull: false, defaultValue: 'processing' },
      failure_reason: { type: DataTypes.TEXT, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('clips', ['club_id', 'session_id'], { name: 'clips_club_session' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('clips');
};
