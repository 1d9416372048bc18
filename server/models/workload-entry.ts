import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** Reps of an action a coach counted for an athlete on a club-local day, beyond the filmed flights. */
export class WorkloadEntry extends Model<InferAttributes<WorkloadEntry>, InferCreationAttributes<WorkloadEntry>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare athleteProfileId: number;
  declare action: string;
  /** Calendar day in the club's time zone, `YYYY-MM-DD`. */
  declare day: string;
  declare count: number;
  declare note: string | null;
  declare createdByUserId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initWorkloadEntry(sequelize: Sequelize): typeof WorkloadEntry {
  WorkloadEntry.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      athleteProfileId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      action: { type: DataTypes.STRING(40), allowNull: false },
      day: { type: DataTypes.DATEONLY, allowNull: false },
      count: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
      note: { type: DataTypes.STRING(200), allowNull: true },
      createdByUserId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'workload_entries', modelName: 'WorkloadEntry' },
  );
  return WorkloadEntry;
}
