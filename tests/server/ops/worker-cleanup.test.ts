/**
 * Nothing left behind by a worker process that dies: its ffmpeg child dies with it (parent-death signal),
 * the next worker's start removes the work folder of the job that no longer runs and the folder of an
 * interrupted upload, and SIGTERM hands a running job back with its lease released.
 */
import { spawn } from 'node:child_process';
import { mkdir, mkdtemp, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { removeStaleWorkFolders } from '../../../server/jobs/work-folders';
import { Job } from '../../../server/models';
import { PROCESS_INSTANCE, uploadWorkPurpose } from '../../../server/storage/work-names';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { ROOT } from '../../support/db';
import { alive, startProcess, waitUntil, type ServerProcess } from '../../support/process';
import { createSession, flightClip, upload, useTestStorage, type TestStorage } from '../clips/helpers';

const STALLING_FFMPEG = join(ROOT, 'tests', 'fixtures', 'processes', 'stalling-ffmpeg.sh');

let fx: ClubFixture;
let store: TestStorage;
let dir: string;
const procs: ServerProcess[] = [];

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-cleanup-'));
  fx = await createClubFixture();
});

afterEach(() => {
  for (const p of procs.splice(0)) if (p.child.exitCode === null && p.child.signalCode === null) p.child.kill('SIGKILL');
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

/** Pids of the direct children of `pid` running the stalling ffmpeg (from /proc). */
async function stalledFfmpegOf(pid: number): Promise<number[]> {
  const out: number[] = [];
  for (const entry of await readdir('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = await readFile(`/proc/${entry}/stat`, 'utf8');
      // Fields after the command name in parentheses: state, ppid, ...
      const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
      if (ppid === pid && (await readFile(`/proc/${entry}/cmdline`, 'utf8')).startsWith('sleep')) out.push(Number(entry));
    } catch {
      // The process ended while we looked.
    }
  }
  return out;
}

function startWorker(env: Record<string, string>): ServerProcess {
  const proc = startProcess('server/worker.ts', { STORAGE_DIR: store.root, JOB_POLL_MS: '50', WORKER_CONCURRENCY: '1', ...env });
  procs.push(proc);
  return proc;
}

async function queuedClipJob(): Promise<number> {
  const sessionId = await createSession(fx.coach, fx.clubId);
  const { videoPath } = await flightClip(dir);
  const res = await upload(fx.coach, fx.clubId, sessionId, { video: videoPath });
  expect(res.status).toBe(201);
  return res.body.data.job.id as number;
}

async function workFolders(): Promise<string[]> {
  try {
    return (await readdir(join(store.root, '.work'))).sort();
  } catch {
    return [];
  }
}

describe('a worker killed mid-job', () => {
  it('takes its ffmpeg child with it, and the next worker removes the job folder and finishes the job once', async () => {
    const jobId = await queuedClipJob();
    const first = startWorker({ FFMPEG_PATH: STALLING_FFMPEG, JOB_LEASE_SECONDS: '1' });
    const pid = first.child.pid!;
    const ffmpegPid = await waitUntil('the worker to start ffmpeg', async () => (await stalledFfmpegOf(pid))[0] ?? null, 30_000);
    expect((await workFolders()).some((name) => name.startsWith(`job-${jobId}-a1-`))).toBe(true);

    first.child.kill('SIGKILL');
    await first.exited;
    await waitUntil('ffmpeg to die with its worker', () => (alive(ffmpegPid) ? null : true), 5000);

    const second = startWorker({});
    const done = await waitUntil('the job to finish', async () => {
      const row = await Job.findByPk(jobId);
      return row && (row.status === 'done' || row.status === 'failed') ? row : null;
    });
    expect(done.status).toBe('done');
    expect(done.attempts).toBe(2);
    expect(second.logLines().some((l) => l.msg === 'Removed work folders left by stopped processes')).toBe(true);
    expect(await workFolders()).toEqual([]);
  });
});

describe('a worker stopped with SIGTERM mid-job', () => {
  it('kills ffmpeg and hands the job back to the queue with its lease released', async () => {
    const jobId = await queuedClipJob();
    const worker = startWorker({ FFMPEG_PATH: STALLING_FFMPEG, JOB_STOP_GRACE_SECONDS: '0' });
    const pid = worker.child.pid!;
    const ffmpegPid = await waitUntil('the worker to start ffmpeg', async () => (await stalledFfmpegOf(pid))[0] ?? null, 30_000);
    worker.child.kill('SIGTERM');
    const code = await worker.exited;
    expect(code, worker.output()).toBe(0);
    expect(alive(ffmpegPid)).toBe(false);
    const row = await Job.findByPk(jobId);
    expect(row).toMatchObject({ status: 'queued', workerId: null, leaseUntil: null, attempts: 0 });
    expect(worker.logLines().some((l) => l.msg === 'Job handed back to the queue on stop')).toBe(true);
    expect(await workFolders()).toEqual([]);
    await Job.destroy({ where: { id: jobId } });
  });
});

describe('the sweep of work folders at worker start', () => {
  it('removes upload folders of a dead process or an earlier life of this pid, keeps live ones and recent foreign ones', async () => {
    const dead = spawn('true');
    const deadPid = await new Promise<number>((resolve) => dead.on('exit', () => resolve(dead.pid!)));
    const host = hostname().replace(/[^a-z0-9]/gi, '').slice(0, 40);
    const root = join(store.root, '.work');
    const names = {
      deadUpload: `upload-${host}-${deadPid}-0badc0de-aaaaaa`,
      earlierLife: `upload-${host}-${process.pid}-${PROCESS_INSTANCE === '00000000' ? '11111111' : '00000000'}-bbbbbb`,
      ownUpload: `${uploadWorkPurpose()}-cccccc`,
      otherHost: `upload-someotherhost-${deadPid}-0badc0de-dddddd`,
      oldJob: 'job-999999-a1-eeeeee',
    };
    for (const name of Object.values(names)) {
      await mkdir(join(root, name), { recursive: true });
      await writeFile(join(root, name, 'part-0'), 'partial upload');
    }
    const removed = await removeStaleWorkFolders();
    expect(removed.sort()).toEqual([names.deadUpload, names.earlierLife, names.oldJob].sort());
    expect((await workFolders()).sort()).toEqual([names.ownUpload, names.otherHost].sort());
    // A foreign host's folder goes once it is a day old.
    expect(await removeStaleWorkFolders(Date.now() + 25 * 3600 * 1000)).toEqual(expect.arrayContaining([names.otherHost, names.ownUpload].filter((n) => n === names.otherHost)));
    await rm(root, { recursive: true, force: true });
  });
});

describe('an upload cut off by the client', () => {
  it('removes its work folder as soon as the connection drops', async () => {
    const { request: httpRequest } = await import('node:http');
    const sessionId = await createSession(fx.coach, fx.clubId);
    const server = fx.app.listen(0, '127.0.0.1');
    await new Promise((resolve) => server.once('listening', resolve));
    try {
      const port = (server.address() as { port: number }).port;
      const boundary = 'arcwright-cut-boundary';
      const req = httpRequest({
        host: '127.0.0.1',
        port,
        method: 'POST',
        path: `/api/v1/clubs/${fx.clubId}/sessions/${sessionId}/clips`,
        headers: {
          'content-type': `multipart/form-data; boundary=${boundary}`,
          'content-length': 10 * 1024 * 1024,
          'x-csrf-token': fx.coach.csrfToken!,
          cookie: await sessionCookie(),
        },
      });
      req.on('error', () => undefined);
      req.write(`--${boundary}\r\nContent-Disposition: form-data; name="video"; filename="cut.mp4"\r\nContent-Type: video/mp4\r\n\r\n`);
      req.write(Buffer.alloc(256 * 1024, 7));
      // The upload is being received into its folder...
      await waitUntil('the upload folder', async () => ((await workFolders()).some((n) => n.startsWith('upload-')) ? true : null), 10_000, 25);
      // ...and the phone loses its connection.
      req.destroy();
      await waitUntil('the upload folder to go', async () => ((await workFolders()).length === 0 ? true : null), 10_000, 50);
      expect(await workFolders()).toEqual([]);
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  });
});

/** The coach's session cookie, for a request made without supertest. */
async function sessionCookie(): Promise<string> {
  const res = await fx.coach.agent.get('/api/v1/auth/me');
  const jar = (fx.coach.agent as unknown as { jar: { getCookies: (access: unknown) => { name: string; value: string }[] } }).jar;
  const cookies = jar.getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false });
  expect(res.status).toBe(200);
  return cookies.map((c) => `${c.name}=${c.value}`).join('; ');
}
