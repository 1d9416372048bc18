import { DataTypes } from 'sequelize';
import type { MigrationFn } from '../migrate';

/** A club's own balls: name, mass, diameter and an optional C_d range; flights name them `club:<id>`. */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.createTable(
    'club_balls',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      club_id: {
        type: DataTypes.INTEGER.UNSIGNED,
        allowNull: false,
        references: { model: 'clubs', key: 'id' },
        onDelete: 'CASCADE',
        onUpdate: 'CASCADE',
      },
      name: { type: DataTypes.STRING(60), allowNull: false },
      mass_kg: { type: DataTypes.DOUBLE, allowNull: false },
      diameter_m: { type: DataTypes.DOUBLE, allowNull: false },
      cd_min: { type: DataTypes.DOUBLE, allowNull: true },
      cd_max: { type: DataTypes.DOUBLE, allowNull: true },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    },
    { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
  );
  await qi.addIndex('club_balls', ['club_id', 'name'], { unique: true, name: 'club_balls_club_name' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.dropTable('club_balls');
};
