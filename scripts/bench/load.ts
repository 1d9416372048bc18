/**
 * Load run (`npm run bench load`): LOAD_USERS simulated coaches (default 50) for LOAD_SECONDS (default
 * 300) against an app on 127.0.0.1 with one in-process job worker, on the private MariaDB of the benches
 * (`.data/mariadb-load`, port LOAD_DB_PORT, default 3498). Each signs in once, then in a loop with a
 * second of thought between rounds: the overview and the lists, a new flight traced on its clip
 * (the true centres of the generated ball) and fitted, the flight's report and fits, and every fifth
 * round a new small clip uploaded. Prints the errors (any answer of 400 or more, or no answer) and
 * p50 / p95 / max per route.
 */
import { existsSync } from 'node:fs';
import { mkdir } from 'node:fs/promises';
import { resolve } from 'node:path';
import { readTruth, renderFlightClip, type FlightTruth } from '../../server/video/synth';
import { waitUntil } from '../../tests/support/process';
import { BenchClient, percentiles, signUpClub } from './support/client';
import { benchApp, benchDatabase, tearDown, type BenchApp } from './support/stack';

const USERS = Number(process.env.LOAD_USERS ?? 50);
const SECONDS = Number(process.env.LOAD_SECONDS ?? 300);
const DB_PORT = Number(process.env.LOAD_DB_PORT ?? 3498);
const PASSWORD = 'Bench-password-42';
/** Scene geometry of the generated 320×240 clip (server/video/synth.ts defaults). */
const PX_PER_M = 320 / 36;
const ORIGIN = { xPx: 320 * 0.08, yPx: 240 * 0.85 };
const CALIBRATION = {
  scale: { a: { ...ORIGIN }, b: { xPx: ORIGIN.xPx + 10 * PX_PER_M, yPx: ORIGIN.yPx }, distanceM: 10 },
  level: { a: { xPx: 10, yPx: ORIGIN.yPx }, b: { xPx: 300, yPx: ORIGIN.yPx } },
  origin: { ...ORIGIN },
  direction: 'right',
  ball: { ballId: 'football-5', diameterPx: 0.2228 * PX_PER_M },
};

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function loadClip(): Promise<{ path: string; truth: FlightTruth }> {
  const path = resolve('.data/bench/load-320x240-30fps.mp4');
  if (!existsSync(path) || !existsSync(`${path}.truth.json`)) {
    await mkdir(resolve('.data/bench'), { recursive: true });
    await renderFlightClip(path, { width: 320, height: 240, captureFps: 30, durationS: 1.6, ballRadiusPx: 6, preset: 'ultrafast' });
  }
  return { path, truth: await readTruth(`${path}.truth.json`) };
}

/** Distinct texts with their counts, most frequent first (at most ten). */
function tallyOf(texts: string[]): [string, number][] {
  const counts = new Map<string, number>();
  for (const t of texts) counts.set(t, (counts.get(t) ?? 0) + 1);
  return [...counts.entries()].sort((a, b) => b[1] - a[1]).slice(0, 10);
}

interface Tally {
  timings: Map<string, number[]>;
  errors: string[];
  rounds: number;
}

/** Counts an answer of 400 or more as an error, with its route and code. */
function check(tally: Tally, route: string, res: { status: number; body: { error?: { code: string } } | null }): boolean {
  if (res.status < 400) return true;
  tally.errors.push(`${route} -> ${res.status} ${res.body?.error?.code ?? ''}`);
  return false;
}

async function waitForClip(client: BenchClient, clubId: number, clipId: number, tally: Tally): Promise<boolean> {
  const clip = await waitUntil(
    'a clip to be processed',
    async () => {
      const res = await client.get(`/api/v1/clubs/${clubId}/clips/${clipId}`, 'GET /clubs/:id/clips/:id');
      const status = (res.body?.data as { status?: string } | undefined)?.status;
      return status === 'ready' || status === 'failed' ? status : null;
    },
    300_000,
    1000,
  );
  if (clip === 'failed') tally.errors.push('clip processing failed');
  return clip === 'ready';
}

async function user(app: BenchApp, n: number, clip: { path: string; truth: FlightTruth }, until: number, tally: Tally): Promise<void> {
  const email = `load-${process.pid}-${n}@bench.example`;
  const { clubId } = await signUpClub(app.base, email, PASSWORD);
  // Sign in as a coach does at the start of a day.
  const client = new BenchClient(app.base, tally.timings);
  if (!check(tally, 'POST /auth/signin', await client.json('POST', '/api/v1/auth/signin', { email, password: PASSWORD }, 'POST /auth/signin'))) return;
  const club = `/api/v1/clubs/${clubId}`;
  const athlete = await client.json('POST', `${club}/athletes`, { displayName: `Bench Athlete ${n}` }, 'POST /clubs/:id/athletes');
  const session = await client.json('POST', `${club}/sessions`, { date: '2025-04-12', venue: 'Bench Vale lower pitch', conditions: { airTemperatureK: 288.15, altitudeM: 0 } }, 'POST /clubs/:id/sessions');
  if (!check(tally, 'POST /clubs/:id/athletes', athlete) || !check(tally, 'POST /clubs/:id/sessions', session)) return;
  const athleteId = (athlete.body?.data as { id: number }).id;
  const sessionId = (session.body?.data as { id: number }).id;
  const uploadClip = async (): Promise<number | null> => {
    const res = await client.uploadVideo(`${club}/sessions/${sessionId}/clips`, clip.path, 'POST /clubs/:id/sessions/:id/clips');
    return check(tally, 'POST /clubs/:id/sessions/:id/clips', res) ? (res.body?.data as { clip: { id: number } }).clip.id : null;
  };
  const firstClip = await uploadClip();
  if (firstClip === null || !(await waitForClip(client, clubId, firstClip, tally))) return;
  if (!check(tally, 'PUT /clubs/:id/clips/:id/calibration', await client.json('PUT', `${club}/clips/${firstClip}/calibration`, CALIBRATION, 'PUT /clubs/:id/clips/:id/calibration'))) return;
  const points = clip.truth.frames
    .filter((f) => f.visible && f.frame >= clip.truth.launchFrame && (clip.truth.landingFrame === null || f.frame < clip.truth.landingFrame))
    .map((f) => ({ frame: f.frame, xPx: f.x, yPx: f.y }));

  for (let round = 0; Date.now() < until; round++) {
    for (const [route, path] of [
      ['GET /clubs/:id/overview', `${club}/overview`],
      ['GET /clubs/:id/sessions', `${club}/sessions`],
      ['GET /clubs/:id/clips', `${club}/clips`],
      ['GET /clubs/:id/flights', `${club}/flights`],
    ] as const) {
      check(tally, route, await client.get(path, route));
    }
    const flight = await client.json('POST', `${club}/clips/${firstClip}/flights`, { athleteId, action: 'punt', ballId: 'football-5' }, 'POST /clubs/:id/clips/:id/flights');
    if (check(tally, 'POST /clubs/:id/clips/:id/flights', flight)) {
      const flightId = (flight.body?.data as { id: number }).id;
      check(tally, 'PUT /clubs/:id/flights/:id/points', await client.json('PUT', `${club}/flights/${flightId}/points`, { points }, 'PUT /clubs/:id/flights/:id/points'));
      check(tally, 'POST /clubs/:id/flights/:id/fit', await client.json('POST', `${club}/flights/${flightId}/fit`, {}, 'POST /clubs/:id/flights/:id/fit'));
      check(tally, 'GET /clubs/:id/flights/:id', await client.get(`${club}/flights/${flightId}`, 'GET /clubs/:id/flights/:id'));
      check(tally, 'GET /clubs/:id/flights/:id/fits', await client.get(`${club}/flights/${flightId}/fits`, 'GET /clubs/:id/flights/:id/fits'));
    }
    if (round % 5 === 4) await uploadClip();
    tally.rounds++;
    await sleep(1000);
  }
}

export async function run(): Promise<void> {
  const db = await benchDatabase('load', DB_PORT);
  let app: BenchApp | null = null;
  const tally: Tally = { timings: new Map(), errors: [], rounds: 0 };
  try {
    const clip = await loadClip();
    // Every simulated coach signs up and signs in from 127.0.0.1: the per-address caps are raised to let them all in.
    app = await benchApp(db, {
      WORKERS_IN_WEB: '1',
      LOG_LEVEL: 'warn',
      SIGNUP_RATE_LIMIT_MAX: String(USERS + 10),
      SIGNIN_ADDRESS_RATE_LIMIT_MAX: String(USERS + 10),
    });
    const started = Date.now();
    const until = started + SECONDS * 1000;
    console.log(`${USERS} users for ${SECONDS} s against ${app.base}`);
    await Promise.all(
      Array.from({ length: USERS }, (_, n) =>
        // Users arrive over the first ten seconds.
        sleep((n * 10_000) / USERS).then(() => user(app!, n, clip, until, tally).catch((err: unknown) => void tally.errors.push(`user ${n}: ${(err as Error).message}`))),
      ),
    );
    const elapsed = (Date.now() - started) / 1000;
    const requests = [...tally.timings.values()].reduce((sum, list) => sum + list.length, 0);
    console.log(`rounds ${tally.rounds}, requests ${requests} in ${elapsed.toFixed(0)} s (${(requests / elapsed).toFixed(1)}/s), errors ${tally.errors.length}`);
    for (const line of [...new Set(tally.errors)].slice(0, 10)) console.log(`  error: ${line} (×${tally.errors.filter((e) => e === line).length})`);
    console.log('route                                        n      p50 ms   p95 ms   max ms');
    for (const [route, list] of [...tally.timings.entries()].sort()) {
      const p = percentiles(list);
      console.log(`${route.padEnd(44)} ${String(p.n).padStart(6)} ${p.p50.toFixed(0).padStart(8)} ${p.p95.toFixed(0).padStart(8)} ${p.max.toFixed(0).padStart(8)}`);
    }
    // The app's own account of its failures (log level error and above), so a failed run says why.
    const failures = app.proc.logLines().filter((l) => Number(l.level) >= 50);
    for (const [text, count] of tallyOf(failures.map((l) => `${String(l.msg).replace(/\d+/g, ':id')} ${String(l.cause ?? String(l.stack ?? '').split('\n')[0])}`.trim()))) console.log(`  app logged: ${text} (×${count})`);
    console.log(tally.errors.length === 0 ? 'RESULT load: ok (0 errors)' : 'RESULT load: FAILED');
    if (tally.errors.length > 0) process.exitCode = 1;
  } finally {
    await tearDown(app, db);
  }
}
