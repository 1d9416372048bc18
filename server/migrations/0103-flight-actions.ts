import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Each club's editable list of actions (punt, long throw, ...); filled with the defaults on first use. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'flight_actions',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      key: { type: DataTypes.STRING(40), allowNull: false },
      label: { type: DataTypes.STRING(60), allowNull: false },
      archived: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      sort_order: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('flight_actions', ['club_id', 'key'], { unique: true, name: 'flight_actions_club_key' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('flight_actions');
};
