import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/**
 * A member's own display units: `club` follows the club's setting (the default), `metric` or `imperial`
 * overrides it for this user in every club. Stored values stay SI; this only changes what is shown.
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.addColumn('users', 'units_preference', { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'club' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.removeColumn('users', 'units_preference');
};
