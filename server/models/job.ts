import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { JOB_STATUSES, type JobStatus, type JobType } from '../../shared/schemas/clip';
import { jsonText } from './json-text';

/**
 * A unit of background work. Claimed by workers with row locks (see server/jobs/queue.ts);
 * `leaseUntil` and `runAfter` are database times, so several machines need no shared clock.
 */
export class Job extends Model<InferAttributes<Job>, InferCreationAttributes<Job>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare type: JobType;
  declare payload: Record<string, unknown>;
  declare status: CreationOptional<JobStatus>;
  declare progress: CreationOptional<number>;
  declare attempts: CreationOptional<number>;
  declare maxAttempts: CreationOptional<number>;
  declare runAfter: CreationOptional<Date>;
  declare leaseUntil: Date | null;
  declare workerId: string | null;
  declare error: string | null;
  declare result: Record<string, unknown> | null;
  declare clipId: number | null;
  declare flightId: number | null;
  declare startedAt: Date | null;
  declare finishedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initJob(sequelize: Sequelize): typeof Job {
  Job.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      type: { type: DataTypes.STRING(40), allowNull: false },
      payload: jsonText<Record<string, unknown>>('payload', { allowNull: false }),
      status: { type: DataTypes.ENUM(...JOB_STATUSES), allowNull: false, defaultValue: 'queued' },
      progress: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 0 },
      attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
      maxAttempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 3 },
      runAfter: { type: DataTypes.DATE(3), allowNull: false, defaultValue: DataTypes.NOW },
      leaseUntil: { type: DataTypes.DATE(3), allowNull: true },
      workerId: { type: DataTypes.STRING(120), allowNull: true },
      error: { type: DataTypes.TEXT, allowNull: true },
      result: jsonText<Record<string, unknown>>('result', { allowNull: true }),
      clipId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      flightId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      startedAt: { type: DataTypes.DATE(3), allowNull: true },
      finishedAt: { type: DataTypes.DATE(3), allowNull: true },
      createdAt: DataTypes.DATE(3),
      updatedAt: DataTypes.DATE(3),
    },
    { sequelize, tableName: 'jobs', modelName: 'Job' },
  );
  return Job;
}
