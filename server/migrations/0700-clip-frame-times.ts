import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * Timestamps of a variable-frame-rate clip: each frame's presentation time (JSON array, seconds at
 * the playback rate from frame 0) and the rate they count in, so times come from the frames rather
 * than from frame / rate; and what the upload found odd about them (jumps, repeats).
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.addColumn('clips', 'frame_times', { type: DataTypes.TEXT('long'), allowNull: true });
  await qi.addColumn('clips', 'timestamp_rate', { type: DataTypes.DOUBLE, allowNull: true });
  await qi.addColumn('clips', 'timestamp_warning', { type: DataTypes.TEXT, allowNull: true });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.removeColumn('clips', 'timestamp_warning');
  await qi.removeColumn('clips', 'timestamp_rate');
  await qi.removeColumn('clips', 'frame_times');
};
