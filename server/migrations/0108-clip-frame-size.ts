import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * Size of a clip's extracted frame images. Large clips are cut into scaled-down images for tracing, while
 * points, calibration and auto-follow stay in the clip's own pixels (`width` × `height`).
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.addColumn('clips', 'frame_width', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true });
  await qi.addColumn('clips', 'frame_height', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.removeColumn('clips', 'frame_height');
  await qi.removeColumn('clips', 'frame_width');
};
