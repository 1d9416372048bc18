/**
 * Scale bench (`npm run bench scale`): two web processes and three worker processes on 127.0.0.1 share the
 * private MariaDB (database `arcwright_bench_scale`, recreated) and an S3 fake (s3rver); 30 generated clips are
 * uploaded at once as resumable uploads (tus), each started and half sent through one web process and finished
 * through the other (no sticky sessions), then processed, and the ball in each auto-followed.
 * Then it checks that every clip was processed exactly once (one `clip.process` and one `flight.follow` job per
 * clip, each claimed once and done), that every clip's frames are in the bucket, that no upload left parts or an
 * open multipart upload in the bucket, and that no process left anything in its scratch folder; and prints the
 * wall time beside the same run with one worker.
 * Nothing here asserts a time. Ports: web 4862/4863, S3 fake 4865 (BENCH_SCALE_PORT_BASE / S3_FAKE_PORT move them).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, readdir, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { ListMultipartUploadsCommand } from '@aws-sdk/client-s3';
import { Metadata } from '@tus/server';
import mariadb from 'mariadb';

const CLIPS = Number(process.env.BENCH_SCALE_CLIPS ?? 30);
const DB_NAME = process.env.BENCH_SCALE_DB_NAME ?? 'arcwright_bench_scale';
const PORT_BASE = Number(process.env.BENCH_SCALE_PORT_BASE ?? 4862);
const S3_PORT = Number(process.env.S3_FAKE_PORT ?? 4865);
const PASSWORD = 'bench-scale-password-1';

interface Proc {
  name: string;
  child: ChildProcess;
  scratch: string;
  output: string[];
}

interface BenchClip {
  videoPath: string;
  start: { frame: number; x: number; y: number };
}

/** Renders the clips once into `.data/bench/scale/` (small 320×240 kicks, each with its own seed). */
async function benchClips(): Promise<BenchClip[]> {
  const { readTruth, renderFlightClip } = await import('../../server/video/synth');
  const dir = resolve('.data/bench/scale');
  await mkdir(dir, { recursive: true });
  const clips: BenchClip[] = [];
  for (let i = 0; i < CLIPS; i++) {
    const videoPath = join(dir, `kick-${String(i).padStart(2, '0')}.mp4`);
    const truthPath = `${videoPath}.truth.json`;
    const spec = { width: 320, height: 240, captureFps: 30, durationS: 1.6, ballRadiusPx: 6, preset: 'ultrafast' as const, seed: 100 + i, speedMps: 14 + (i % 5) };
    const rendered = existsSync(videoPath) && existsSync(truthPath) ? { truth: await readTruth(truthPath) } : await renderFlightClip(videoPath, spec);
    const p = rendered.truth.frames[rendered.truth.launchFrame + 2]!;
    clips.push({ videoPath, start: { frame: p.frame, x: p.x, y: p.y } });
  }
  return clips;
}

function startProc(name: string, script: string, env: Record<string, string>, scratch: string): Proc {
  const output: string[] = [];
  const child = spawn(join(process.cwd(), 'node_modules', '.bin', 'tsx'), [script], {
    cwd: process.cwd(),
    env: { ...process.env, ...env, STORAGE_DIR: scratch },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const keep = (d: Buffer) => {
    output.push(d.toString());
    if (output.length > 200) output.shift();
  };
  child.stdout!.on('data', keep);
  child.stderr!.on('data', keep);
  return { name, child, scratch, output };
}

async function stopProc(p: Proc): Promise<void> {
  if (p.child.exitCode !== null) return;
  const exited = new Promise<void>((done) => p.child.once('exit', () => done()));
  p.child.kill('SIGTERM');
  const timer = setTimeout(() => p.child.kill('SIGKILL'), 40_000);
  await exited;
  clearTimeout(timer);
}

async function waitFor<T>(what: string, probe: () => Promise<T | null>, timeoutMs: number): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe().catch(() => null);
    if (value !== null) return value;
    if (Date.now() > until) throw new Error(`Timed out waiting for ${what}.`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

/** A signed-in member talking to any of the web processes (the session lives in the shared database). */
interface FetchInit {
  method?: string;
  headers?: Record<string, string>;
  json?: unknown;
  form?: FormData;
  bytes?: Buffer;
}

class Member {
  cookie = '';
  csrf = '';

  async fetch(base: string, path: string, init: FetchInit = {}): Promise<Response> {
    const headers: Record<string, string> = { ...init.headers };
    if (this.cookie) headers.cookie = this.cookie;
    const method = init.method ?? 'GET';
    if (method !== 'GET') headers['x-csrf-token'] = this.csrf;
    let body: string | FormData | Buffer | undefined;
    if (init.json !== undefined) {
      headers['content-type'] = 'application/json';
      body = JSON.stringify(init.json);
    } else if (init.form) body = init.form;
    else if (init.bytes) body = init.bytes;
    const res = await fetch(`${base}${path}`, { method, headers, body });
    const set = res.headers.getSetCookie();
    if (set.length > 0) this.cookie = set.map((c) => c.split(';')[0]).join('; ');
    return res;
  }

  async data<T>(base: string, path: string, init: FetchInit = {}, expected = [200, 201, 202]): Promise<T> {
    const res = await this.fetch(base, path, init);
    const text = await res.text();
    if (!expected.includes(res.status)) throw new Error(`${init.method ?? 'GET'} ${path} answered ${res.status}: ${text.slice(0, 400)}`);
    return (JSON.parse(text) as { data: T }).data;
  }

  async refreshCsrf(base: string): Promise<void> {
    this.csrf = (await this.data<{ csrfToken: string }>(base, '/api/v1/auth/csrf')).csrfToken;
  }
}

const TUS = { 'Tus-Resumable': '1.0.0' };

/**
 * A resumable upload (tus) started and half sent through `first`, finished through `second`: the app's answer to
 * the last part (the clip and its job).
 */
async function resumableUpload(member: Member, first: string, second: string, path: string, bytes: Buffer, meta: Record<string, string>) {
  const created = await member.fetch(first, path, { method: 'POST', headers: { ...TUS, 'Upload-Length': String(bytes.length), 'Upload-Metadata': Metadata.stringify(meta) } });
  if (created.status !== 201) throw new Error(`starting an upload answered ${created.status}: ${(await created.text()).slice(0, 400)}`);
  const location = created.headers.get('location')!;
  const half = Math.floor(bytes.length / 2);
  const part = (offset: number, to: number) => ({ method: 'PATCH', headers: { ...TUS, 'Upload-Offset': String(offset), 'Content-Type': 'application/offset+octet-stream' }, bytes: bytes.subarray(offset, to) });
  const sent = await member.fetch(first, location, part(0, half));
  if (sent.status !== 204) throw new Error(`the first half of an upload answered ${sent.status}: ${(await sent.text()).slice(0, 400)}`);
  return member.data<{ clip: { id: number }; job: { id: number } }>(second, location, part(Number(sent.headers.get('upload-offset')), bytes.length));
}

interface RunResult {
  workers: number;
  wallS: number;
  processS: number;
  followS: number;
  checks: string[];
}

async function runOnce(workers: number, clips: BenchClip[], s3Endpoint: string, bucket: string, recreate: () => Promise<void>): Promise<RunResult> {
  await recreate();
  const root = await mkdtemp(join(tmpdir(), 'arcwright-scale-'));
  const common: Record<string, string> = {
    ENV_FILE: 'none',
    NODE_ENV: 'development',
    LOG_LEVEL: 'warn',
    DB_NAME,
    FAKES: '0',
    STORAGE_DRIVER: 's3',
    S3_ENDPOINT: s3Endpoint,
    S3_BUCKET: bucket,
    S3_REGION: 'us-east-1',
    S3_ACCESS_KEY_ID: 'S3RVER',
    S3_SECRET_ACCESS_KEY: 'S3RVER',
    S3_FORCE_PATH_STYLE: '1',
    SIGNUP_RATE_LIMIT_MAX: '100',
    UPLOAD_SWEEP_MINUTES: '0',
    // Note: a generous lease, since the two cores are shared by every process here: a renewal that waits behind
    // ffmpeg would let a second worker take the job over (recovered correctly, but then claimed twice).
    JOB_LEASE_SECONDS: '120',
  };
  const procs: Proc[] = [];
  const bases = [0, 1].map((i) => `http://127.0.0.1:${PORT_BASE + i}`);
  try {
    for (let i = 0; i < 2; i++) {
      procs.push(startProc(`web-${i + 1}`, 'server/index.ts', { ...common, HOST: '127.0.0.1', PORT: String(PORT_BASE + i), WORKERS_IN_WEB: '0' }, join(root, `web-${i + 1}`)));
    }
    for (let i = 0; i < workers; i++) {
      procs.push(startProc(`worker-${i + 1}`, 'server/worker.ts', { ...common, WORKER_CONCURRENCY: '1', JOB_POLL_MS: '100', DB_POOL_MAX: '4' }, join(root, `worker-${i + 1}`)));
    }
    for (const base of bases) await waitFor(`${base} to answer`, async () => ((await fetch(`${base}/api/v1/health`)).ok ? true : null), 60_000);

    const coach = new Member();
    await coach.refreshCsrf(bases[0]!);
    const email = `scale-${Date.now()}@fennickvale.example`;
    const me = await coach.data<{ memberships: { clubId: number }[] }>(bases[0]!, '/api/v1/auth/signup', {
      method: 'POST',
      json: { email, password: PASSWORD, displayName: 'Ilse Marrow', clubName: 'Fennick Vale Kickers' },
    });
    const clubId = me.memberships[0]!.clubId;
    await coach.refreshCsrf(bases[0]!);
    const session = await coach.data<{ id: number }>(bases[0]!, `/api/v1/clubs/${clubId}/sessions`, {
      method: 'POST',
      json: { date: '2026-03-14', venue: 'Fennick Vale lower pitch', conditions: { airTemperatureK: 285.15, altitudeM: 40 } },
    });
    const athlete = await coach.data<{ id: number }>(bases[1]!, `/api/v1/clubs/${clubId}/athletes`, { method: 'POST', json: { displayName: 'Tamsin Oakridge' } });

    const started = Date.now();
    const uploads = await Promise.all(
      clips.map(async (clip, i) => {
        const uploadsPath = `/api/v1/clubs/${clubId}/sessions/${session.id}/clips/uploads`;
        const meta = { filename: `kick-${i + 1}.mp4`, label: `Kick ${i + 1}` };
        const kept = await resumableUpload(coach, bases[i % 2]!, bases[(i + 1) % 2]!, uploadsPath, await readFile(clip.videoPath), meta);
        return { clipId: kept.clip.id, jobId: kept.job.id, clip, base: bases[(i + 1) % 2]! };
      }),
    );
    const jobDone = (base: string, jobId: number) =>
      waitFor(
        `job ${jobId}`,
        async () => {
          const job = await coach.data<{ status: string; error: string | null }>(base, `/api/v1/clubs/${clubId}/jobs/${jobId}`);
          if (job.status === 'failed') throw new Error(`Job ${jobId} failed: ${job.error}`);
          return job.status === 'done' ? job : null;
        },
        600_000,
      );
    await Promise.all(uploads.map((u) => jobDone(u.base, u.jobId)));
    const processed = Date.now();
    const follows = await Promise.all(
      uploads.map(async (u) => {
        const flight = await coach.data<{ id: number }>(u.base, `/api/v1/clubs/${clubId}/clips/${u.clipId}/flights`, {
          method: 'POST',
          json: { athleteId: athlete.id, action: 'punt', ballId: 'football-5' },
        });
        const job = await coach.data<{ id: number }>(u.base, `/api/v1/clubs/${clubId}/flights/${flight.id}/follow`, {
          method: 'POST',
          json: { frame: u.clip.start.frame, xPx: u.clip.start.x, yPx: u.clip.start.y },
        });
        await jobDone(u.base, job.id);
        return job.id;
      }),
    );
    const finished = Date.now();

    const checks = await verify(clubId, uploads.map((u) => u.clipId), follows, procs, s3Endpoint, bucket);
    return { workers, wallS: (finished - started) / 1000, processS: (processed - started) / 1000, followS: (finished - processed) / 1000, checks };
  } catch (err) {
    for (const p of procs) console.error(`--- last output of ${p.name} ---\n${p.output.join('').slice(-3000)}`);
    throw err;
  } finally {
    await Promise.all(procs.map(stopProc));
    await rm(root, { recursive: true, force: true });
  }
}

/** The promises of the bench: each job claimed once and done, every clip's frames stored, scratch empty. */
async function verify(clubId: number, clipIds: number[], followJobIds: number[], procs: Proc[], s3Endpoint: string, bucket: string): Promise<string[]> {
  const { config } = await import('../../server/config');
  const conn = await mariadb.createConnection({ host: config.db.host, port: config.db.port, user: config.db.user, password: config.db.password, database: DB_NAME });
  const problems: string[] = [];
  try {
    const rows = (await conn.query('SELECT id, type, status, attempts, clip_id, worker_id FROM jobs WHERE club_id = ?', [clubId])) as {
      id: number;
      type: string;
      status: string;
      attempts: number;
      clip_id: number | null;
      worker_id: string | null;
    }[];
    const processJobs = rows.filter((r) => r.type === 'clip.process');
    const followJobs = rows.filter((r) => r.type === 'flight.follow');
    for (const clipId of clipIds) {
      const mine = processJobs.filter((r) => Number(r.clip_id) === clipId);
      if (mine.length !== 1) problems.push(`clip ${clipId} has ${mine.length} processing jobs`);
    }
    if (followJobs.length !== followJobIds.length) problems.push(`${followJobs.length} follow jobs for ${followJobIds.length} requests`);
    for (const r of rows) {
      if (r.status !== 'done') problems.push(`job ${r.id} (${r.type}) is ${r.status}`);
      if (Number(r.attempts) !== 1) problems.push(`job ${r.id} (${r.type}) was claimed ${r.attempts} times`);
    }
    const byWorker = new Map<string, number>();
    for (const r of rows) byWorker.set(r.worker_id ?? '?', (byWorker.get(r.worker_id ?? '?') ?? 0) + 1);
    const clips = (await conn.query('SELECT id, frame_count FROM clips WHERE club_id = ? AND frames_ready = 1', [clubId])) as { id: number; frame_count: number }[];
    if (clips.length !== clipIds.length) problems.push(`${clips.length} of ${clipIds.length} clips have their frames`);
    const { S3Storage } = await import('../../server/storage');
    const scratch = await mkdtemp(join(tmpdir(), 'arcwright-scale-check-'));
    const store = new S3Storage({ bucket, endpoint: s3Endpoint, region: 'us-east-1', forcePathStyle: true, accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', scratchDir: scratch });
    for (const c of clips) {
      const keys = await store.list(`clubs/${clubId}/clips/${c.id}/frames`);
      if (keys.length !== Number(c.frame_count) + 1) problems.push(`clip ${c.id}: ${keys.length} objects for ${c.frame_count} frames and a strip`);
    }
    const leftParts = (await store.list('partial-uploads')).filter((key) => !key.endsWith('.kept'));
    if (leftParts.length > 0) problems.push(`${leftParts.length} objects of unfinished uploads left in the bucket: ${leftParts.slice(0, 3).join(', ')}`);
    const open = await store.client.send(new ListMultipartUploadsCommand({ Bucket: bucket, Prefix: 'partial-uploads/' }));
    if ((open.Uploads ?? []).length > 0) problems.push(`${open.Uploads!.length} multipart uploads left open in the bucket`);
    await rm(scratch, { recursive: true, force: true });
    for (const p of procs) {
      const left = await readdir(join(p.scratch, '.work')).catch(() => [] as string[]);
      if (left.length > 0) problems.push(`${p.name} left ${left.length} entries in its scratch folder: ${left.slice(0, 3).join(', ')}`);
    }
    const spread = [...byWorker.entries()].map(([w, n]) => `${w.replace(/@.*/, '')}…${w.slice(-4)}: ${n}`).join(', ');
    if (problems.length > 0) throw new Error(`Scale bench found problems:\n  ${problems.join('\n  ')}`);
    return [
      `${rows.length} jobs, each claimed once and done`,
      `${clips.length} clips with all frames in the bucket`,
      'no parts or multipart uploads of resumable uploads left in the bucket',
      'scratch folders empty',
      `jobs per worker: ${spread}`,
    ];
  } finally {
    await conn.end();
  }
}

export async function run(): Promise<void> {
  const ensure = spawnSync('bash', ['scripts/db.sh', 'start'], { env: { ...process.env, DB_NAME }, stdio: 'inherit' });
  if (ensure.status !== 0) throw new Error('Could not start the private MariaDB (scripts/db.sh start).');
  const { recreateDatabase } = await import('../../tests/support/db');
  const { migrateDatabase } = await import('../../tests/support/global-setup');
  const { startS3Fake } = await import('../../tests/support/s3');
  console.log(`rendering ${CLIPS} clips (once, into .data/bench/scale)…`);
  const clips = await benchClips();
  const fake = await startS3Fake({ port: S3_PORT, bucket: 'arcwright-bench' });
  const recreate = async () => {
    await recreateDatabase(DB_NAME);
    await migrateDatabase(DB_NAME);
  };
  try {
    const results: RunResult[] = [];
    for (const workers of [3, 1]) {
      console.log(`run with 2 web processes and ${workers} worker${workers === 1 ? '' : 's'}…`);
      const result = await runOnce(workers, clips, fake.endpoint, fake.bucket, recreate);
      for (const line of result.checks) console.log(`  ✓ ${line}`);
      results.push(result);
    }
    console.log(`\n${CLIPS} clips uploaded at once (resumable, each half through either web process), processed and auto-followed (S3 fake, MariaDB ${DB_NAME}):`);
    console.log('workers | processing s | following s | wall s');
    for (const r of results) console.log(`${String(r.workers).padStart(7)} | ${r.processS.toFixed(1).padStart(12)} | ${r.followS.toFixed(1).padStart(11)} | ${r.wallS.toFixed(1).padStart(6)}`);
    const [many, one] = results;
    if (many && one) console.log(`speed-up of 3 workers over 1: ×${(one.wallS / many.wallS).toFixed(2)} (on ${(await import('node:os')).cpus().length} cores)`);
  } finally {
    await fake.stop();
  }
}
