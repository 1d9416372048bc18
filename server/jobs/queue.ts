/**
 * The job queue on the MariaDB table `jobs`.
 *
 * Claiming: in one transaction a worker selects the oldest claimable row with
 * `SELECT ... FOR UPDATE SKIP LOCKED` (rows another worker is claiming are skipped, never waited on) and
 * marks it running with a lease. A running job whose lease ran out (its worker died or hung) is claimable
 * again; after `maxAttempts` claims it is failed instead. All times are the database's (`NOW(3)`), so
 * workers on several machines need no shared clock.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { JobType } from '../../shared/schemas/clip';
import { sequelize } from '../db';
import { Job } from '../models';
import { jobSettings } from './settings';

export interface EnqueueInput {
  clubId: number;
  type: JobType;
  payload: Record<string, unknown>;
  clipId?: number | null;
  flightId?: number | null;
  maxAttempts?: number;
}

/** Adds a job to the queue (inside the caller's transaction when given, so the job exists only if the rest commits). */
export async function enqueue(input: EnqueueInput, transaction?: Transaction): Promise<Job> {
  return Job.create(
    {
      clubId: input.clubId,
      type: input.type,
      payload: input.payload,
      clipId: input.clipId ?? null,
      flightId: input.flightId ?? null,
      maxAttempts: input.maxAttempts ?? jobSettings.maxAttempts,
      // Database time, like every comparison in the claim.
      runAfter: sequelize.literal('NOW(3)') as unknown as Date,
      leaseUntil: null,
      workerId: null,
      error: null,
      result: null,
      startedAt: null,
      finishedAt: null,
    },
    { transaction },
  );
}

export interface Claim {
  job: Job;
  /** True when the job's lease ran out more often than it may: the worker must fail it, not run it. */
  exhausted: boolean;
}

/**
 * Claims the next job for `workerId` (optionally only of the given types), or null when none is claimable.
 * @param leaseMs how long the claim holds before it must be renewed
 */
export async function claimNext(workerId: string, options: { types?: readonly string[]; leaseMs?: number } = {}): Promise<Claim | null> {
  const leaseMicros = (options.leaseMs ?? jobSettings.leaseMs) * 1000;
  const types = options.types && options.types.length > 0 ? options.types : null;
  return sequelize.transaction(async (transaction) => {
    const rows = await sequelize.query<{ id: number; attempts: number; max_attempts: number; status: string }>(
      `SELECT id, attempts, max_attempts, status FROM jobs
        WHERE ((status = 'queued' AND run_after <= NOW(3)) OR (status = 'running' AND lease_until < NOW(3)))
          ${types ? 'AND type IN (:types)' : ''}
        ORDER BY id
        LIMIT 1
        FOR UPDATE SKIP LOCKED`,
      { type: QueryTypes.SELECT, transaction, replacements: { types } },
    );
    const row = rows[0];
    if (!row) return null;
    const exhausted = row.status === 'running' && row.attempts >= row.max_attempts;
    if (exhausted) {
      // Keep it ours for the failure bookkeeping (cleanup, then fail) without counting another attempt.
      await sequelize.query(
        `UPDATE jobs SET worker_id = :workerId, lease_until = NOW(3) + INTERVAL :leaseMicros MICROSECOND, updated_at = NOW(3) WHERE id = :id`,
        { type: QueryTypes.UPDATE, transaction, replacements: { workerId, leaseMicros, id: row.id } },
      );
    } else {
      await sequelize.query(
        `UPDATE jobs SET status = 'running', worker_id = :workerId, attempts = attempts + 1,
                lease_until = NOW(3) + INTERVAL :leaseMicros MICROSECOND, progress = 0, error = NULL,
                started_at = NOW(3), finished_at = NULL, updated_at = NOW(3)
          WHERE id = :id`,
        { type: QueryTypes.UPDATE, transaction, replacements: { workerId, leaseMicros, id: row.id } },
      );
    }
    const job = await Job.findByPk(row.id, { transaction });
    if (!job) return null;
    return { job, exhausted };
  });
}

async function ownedUpdate(sql: string, replacements: Record<string, unknown>): Promise<boolean> {
  const [, affected] = await sequelize.query(sql, { type: QueryTypes.UPDATE, replacements });
  return Number(affected) > 0;
}

/**
 * Extends the lease and records progress. Returns false when the job is no longer this worker's
 * (its lease ran out and another worker took it, or it was deleted): the caller must stop working on it.
 */
export function renewLease(jobId: number, workerId: string, progress: number | null, leaseMs = jobSettings.leaseMs): Promise<boolean> {
  return ownedUpdate(
    `UPDATE jobs SET lease_until = NOW(3) + INTERVAL :leaseMicros MICROSECOND,
            progress = GREATEST(progress, :progress), updated_at = NOW(3)
      WHERE id = :id AND worker_id = :workerId AND status = 'running'`,
    { id: jobId, workerId, leaseMicros: leaseMs * 1000, progress: progress === null ? 0 : Math.max(0, Math.min(99, Math.floor(progress))) },
  );
}

export function completeJob(jobId: number, workerId: string, result: Record<string, unknown> | null): Promise<boolean> {
  return ownedUpdate(
    `UPDATE jobs SET status = 'done', progress = 100, result = :result, lease_until = NULL, finished_at = NOW(3), updated_at = NOW(3)
      WHERE id = :id AND worker_id = :workerId AND status = 'running'`,
    { id: jobId, workerId, result: result === null ? null : JSON.stringify(result) },
  );
}

export function failJob(jobId: number, workerId: string, reason: string): Promise<boolean> {
  return ownedUpdate(
    `UPDATE jobs SET status = 'failed', error = :reason, lease_until = NULL, finished_at = NOW(3), updated_at = NOW(3)
      WHERE id = :id AND worker_id = :workerId AND status = 'running'`,
    { id: jobId, workerId, reason },
  );
}

/** Hands a job back to the queue without counting the attempt (graceful stop of a worker). */
export function releaseJob(jobId: number, workerId: string): Promise<boolean> {
  return ownedUpdate(
    `UPDATE jobs SET status = 'queued', worker_id = NULL, lease_until = NULL, progress = 0,
            attempts = GREATEST(attempts, 1) - 1, run_after = NOW(3), updated_at = NOW(3)
      WHERE id = :id AND worker_id = :workerId AND status = 'running'`,
    { id: jobId, workerId },
  );
}

/** Puts a failed job back in the queue with a fresh count of attempts. Returns false unless it was failed. */
export function requeueFailed(jobId: number, transaction?: Transaction): Promise<boolean> {
  return sequelize
    .query(
      `UPDATE jobs SET status = 'queued', error = NULL, result = NULL, progress = 0, attempts = 0, worker_id = NULL,
              lease_until = NULL, run_after = NOW(3), started_at = NULL, finished_at = NULL, updated_at = NOW(3)
        WHERE id = :id AND status = 'failed'`,
      { type: QueryTypes.UPDATE, replacements: { id: jobId }, transaction },
    )
    .then(([, affected]) => Number(affected) > 0);
}
