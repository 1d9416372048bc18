/**
 * Jobs as the API shows them: progress polling, lists, and retry of failed jobs.
 * Coaches and admins only (athletes start no jobs).
 */
import { Op, type WhereOptions } from 'sequelize';
import type { Job as JobDto, JobSummary } from '../../shared/schemas/clip';
import { withTransaction } from '../db';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { requeueFailed } from '../jobs/queue';
import { Clip, Job } from '../models';

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

export function toJobSummary(job: Job): JobSummary {
  return { id: job.id, type: job.type, status: job.status, progress: job.progress, error: job.error ?? null };
}

export function toJobDto(job: Job): JobDto {
  return {
    ...toJobSummary(job),
    attempts: job.attempts,
    maxAttempts: job.maxAttempts,
    clipId: job.clipId ?? null,
    flightId: job.flightId ?? null,
    result: job.result ?? null,
    createdAt: iso(job.createdAt) as string,
    startedAt: iso(job.startedAt),
    finishedAt: iso(job.finishedAt),
    updatedAt: iso(job.updatedAt) as string,
  };
}

/** The latest job of each subject (by clip or by flight), optionally of given types. */
export async function latestJobs(by: 'clipId' | 'flightId', ids: number[], types?: string[]): Promise<Map<number, Job>> {
  const out = new Map<number, Job>();
  if (ids.length === 0) return out;
  const where: WhereOptions<Job> = { [by]: { [Op.in]: ids } };
  if (types) Object.assign(where, { type: { [Op.in]: types } });
  const jobs = await Job.findAll({ where, order: [['id', 'DESC']] });
  for (const job of jobs) {
    const key = job[by];
    if (key !== null && !out.has(key)) out.set(key, job);
  }
  return out;
}

async function findJob(club: ClubContext, jobId: number): Promise<Job> {
  const job = await Job.findOne({ where: { id: jobId, clubId: club.id } });
  if (!job) throw notFound('job');
  return job;
}

export async function getJob(club: ClubContext, jobId: number): Promise<JobDto> {
  return toJobDto(await findJob(club, jobId));
}

export async function listJobs(club: ClubContext, query: { clipId?: number; flightId?: number; status?: JobDto['status'] }): Promise<JobDto[]> {
  const where: Record<string, unknown> = { clubId: club.id };
  if (query.clipId) where.clipId = query.clipId;
  if (query.flightId) where.flightId = query.flightId;
  if (query.status) where.status = query.status;
  const jobs = await Job.findAll({ where, order: [['id', 'DESC']], limit: 100 });
  return jobs.map(toJobDto);
}

/**
 * Puts a failed job back in the queue and resets its subject's state (a clip goes back to processing).
 * @throws 409 CONFLICT unless the job failed
 */
export async function retryJob(club: ClubContext, jobId: number): Promise<JobDto> {
  const job = await findJob(club, jobId);
  await withTransaction(async (transaction) => {
    const ok = await requeueFailed(job.id, transaction);
    if (!ok) {
      throw new ApiError('CONFLICT', `Only a failed job can be retried; this one is ${job.status}. Reload to see its state.`);
    }
    if (job.type === 'clip.process' && job.clipId) {
      await Clip.update({ status: 'processing', failureReason: null }, { where: { id: job.clipId }, transaction });
    }
  });
  return toJobDto(await findJob(club, jobId));
}
