import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import type { JobType } from '../../../shared/schemas/clip';
import { claimNext, enqueue, renewLease } from '../../../server/jobs/queue';
import { JobFailure, type JobHandler } from '../../../server/jobs/types';
import { JobWorker } from '../../../server/jobs/worker';
import { Job, sequelize } from '../../../server/models';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { clubPath } from './helpers';

let fx: ClubFixture;

// Test-only job types keep these jobs apart from any other test's queued jobs.
let typeSeq = 0;
function freshType(): JobType {
  typeSeq++;
  return `test.q${Date.now().toString(36)}${typeSeq}` as JobType;
}

function handler(type: JobType, run: JobHandler['run'], extra: Partial<JobHandler> = {}): JobHandler {
  return { type, run, ...extra };
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

beforeAll(async () => {
  fx = await createClubFixture();
});

afterAll(async () => {
  await sequelize.query("DELETE FROM jobs WHERE type LIKE 'test.%'");
});

describe('job queue', () => {
  it('never gives one job to two workers when they claim at the same time', async () => {
    const type = freshType();
    for (let i = 0; i < 12; i++) await enqueue({ clubId: fx.clubId, type, payload: { i } });
    const claims = await Promise.all(Array.from({ length: 16 }, (_, i) => claimNext(`w${i % 2}`, { types: [type] })));
    const ids = claims.filter((c) => c !== null).map((c) => c!.job.id);
    expect(ids).toHaveLength(12);
    expect(new Set(ids).size).toBe(12);
    const [row] = await sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM jobs WHERE type = :type AND status = 'running' AND attempts = 1", {
      type: QueryTypes.SELECT,
      replacements: { type },
    });
    expect(Number(row!.n)).toBe(12);
  });

  it('skips a row another transaction holds locked instead of waiting for it (SKIP LOCKED)', async () => {
    const type = freshType();
    const first = await enqueue({ clubId: fx.clubId, type, payload: {} });
    const second = await enqueue({ clubId: fx.clubId, type, payload: {} });
    const t = await sequelize.transaction();
    try {
      await sequelize.query('SELECT id FROM jobs WHERE id = :id FOR UPDATE', { transaction: t, replacements: { id: first.id } });
      const started = Date.now();
      const claim = await claimNext('other', { types: [type] });
      expect(claim?.job.id).toBe(second.id);
      expect(Date.now() - started).toBeLessThan(2000);
    } finally {
      await t.rollback();
    }
  });

  it('hands a job to another worker when the first one stops renewing its lease', async () => {
    const type = freshType();
    const job = await enqueue({ clubId: fx.clubId, type, payload: {} });
    const a = await claimNext('dead-worker', { types: [type], leaseMs: 150 });
    expect(a?.job.id).toBe(job.id);
    expect(await claimNext('second', { types: [type], leaseMs: 150 })).toBeNull();
    await sleep(400);
    const b = await claimNext('second', { types: [type] });
    expect(b?.job.id).toBe(job.id);
    expect(b?.job.attempts).toBe(2);
    expect(b?.job.workerId).toBe('second');
    // The first worker learns it lost the job at its next renewal.
    expect(await renewLease(job.id, 'dead-worker', 50)).toBe(false);
    expect(await renewLease(job.id, 'second', 50)).toBe(true);
  });

  it('fails a job whose workers keep dying once its attempts are used up, running its cleanup', async () => {
    const type = freshType();
    const job = await enqueue({ clubId: fx.clubId, type, payload: {}, maxAttempts: 1 });
    await claimNext('dead-worker', { types: [type], leaseMs: 100 });
    await sleep(300);
    const cleaned: number[] = [];
    const worker = new JobWorker({
      handlers: [handler(type, async () => ({ ran: true }), { cleanup: async (j) => void cleaned.push(j.id) })],
      name: 'survivor',
    });
    expect(await worker.runOnce()).toBe(true);
    const row = await Job.findByPk(job.id);
    expect(row?.status).toBe('failed');
    expect(row?.error).toMatch(/stopped responding 1 times/);
    expect(row?.result).toBeNull();
    expect(cleaned).toEqual([job.id]);
  });

  it('keeps the reason, cleans up and records the failure on its subject when a handler fails', async () => {
    const type = freshType();
    const job = await enqueue({ clubId: fx.clubId, type, payload: {} });
    const calls: string[] = [];
    const worker = new JobWorker({
      handlers: [
        handler(type, async () => {
          throw new JobFailure('The ball was lost at frame 12: start again from a later frame.');
        }, {
          cleanup: async () => void calls.push('cleanup'),
          onFailed: async (_j, reason) => void calls.push(`failed: ${reason}`),
        }),
      ],
    });
    await worker.drain();
    const row = await Job.findByPk(job.id);
    expect(row?.status).toBe('failed');
    expect(row?.error).toBe('The ball was lost at frame 12: start again from a later frame.');
    expect(row?.finishedAt).not.toBeNull();
    expect(calls).toEqual(['cleanup', 'failed: The ball was lost at frame 12: start again from a later frame.']);
  });

  it('stores a generic sentence with a reference, not the internal message, when a handler crashes', async () => {
    const type = freshType();
    const job = await enqueue({ clubId: fx.clubId, type, payload: {} });
    const worker = new JobWorker({
      handlers: [handler(type, async () => {
        throw new TypeError('cannot read properties of undefined (reading "x")');
      })],
    });
    await worker.drain();
    const row = await Job.findByPk(job.id);
    expect(row?.error).toBe(`Processing stopped on an unexpected error (reference job ${job.id}). Retry the job; if it fails again, tell your club admin.`);
  });

  it('reports progress while running and 100 with the result when done', async () => {
    const type = freshType();
    const job = await enqueue({ clubId: fx.clubId, type, payload: {} });
    const seen: number[] = [];
    const worker = new JobWorker({
      handlers: [
        handler(type, async ({ progress, job: j }) => {
          for (const p of [20, 40, 60, 80]) {
            progress(p);
            await sleep(300);
            seen.push((await Job.findByPk(j.id))!.progress);
          }
          return { frames: 4 };
        }),
      ],
    });
    await worker.drain();
    expect(seen).toEqual([20, 40, 60, 80]);
    const row = await Job.findByPk(job.id);
    expect(row).toMatchObject({ status: 'done', progress: 100, result: { frames: 4 } });
  });

  it('stops a handler whose lease another worker took, without recording its result', async () => {
    const type = freshType();
    const job = await enqueue({ clubId: fx.clubId, type, payload: {} });
    let aborted = false;
    const worker = new JobWorker({
      leaseMs: 150,
      handlers: [
        handler(type, async ({ signal, job: j }) => {
          // Another worker takes the job over (as after an expired lease).
          await sequelize.query("UPDATE jobs SET worker_id = 'thief' WHERE id = :id", { replacements: { id: j.id } });
          await new Promise<void>((resolve) => signal.addEventListener('abort', () => resolve(), { once: true }));
          aborted = true;
          return { late: true };
        }),
      ],
    });
    await worker.drain();
    expect(aborted).toBe(true);
    const row = await Job.findByPk(job.id);
    expect(row).toMatchObject({ status: 'running', workerId: 'thief', result: null });
  });

  it('hands a running job back to the queue after its cleanup when the worker stops gracefully', async () => {
    const type = freshType();
    const job = await enqueue({ clubId: fx.clubId, type, payload: {} });
    const calls: string[] = [];
    let started!: () => void;
    const running = new Promise<void>((r) => (started = r));
    const worker = new JobWorker({
      stopGraceMs: 100,
      pollMs: 20,
      handlers: [
        handler(type, async ({ signal }) => {
          started();
          await new Promise<void>((_resolve, reject) => signal.addEventListener('abort', () => reject(signal.reason), { once: true }));
          return null;
        }, { cleanup: async () => void calls.push('cleanup') }),
      ],
    });
    worker.start();
    await running;
    await worker.stop();
    const row = await Job.findByPk(job.id);
    expect(row).toMatchObject({ status: 'queued', workerId: null, attempts: 0 });
    expect(calls).toEqual(['cleanup']);
  });

  it('lets a coach retry a failed job and refuses to retry one that did not fail', async () => {
    const type = freshType();
    const job = await enqueue({ clubId: fx.clubId, type, payload: {} });
    await new JobWorker({ handlers: [handler(type, async () => { throw new JobFailure('No luck.'); })] }).drain();
    const res = await fx.coach.post(clubPath(fx, `/jobs/${job.id}/retry`));
    expect(res.status).toBe(202);
    expect(res.body.data).toMatchObject({ id: job.id, status: 'queued', error: null, attempts: 0, progress: 0 });
    const again = await fx.coach.post(clubPath(fx, `/jobs/${job.id}/retry`));
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/Only a failed job can be retried; this one is queued/);
    await new JobWorker({ handlers: [handler(type, async () => ({ second: true }))] }).drain();
    const done = await fx.coach.get(clubPath(fx, `/jobs/${job.id}`));
    expect(done.body.data).toMatchObject({ status: 'done', progress: 100, result: { second: true }, attempts: 1 });
  });
});
