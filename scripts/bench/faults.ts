/**
 * Fault suites (`npm run bench faults`), each printing its counts. They run against a private MariaDB
 * of their own (`.data/mariadb-faults`, port FAULTS_DB_PORT, default 3499), which the second suite stops
 * and starts; nobody else's database is touched.
 *
 * 1. A worker process SIGKILLed mid-job, 10 times (FAULTS_KILLS): every job finishes exactly once, its
 *    frames all there and none twice, no work folder and no ffmpeg left.
 * 2. The database stopped and started under a write load of a few hundred requests (FAULTS_WRITES,
 *    default 300): every acknowledged write present, every refused one absent, no request left
 *    unanswered, and the app (same process) answering writes again afterwards.
 */
import { existsSync } from 'node:fs';
import { mkdir, readdir } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { QueryTypes } from 'sequelize';
import { renderFlightClip } from '../../server/video/synth';
import { alive, startProcess, waitUntil, type ServerProcess } from '../../tests/support/process';
import { BenchClient, signUpClub } from './support/client';
import { benchApp, benchDatabase, childProcesses, processesMentioning, tearDown, type BenchApp, type BenchDatabase } from './support/stack';

const KILLS = Number(process.env.FAULTS_KILLS ?? 10);
const WRITES = Number(process.env.FAULTS_WRITES ?? 300);
const DB_PORT = Number(process.env.FAULTS_DB_PORT ?? 3499);
/** Writes in flight at once during the database restart. */
const CONCURRENCY = 12;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Every worker the suites start, so that a failing suite leaves none running. */
const started: ServerProcess[] = [];
function startWorker(env: Record<string, string>): ServerProcess {
  const proc = startProcess('server/worker.ts', env);
  started.push(proc);
  return proc;
}

async function benchClipPath(): Promise<string> {
  const path = resolve('.data/bench/faults-1280x720-60fps-8s.mp4');
  if (!existsSync(path)) {
    await mkdir(resolve('.data/bench'), { recursive: true });
    await renderFlightClip(path, { width: 1280, height: 720, captureFps: 60, durationS: 8, ballRadiusPx: 8, preset: 'ultrafast' });
  }
  return path;
}

async function newSession(client: BenchClient, clubId: number, venue: string) {
  return client.json('POST', `/api/v1/clubs/${clubId}/sessions`, { date: '2025-04-12', venue, conditions: { airTemperatureK: 288.15, altitudeM: 0 } }, 'POST /sessions');
}

interface JobRow {
  id: number;
  status: string;
  attempts: number;
  progress: number;
  worker_id: string | null;
  clip_id: number;
}

async function workerKills(db: BenchDatabase, app: BenchApp, client: BenchClient, clubId: number): Promise<void> {
  console.log(`-- worker SIGKILLed mid-job, ${KILLS} times`);
  const clip = await benchClipPath();
  const session = await newSession(client, clubId, 'Bench Vale kill suite');
  const sessionId = (session.body?.data as { id: number }).id;
  const jobs = KILLS;
  for (let i = 0; i < jobs; i++) {
    const res = await client.uploadVideo(`/api/v1/clubs/${clubId}/sessions/${sessionId}/clips`, clip);
    if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${JSON.stringify(res.body)}`);
  }
  const jobRows = () =>
    db.sql.query<JobRow>(`SELECT id, status, attempts, progress, worker_id, clip_id FROM jobs WHERE club_id = :clubId AND type = 'clip.process' ORDER BY id`, {
      type: QueryTypes.SELECT,
      replacements: { clubId },
    });
  const workerEnv = { ...db.env, STORAGE_DIR: app.storageDir, JOB_LEASE_SECONDS: '2', JOB_POLL_MS: '100', LOG_LEVEL: 'warn' };

  const ffmpegSeen: number[] = [];
  let killedMidJob = 0;
  for (let k = 0; k < KILLS; k++) {
    const worker = startWorker(workerEnv);
    const pid = worker.child.pid!;
    // Mid-job: the job claimed by this worker has made progress and its ffmpeg runs.
    const running = await waitUntil(
      `worker ${k + 1} to be mid-job`,
      async () => {
        // The frame extraction's ffmpeg (it reports progress on pipe:1) runs under this worker.
        const ffmpeg = (await childProcesses(pid)).filter((c) => c.cmdline.includes('ffmpeg') && c.cmdline.includes('pipe:1'));
        if (ffmpeg.length === 0) return null;
        const row = (await jobRows()).find((r) => r.status === 'running' && r.worker_id?.includes(`:${pid}:`));
        return row ? { row, ffmpeg } : null;
      },
      120_000,
      25,
    );
    ffmpegSeen.push(...running.ffmpeg.map((c) => c.pid));
    worker.child.kill('SIGKILL');
    await worker.exited;
    killedMidJob++;
    await waitUntil('ffmpeg to die with its worker', () => (running.ffmpeg.every((c) => !alive(c.pid)) ? true : null), 5000, 50).catch(() => undefined);
  }

  const finisher = startWorker(workerEnv);
  const finished = await waitUntil(
    'every job to finish',
    async () => {
      const rows = await jobRows();
      return rows.every((r) => r.status === 'done' || r.status === 'failed') ? rows : null;
    },
    600_000,
    250,
  );
  finisher.child.kill('SIGTERM');
  await finisher.exited;

  const clips = await db.sql.query<{ id: number; status: string; frame_count: number }>(`SELECT id, status, frame_count FROM clips WHERE session_id = :sessionId ORDER BY id`, {
    type: QueryTypes.SELECT,
    replacements: { sessionId },
  });
  let framesWrong = 0;
  for (const c of clips) {
    const dir = join(app.storageDir, 'clubs', String(clubId), 'clips', String(c.id), 'frames');
    const frames = existsSync(dir) ? (await readdir(dir)).filter((f) => /^frame-\d{6}\.jpg$/.test(f)) : [];
    if (c.status !== 'ready' || frames.length !== Number(c.frame_count) || new Set(frames).size !== frames.length) framesWrong++;
  }
  const workRoot = join(app.storageDir, '.work');
  const workLeft = existsSync(workRoot) ? (await readdir(workRoot)).length : 0;
  const ffmpegLeft = ffmpegSeen.filter(alive).length + (await processesMentioning(app.storageDir)).length;
  const doneOnce = finished.filter((r) => r.status === 'done').length;
  console.log(`kills mid-job        ${killedMidJob}`);
  console.log(`jobs                 ${finished.length}`);
  console.log(`jobs done once       ${doneOnce}`);
  console.log(`jobs failed          ${finished.filter((r) => r.status === 'failed').length}`);
  console.log(`attempts (per job)   ${finished.map((r) => r.attempts).join(' ')}`);
  console.log(`clips with frames missing, doubled or not ready  ${framesWrong}`);
  console.log(`work folders left    ${workLeft}`);
  console.log(`ffmpeg seen / left   ${ffmpegSeen.length} / ${ffmpegLeft}`);
  const ok = doneOnce === jobs && framesWrong === 0 && workLeft === 0 && ffmpegLeft === 0;
  console.log(ok ? 'RESULT worker kills: ok' : 'RESULT worker kills: FAILED');
  if (!ok) process.exitCode = 1;
}

async function databaseRestart(db: BenchDatabase, app: BenchApp, client: BenchClient, clubId: number): Promise<void> {
  console.log(`-- database stopped and started under ${WRITES} writes`);
  const acknowledged: { id: number; venue: string }[] = [];
  const refused: string[] = [];
  const other: string[] = [];
  let next = 0;
  let restarted = false;
  let firstAfterStart = 0;
  const outage = { stoppedAt: 0, startedAt: 0 };
  /** Seconds since the database was stopped (negative before), for the answers that are neither 201 nor 503. */
  const since = () => (outage.stoppedAt === 0 ? 'before the stop' : `${((Date.now() - outage.stoppedAt) / 1000).toFixed(1)} s after the stop`);
  const writer = async (): Promise<void> => {
    while (next < WRITES) {
      const i = next++;
      const venue = `fault-${process.pid}-${i}`;
      try {
        const res = await newSession(client, clubId, venue);
        if (res.status === 201) {
          acknowledged.push({ id: (res.body?.data as { id: number }).id, venue });
          if (outage.startedAt > 0 && firstAfterStart === 0) firstAfterStart = Date.now();
        }
        else if (res.status === 503) refused.push(venue);
        else other.push(`${res.status} ${res.body?.error?.code ?? ''} at ${since()}`);
      } catch (err) {
        other.push(`network ${(err as Error).message} ${String((err as Error & { cause?: unknown }).cause)} at ${since()}`);
      }
      // Spread the writes over about 15 s: some before the stop, many during the outage, the rest after.
      await sleep(Math.round((CONCURRENCY * 15_000) / WRITES));
    }
  };
  const restart = async (): Promise<void> => {
    await waitUntil('a fifth of the writes', () => (next >= WRITES / 5 ? true : null), 120_000, 10);
    outage.stoppedAt = Date.now();
    db.stop();
    await sleep(3000);
    db.start();
    outage.startedAt = Date.now();
    restarted = true;
  };
  const started = Date.now();
  await Promise.all([...Array.from({ length: CONCURRENCY }, writer), restart()]);
  if (!restarted) throw new Error('the database was never restarted');

  // The same app process answers again without a restart.
  const pidBefore = app.proc.child.pid;
  const recovered = await waitUntil('a write to succeed again', async () => ((await newSession(client, clubId, `fault-${process.pid}-after`)).status === 201 ? true : null), 60_000, 500);
  const rows = await db.sql.query<{ id: number; venue: string }>(`SELECT id, venue FROM sessions WHERE club_id = :clubId AND venue LIKE :prefix`, {
    type: QueryTypes.SELECT,
    replacements: { clubId, prefix: `fault-${process.pid}-%` },
  });
  const stored = new Map(rows.map((r) => [r.venue, Number(r.id)]));
  const ackMissing = acknowledged.filter((a) => stored.get(a.venue) !== a.id).length;
  const refusedPresent = refused.filter((v) => stored.has(v)).length;
  console.log(`writes sent          ${acknowledged.length + refused.length + other.length} in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  console.log(`database down        ${((outage.startedAt - outage.stoppedAt) / 1000).toFixed(1)} s (stop, 3 s, start)`);
  console.log(`acknowledged (201)   ${acknowledged.length}`);
  console.log(`first 201 after the start  ${firstAfterStart > 0 ? `${((firstAfterStart - outage.startedAt) / 1000).toFixed(1)} s` : 'none during the load'}`);
  console.log(`refused (503)        ${refused.length}`);
  console.log(`other answers        ${other.length}`);
  for (const line of other.slice(0, 10)) console.log(`  ${line}`);
  console.log(`acknowledged missing ${ackMissing}`);
  console.log(`refused but present  ${refusedPresent}`);
  console.log(`recovered, same pid  ${recovered && app.proc.child.pid === pidBefore && app.proc.child.exitCode === null ? 'yes' : 'no'}`);
  const appErrors = app.proc.logLines().filter((l) => Number(l.level) >= 50);
  console.log(`app error lines      ${appErrors.length}`);
  for (const line of appErrors.slice(0, 5)) console.log(`  ${String(line.msg)} ${String(line.error ?? '')}`);
  const ok = ackMissing === 0 && refusedPresent === 0 && other.length === 0 && refused.length > 0 && app.proc.child.exitCode === null;
  console.log(ok ? 'RESULT database restart: ok' : 'RESULT database restart: FAILED');
  if (!ok) process.exitCode = 1;
}

export async function run(): Promise<void> {
  const db = await benchDatabase('faults', DB_PORT);
  let app: BenchApp | null = null;
  try {
    // A job's attempts are capped when it is queued (JOB_MAX_ATTEMPTS, default 3, so a job that keeps
    // killing its workers ends failed): here every kill may land on one job, which must still finish.
    app = await benchApp(db, { PASSWORD_SCRYPT_LOG_N: '12', JOB_MAX_ATTEMPTS: String(KILLS + 3) });
    const { client, clubId } = await signUpClub(app.base, `faults-${Date.now()}@bench.example`, 'Bench-password-42');
    const only = process.env.FAULTS_ONLY;
    if (!only || only === 'kills') await workerKills(db, app, client, clubId);
    if (!only || only === 'db') await databaseRestart(db, app, client, clubId);
  } finally {
    for (const proc of started) if (proc.child.exitCode === null && proc.child.signalCode === null) proc.child.kill('SIGKILL');
    await tearDown(app, db);
  }
}
