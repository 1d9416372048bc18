import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Job } from '../../../server/models';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { createSession, flightClip, upload, useTestStorage, type TestStorage } from './helpers';

let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let child: ChildProcess | null = null;

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-worker-'));
  fx = await createClubFixture();
});

afterAll(async () => {
  if (child && child.exitCode === null) child.kill('SIGKILL');
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

async function waitFor<T>(what: string, probe: () => Promise<T | null>, timeoutMs = 30_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const value = await probe();
    if (value !== null) return value;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}`);
}

describe('npm run worker (server/worker.ts)', () => {
  it('processes queued jobs from its own process sharing the database and storage, and stops cleanly on SIGTERM', async () => {
    const sessionId = await createSession(fx.coach, fx.clubId);
    const { videoPath } = await flightClip(dir);
    const res = await upload(fx.coach, fx.clubId, sessionId, { video: videoPath });
    const jobId = res.body.data.job.id as number;

    let output = '';
    child = spawn(join(process.cwd(), 'node_modules', '.bin', 'tsx'), ['server/worker.ts'], {
      cwd: process.cwd(),
      env: { ...process.env, STORAGE_DIR: store.root, JOB_POLL_MS: '50', LOG_LEVEL: 'info', WORKER_CONCURRENCY: '1' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    child.stdout!.on('data', (d: Buffer) => (output += d.toString()));
    child.stderr!.on('data', (d: Buffer) => (output += d.toString()));

    const job = await waitFor('the worker to finish the job', async () => {
      const row = await Job.findByPk(jobId);
      return row && (row.status === 'done' || row.status === 'failed') ? row : null;
    });
    expect(job.status).toBe('done');
    expect(job.workerId).toMatch(/^worker@/);
    expect(await store.storage.list(`clubs/${fx.clubId}/clips/${res.body.data.clip.id}/frames`)).toHaveLength(49);

    const exited = new Promise<number | null>((resolve) => child!.on('exit', (code) => resolve(code)));
    child.kill('SIGTERM');
    expect(await exited).toBe(0);
    expect(output).toMatch(/SIGTERM received, stopping the worker/);
    expect(output).toMatch(/Job worker stopped/);
  });
});
