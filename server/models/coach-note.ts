import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import { NOTE_VISIBILITIES, type NoteVisibility } from '../../shared/schemas/note';
import type { User } from './user';

/** A coach's note on a flight or on a session (one of the two ids is set). */
export class CoachNote extends Model<InferAttributes<CoachNote>, InferCreationAttributes<CoachNote>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare flightId: number | null;
  declare sessionId: number | null;
  declare authorUserId: number | null;
  declare body: string;
  declare visibility: NoteVisibility;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare author?: NonAttribute<User | null>;
}

export function initCoachNote(sequelize: Sequelize): typeof CoachNote {
  CoachNote.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      flightId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      sessionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      authorUserId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      body: { type: DataTypes.TEXT, allowNull: false },
      visibility: { type: DataTypes.ENUM(...NOTE_VISIBILITIES), allowNull: false, defaultValue: 'staff' },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'coach_notes', modelName: 'CoachNote' },
  );
  return CoachNote;
}
