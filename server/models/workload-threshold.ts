import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { AgeBand } from '../../shared/workload/cautions';

/** A club's caution threshold for one action and youth age band (per day, per ISO week, or both). */
export class WorkloadThreshold extends Model<InferAttributes<WorkloadThreshold>, InferCreationAttributes<WorkloadThreshold>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare action: string;
  declare ageBand: AgeBand;
  declare dailyMax: number | null;
  declare weeklyMax: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initWorkloadThreshold(sequelize: Sequelize): typeof WorkloadThreshold {
  WorkloadThreshold.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      action: { type: DataTypes.STRING(40), allowNull: false },
      ageBand: { type: DataTypes.STRING(8), allowNull: false },
      dailyMax: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      weeklyMax: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'workload_thresholds', modelName: 'WorkloadThreshold' },
  );
  return WorkloadThreshold;
}
