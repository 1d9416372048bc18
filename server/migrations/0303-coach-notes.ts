import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** Coach notes on a flight or a session (exactly one of the two), private to staff or shared with the athlete. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'coach_notes',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'clubs', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
      flight_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'flights', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
      session_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'sessions', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
      author_user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL', onUpdate: 'CASCADE' },
      body: { type: DataTypes.TEXT, allowNull: false },
      visibility: { type: DataTypes.ENUM('staff', 'shared'), allowNull: false, defaultValue: 'staff' },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('coach_notes', ['flight_id'], { name: 'coach_notes_flight' });
  await qi.addIndex('coach_notes', ['session_id'], { name: 'coach_notes_session' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('coach_notes');
};
