import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * A flight's release (the frame the coach marks as contact or release, or "released at height H"), and an
 * athlete's usual release height for throws, which the Trace screen offers for the flight.
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.addColumn('flights', 'release_frame', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true });
  await qi.addColumn('flights', 'release_height_m', { type: DataTypes.DOUBLE, allowNull: true });
  await qi.addColumn('athlete_profiles', 'release_height_m', { type: DataTypes.DOUBLE, allowNull: true });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.removeColumn('athlete_profiles', 'release_height_m');
  await qi.removeColumn('flights', 'release_height_m');
  await qi.removeColumn('flights', 'release_frame');
};
