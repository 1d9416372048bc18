import { spawn, type ChildProcess } from 'node:child_process';
import { readFile, mkdtemp, rm } from 'node:fs/promises';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Metadata } from '@tus/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { httpSession, streamedRequest } from '../../support/http-session';
import { clubPath, createSession, flightClip, getJob, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

/**
 * Fault suite: the web process gets SIGTERM while a resumable upload's last part is on its way. It stops taking
 * connections, lets the upload finish (201 with the clip), then exits 0; the clip's job is processed afterwards.
 */
let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let child: ChildProcess | null = null;
let output = '';

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-sigterm-'));
  fx = await createClubFixture();
});

afterAll(async () => {
  if (child && child.exitCode === null) child.kill('SIGKILL');
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

async function freePort(): Promise<number> {
  const probe = createServer();
  await new Promise<void>((resolve) => probe.listen(0, '127.0.0.1', resolve));
  const port = (probe.address() as { port: number }).port;
  await new Promise((resolve) => probe.close(resolve));
  return port;
}

async function waitFor<T>(what: string, probe: () => Promise<T | null>, timeoutMs = 30_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const value = await probe().catch(() => null);
    if (value !== null) return value;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}; the app printed:\n${output}`);
}

describe('SIGTERM with an upload in flight', () => {
  it('lets the upload finish with 201, refuses new connections meanwhile, exits 0, and the clip is processed', async () => {
    const sessionId = await createSession(fx.coach, fx.clubId);
    const video = await readFile((await flightClip(dir)).videoPath);
    const port = await freePort();
    child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
      cwd: process.cwd(),
      env: { ...process.env, ENV_FILE: 'none', HOST: '127.0.0.1', PORT: String(port), STORAGE_DIR: store.root, WORKERS_IN_WEB: '0', LOG_LEVEL: 'info' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    child.stdout!.on('data', (d: Buffer) => (output += d.toString()));
    child.stderr!.on('data', (d: Buffer) => (output += d.toString()));
    const exited = new Promise<number | null>((resolve) => child!.on('exit', (code) => resolve(code)));
    const base = `http://127.0.0.1:${port}`;
    await waitFor('the app to answer', async () => ((await fetch(`${base}/api/v1/health`)).ok ? true : null));

    const coach = await httpSession(base, fx.members.coach.email);
    const created = await coach.fetch(`/api/v1/clubs/${fx.clubId}/sessions/${sessionId}/clips/uploads`, {
      method: 'POST',
      headers: { 'Tus-Resumable': '1.0.0', 'Upload-Length': String(video.length), 'Upload-Metadata': Metadata.stringify({ filename: 'kick.mp4', label: 'Kick during a restart' }) },
    });
    expect(created.status).toBe(201);
    const location = created.headers.get('location')!;

    const half = Math.floor(video.length / 2);
    let refusedMeanwhile = false;
    const answer = await streamedRequest(`${base}${location}`, {
      method: 'PATCH',
      headers: { 'Tus-Resumable': '1.0.0', 'Upload-Offset': '0', 'Content-Type': 'application/offset+octet-stream', cookie: coach.cookie, 'x-csrf-token': coach.csrfToken },
      declaredBytes: video.length,
      chunks: [video.subarray(0, half), video.subarray(half)],
      between: async (i) => {
        if (i !== 0) return;
        await new Promise((r) => setTimeout(r, 200));
        child!.kill('SIGTERM');
        await waitFor('the shutdown to begin', async () => (output.includes('SIGTERM received') ? true : null), 10_000);
        // A new connection is refused while the upload is still being received.
        refusedMeanwhile = await fetch(`${base}/api/v1/health`).then(
          () => false,
          () => true,
        );
      },
    });
    expect(refusedMeanwhile).toBe(true);
    expect(answer?.status).toBe(201);
    const { clip, job } = (JSON.parse(answer!.body) as { data: { clip: { id: number; label: string; sizeBytes: number }; job: { id: number } } }).data;
    expect(clip).toMatchObject({ label: 'Kick during a restart', sizeBytes: video.length });
    expect(await exited).toBe(0);

    expect(await testWorker().drain()).toBeGreaterThanOrEqual(1);
    expect(await getJob(fx.coach, fx.clubId, job.id)).toMatchObject({ status: 'done', progress: 100 });
    expect((await fx.coach.get(clubPath(fx, `/clips/${clip.id}`))).body.data).toMatchObject({ status: 'ready', framesReady: true, frameCount: 48 });
    // Only the finished upload's receipt stays (until it expires): no bytes, no work folder.
    const leftBehind = (await store.files()).filter((f) => (f.startsWith('.partial-uploads/') && !f.endsWith('.kept')) || f.startsWith('.work/'));
    expect(leftBehind).toEqual([]);
    console.log(`SIGTERM with an upload in flight: 1 upload, answered ${answer!.status}, exit code 0, clip ${clip.id} processed, ${leftBehind.length} files left behind`);
  });
});
