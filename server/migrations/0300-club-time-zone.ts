import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** The club's IANA time zone: its days and ISO weeks (workload counts) follow it. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.addColumn('clubs', 'time_zone', { type: DataTypes.STRING(64), allowNull: false, defaultValue: 'UTC' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.removeColumn('clubs', 'time_zone');
};
