/**
 * API bench (`npm run bench api`, part of `npm run bench`): a club of 10,000 flights with 150,000 track
 * points in a database of its own (`arcwright_bench_api`, BENCH_DB_NAME), the app started against it on
 * 127.0.0.1, and autocannon at 20 concurrent clients on each request in turn. Prints, side by side,
 * requests per second and the p50/p95/p99 latency of each, with the targets beside them:
 * - the flights list (first, filtered and sorted page) and the Overview: p95 at most 50 ms;
 * - `GET /auth/me` (a signed-in trivial request): at least a third of the throughput of `GET /health`.
 * The data is seeded once with multi-row INSERTs and reused while the club holds what it should.
 * Beside the figures: the app process's CPU time per request, which depends far less on what else the
 * machine runs than throughput and latency do (the database's share is not in it).
 * Nothing asserts a time: the figures depend on the machine (and on what else runs on it).
 */
import { readFileSync } from 'node:fs';
import { availableParallelism, loadavg } from 'node:os';
import autocannon from 'autocannon';
import { mulberry32 } from '../../shared/physics';
import { ensureBenchDatabase, freePort, passwordSignIn, printTable, productionEnv, startProductionApp } from './support/production-app';

const DB_NAME = process.env.BENCH_DB_NAME ?? 'arcwright_bench_api';
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 20);
const DURATION_S = Number(process.env.BENCH_SECONDS ?? 8);
/**
 * Web processes of the app under load (WEB_PROCESSES of server/web-processes.ts). One unless told: on 2 cores
 * shared with the database a second web process only adds contention (measured: p95 up by a half).
 */
const WEB_PROCESSES = process.env.BENCH_WEB_PROCESSES ?? '1';

const FLIGHTS = 10_000;
const POINTS_PER_FLIGHT = 15;
const ATHLETES = 40;
const SESSIONS = 100;
const CLIPS_PER_SESSION = 10;
const FLIGHTS_PER_CLIP = FLIGHTS / (SESSIONS * CLIPS_PER_SESSION);
const ACTIONS = ['punt', 'drop_kick', 'long_throw', 'shot_put'] as const;
const BALLS_OF_ACTION: Record<(typeof ACTIONS)[number], string> = {
  punt: 'football-5',
  drop_kick: 'rugby',
  long_throw: 'football-5',
  shot_put: 'shot-women',
};
/** The bench club's name says which data layout it holds: another layout is seeded afresh. */
const CLUB_NAME = 'Bench Harrow Athletic (10k flights, layout 1)';
const EMAIL = 'bench-coach@arcwright.example';
const PASSWORD = 'bench-password-1';

const P95_TARGET_MS = 50;

type Sql = (sql: string, values?: unknown[]) => Promise<unknown>;

/** Inserts rows in chunks of multi-row INSERTs. */
async function insertRows(sql: Sql, table: string, columns: string[], rows: unknown[][], chunk = 2000): Promise<void> {
  const tuple = `(${columns.map(() => '?').join(', ')})`;
  for (let i = 0; i < rows.length; i += chunk) {
    const part = rows.slice(i, i + chunk);
    await sql(`INSERT INTO ${table} (${columns.join(', ')}) VALUES ${part.map(() => tuple).join(', ')}`, part.flat());
  }
}

/** Seeds the bench club unless it is already there in full; answers the ids the requests use. */
async function seedClub(): Promise<{ clubId: number; athleteId: number; flightId: number; seconds: number; reused: boolean }> {
  const started = Date.now();
  const { sequelize } = await import('../../server/db');
  const { migrateUp } = await import('../../server/migrate');
  const { hashPassword } = await import('../../server/auth/passwords');
  const { QueryTypes } = await import('sequelize');
  const sql: Sql = (text, values) => sequelize.query(text, { replacements: values });
  const select = <T extends object>(text: string, values: unknown[] = []) => sequelize.query<T>(text, { type: QueryTypes.SELECT, replacements: values });
  await migrateUp();

  const ids = async () => {
    const [club] = await select<{ id: number }>('SELECT id FROM clubs WHERE name = ?', [CLUB_NAME]);
    if (!club) return null;
    const [counts] = await select<{ flights: number; points: number }>(
      `SELECT (SELECT COUNT(*) FROM flights WHERE club_id = ?) AS flights,
              (SELECT COUNT(*) FROM track_points t JOIN flights f ON f.id = t.flight_id WHERE f.club_id = ?) AS points`,
      [club.id, club.id],
    );
    if (Number(counts?.flights) !== FLIGHTS || Number(counts?.points) !== FLIGHTS * POINTS_PER_FLIGHT) return null;
    const [athlete] = await select<{ id: number }>('SELECT MIN(id) AS id FROM athlete_profiles WHERE club_id = ?', [club.id]);
    const [flight] = await select<{ id: number }>("SELECT MAX(id) AS id FROM flights WHERE club_id = ? AND status = 'fitted'", [club.id]);
    return { clubId: Number(club.id), athleteId: Number(athlete!.id), flightId: Number(flight!.id) };
  };

  const existing = await ids();
  if (existing) {
    await sequelize.close();
    return { ...existing, seconds: (Date.now() - started) / 1000, reused: true };
  }

  // Another layout or a half-seeded club: start from an empty club (the foreign keys cascade).
  await sql('DELETE FROM clubs WHERE name LIKE ?', ['Bench Harrow Athletic%']);
  await sql('DELETE FROM users WHERE email = ?', [EMAIL]);
  const now = new Date();
  await sequelize.transaction(async (transaction) => {
    const tx: Sql = (text, values) => sequelize.query(text, { replacements: values, transaction });
    const selectTx = <T extends object>(text: string, values: unknown[] = []) =>
      sequelize.query<T>(text, { type: QueryTypes.SELECT, replacements: values, transaction });
    const rand = mulberry32(9);
    await tx("INSERT INTO clubs (name, sport_focus, units, default_conditions, created_at, updated_at) VALUES (?, 'multi-sport', 'metric', NULL, ?, ?)", [CLUB_NAME, now, now]);
    const [club] = await selectTx<{ id: number }>('SELECT id FROM clubs WHERE name = ?', [CLUB_NAME]);
    const clubId = Number(club!.id);
    await tx('INSERT INTO users (email, password_hash, google_sub, display_name, created_at, updated_at) VALUES (?, ?, NULL, ?, ?, ?)', [
      EMAIL, await hashPassword(PASSWORD), 'Bench Coach', now, now,
    ]);
    const [user] = await selectTx<{ id: number }>('SELECT id FROM users WHERE email = ?', [EMAIL]);
    await tx("INSERT INTO memberships (user_id, club_id, role, created_at, updated_at) VALUES (?, ?, 'admin', ?, ?)", [user!.id, clubId, now, now]);

    await insertRows(tx, 'athlete_profiles', ['club_id', 'user_id', 'display_name', 'birth_year', 'dominant_side', 'position', 'created_at', 'updated_at'],
      Array.from({ length: ATHLETES }, (_, i) => [clubId, null, `Bench Athlete ${String(i + 1).padStart(2, '0')}`, 1990 + (i % 20), i % 2 ? 'left' : 'right', null, now, now]));
    const athletes = (await selectTx<{ id: number }>('SELECT id FROM athlete_profiles WHERE club_id = ? ORDER BY id', [clubId])).map((r) => Number(r.id));

    const day0 = Date.UTC(2025, 0, 6);
    await insertRows(tx, 'sessions', ['club_id', 'date', 'venue', 'notes', 'air_temperature_k', 'air_pressure_pa', 'altitude_m', 'relative_humidity_pct', 'wind_speed_mps', 'wind_direction_deg', 'created_at', 'updated_at'],
      Array.from({ length: SESSIONS }, (_, i) => [
        clubId, new Date(day0 + i * 7 * 86_400_000).toISOString().slice(0, 10), `Bench field ${(i % 3) + 1}`, null,
        278 + rand() * 20, 99_000 + rand() * 3000, Math.round(rand() * 400), 40 + rand() * 50, rand() * 6, Math.round(rand() * 359), now, now,
      ]));
    const sessions = (await selectTx<{ id: number }>('SELECT id FROM sessions WHERE club_id = ? ORDER BY id', [clubId])).map((r) => Number(r.id));

    await insertRows(tx, 'clips', ['club_id', 'session_id', 'label', 'kind', 'original_name', 'size_bytes', 'source_key', 'container', 'codec', 'width', 'height',
      'rotation_deg', 'playback_fps', 'capture_fps', 'slow_motion', 'frame_count', 'frame_width', 'frame_height', 'frames_ready', 'frame_name_pattern', 'strip',
      'status', 'failure_reason', 'created_at', 'updated_at'],
      sessions.flatMap((sessionId, s) => Array.from({ length: CLIPS_PER_SESSION }, (_, c) => [
        clubId, sessionId, `Bench clip ${s + 1}.${c + 1}`, 'video', `bench-${s + 1}-${c + 1}.mp4`, 1_000_000, `bench/${s}/${c}`, 'mp4', 'h264', 1280, 720,
        0, 60, 60, 0, 240, null, null, 0, null, null, 'ready', null, now, now,
      ])));
    const clips = await selectTx<{ id: number; sessionId: number }>('SELECT id, session_id AS sessionId FROM clips WHERE club_id = ? ORDER BY id', [clubId]);

    const flightRows: unknown[][] = [];
    for (const [c, clip] of clips.entries()) {
      for (let k = 0; k < FLIGHTS_PER_CLIP; k += 1) {
        const n = c * FLIGHTS_PER_CLIP + k;
        const action = ACTIONS[n % ACTIONS.length]!;
        const status = n % 50 === 7 ? 'traced' : n % 33 === 5 ? 'needs_attention' : n % 5 === 0 ? 'reviewed' : 'fitted';
        flightRows.push([clubId, clip.id, athletes[Math.floor(rand() * athletes.length)], action, BALLS_OF_ACTION[action], 10, 10 + POINTS_PER_FLIGHT, status,
          status === 'needs_attention' ? 'The fit did not converge: the track holds too few points near the apex.' : null, null, now, now]);
      }
    }
    await insertRows(tx, 'flights', ['club_id', 'clip_id', 'athlete_profile_id', 'action', 'ball_id', 'frame_start', 'frame_end', 'status', 'attention_reason', 'notes', 'created_at', 'updated_at'], flightRows);
    const flights = await selectTx<{ id: number; status: string }>('SELECT id, status FROM flights WHERE club_id = ? ORDER BY id', [clubId]);

    const points: unknown[][] = [];
    const fits: unknown[][] = [];
    for (const f of flights) {
      const speed = 18 + rand() * 12;
      const angle = 30 + rand() * 25;
      for (let p = 0; p < POINTS_PER_FLIGHT; p += 1) {
        const t = p / 60;
        points.push([f.id, 10 + p, 100 + speed * t * 40, 600 - (speed * t - 4.9 * t * t) * 40, 6, 'auto', 0.9]);
      }
      if (f.status === 'traced') continue;
      const carry = (speed * speed * Math.sin((2 * angle * Math.PI) / 180)) / 9.81 * 0.8;
      fits.push([clubId, f.id, null, null, 'drag', 'bench', f.status === 'needs_attention' ? 'needs_attention' : 'fitted', speed, angle, carry, '[]', '{}',
        JSON.stringify({ cd: 0.25, cdError: 0.02, standardCarry: carry * 1.01 }), now, now]);
    }
    await insertRows(tx, 'track_points', ['flight_id', 'frame', 'x_px', 'y_px', 'radius_px', 'source', 'confidence'], points, 5000);
    await insertRows(tx, 'fits', ['club_id', 'flight_id', 'job_id', 'calibration_id', 'model', 'engine_version', 'status', 'launch_speed_mps', 'launch_angle_deg',
      'carry_m', 'warnings', 'params', 'result', 'created_at', 'updated_at'], fits);
    // What the Fit model's create hook keeps on each flight (one fit per flight here).
    await tx(`UPDATE flights f JOIN fits x ON x.flight_id = f.id SET f.latest_fit_id = x.id, f.fit_launch_speed_mps = x.launch_speed_mps,
      f.fit_launch_angle_deg = x.launch_angle_deg, f.fit_carry_m = x.carry_m, f.fit_standard_carry_m = JSON_VALUE(x.result, '$.standardCarry') WHERE f.club_id = ?`, [clubId]);
  });
  await sql(`ANALYZE TABLE flights, fits, track_points, clips, sessions, athlete_profiles`);
  const seeded = await ids();
  await sequelize.close();
  if (!seeded) throw new Error('The bench club was not seeded in full; run the bench again.');
  return { ...seeded, seconds: (Date.now() - started) / 1000, reused: false };
}

/** CPU seconds (user + system) one process has used so far, from /proc (null where there is none). */
function ownCpuSeconds(pid: number): number | null {
  try {
    const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
    // utime and stime are fields 14 and 15 of the file (11 and 12 after the command name), in clock ticks of 1/100 s.
    return (Number(fields[11]) + Number(fields[12])) / 100;
  } catch {
    return null;
  }
}

/** CPU seconds of the app: its process and its web processes (WEB_PROCESSES above 1), from /proc. */
function cpuSeconds(pid: number | undefined): number | null {
  if (pid === undefined) return null;
  const own = ownCpuSeconds(pid);
  if (own === null) return null;
  let children: number[] = [];
  try {
    children = readFileSync(`/proc/${pid}/task/${pid}/children`, 'utf8').trim().split(/\s+/).filter(Boolean).map(Number);
  } catch {
    // no children file: count the process alone
  }
  return children.reduce((sum, child) => sum + (ownCpuSeconds(child) ?? 0), own);
}

interface Figures {
  /** The app process's CPU time per answered request (ms): the cost of a request whatever else runs on the machine. */
  cpuMs: number | null;
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
}

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!;
}

/** Loads one URL with autocannon; latencies from every response (autocannon's own summary has no p95). */
async function load(url: string, cookie: string | null, appPid: number | undefined): Promise<Figures> {
  const times: number[] = [];
  const cpuBefore = cpuSeconds(appPid);
  let errors = 0;
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon({ url, connections: CONNECTIONS, duration: DURATION_S, headers: cookie ? { cookie } : {} }, (err, res) =>
      err ? reject(err instanceof Error ? err : new Error(String(err))) : resolve(res),
    );
    instance.on('response', (_client, statusCode, _bytes, responseTime) => {
      if (statusCode >= 400) errors += 1;
      times.push(responseTime);
    });
  });
  times.sort((a, b) => a - b);
  const cpuAfter = cpuSeconds(appPid);
  const cpuMs = cpuBefore === null || cpuAfter === null || times.length === 0 ? null : ((cpuAfter - cpuBefore) * 1000) / times.length;
  return { cpuMs, rps: result.requests.average, p50: percentile(times, 50), p95: percentile(times, 95), p99: percentile(times, 99), errors: errors + result.errors };
}

export async function run(): Promise<void> {
  process.env.LOG_LEVEL ??= 'warn';
  // Points the server modules at the bench database before they read their configuration.
  await ensureBenchDatabase(DB_NAME);
  const seeded = await seedClub();
  console.log(
    `club of ${FLIGHTS.toLocaleString('en')} flights, ${(FLIGHTS * POINTS_PER_FLIGHT).toLocaleString('en')} track points in "${DB_NAME}" ` +
      `(${seeded.reused ? 'reused' : 'seeded'} in ${seeded.seconds.toFixed(1)} s); ${CONNECTIONS} clients, ${DURATION_S} s per request; ` +
      `app with WEB_PROCESSES=${WEB_PROCESSES} (BENCH_WEB_PROCESSES); ` +
      `load average ${loadavg()[0]!.toFixed(1)} on ${availableParallelism()} cores before the run (the figures hold only for a machine otherwise idle)`,
  );

  // BENCH_CPU_PROF=DIR writes the app's CPU profile there (open it in Chrome's DevTools) to find where a request spends its time.
  const profile = process.env.BENCH_CPU_PROF ? ['--cpu-prof', '--cpu-prof-dir', process.env.BENCH_CPU_PROF] : [];
  const app = await startProductionApp(productionEnv(DB_NAME, await freePort(), { WEB_PROCESSES }), profile);
  const { base, child } = app;
  try {
    const cookie = await passwordSignIn(base, EMAIL, PASSWORD);
    const club = `${base}/api/v1/clubs/${seeded.clubId}`;
    const cases: { name: string; url: string; auth: boolean; target: (f: Figures, health: Figures) => string }[] = [
      { name: 'GET /health', url: `${base}/api/v1/health`, auth: false, target: () => '' },
      { name: 'GET /auth/me', url: `${base}/api/v1/auth/me`, auth: true, target: (f, h) => verdict(f.rps >= h.rps / 3, `≥ ${Math.round(h.rps / 3)} req/s (⅓ of /health)`) },
      { name: 'flights, first page', url: `${club}/flights`, auth: true, target: p95Target },
      { name: 'flights, filtered page', url: `${club}/flights?athleteId=${seeded.athleteId}&action=punt&status=fitted&page=2&pageSize=25`, auth: true, target: p95Target },
      { name: 'flights, sorted page', url: `${club}/flights?sort=carry&order=desc&page=3`, auth: true, target: p95Target },
      { name: 'flight report data', url: `${club}/flights/${seeded.flightId}`, auth: true, target: () => '' },
      { name: 'Overview', url: `${club}/overview`, auth: true, target: p95Target },
    ];
    const rows: string[][] = [];
    let health: Figures | null = null;
    // BENCH_ONLY=auth narrows a run to the requests whose name holds the word (GET /health always runs: the others compare with it).
    const only = process.env.BENCH_ONLY?.toLowerCase();
    for (const c of cases.filter((c, i) => i === 0 || !only || c.name.toLowerCase().includes(only))) {
      const f = await load(c.url, c.auth ? cookie : null, child.pid);
      health ??= f;
      rows.push([c.name, f.rps.toFixed(0), f.p50.toFixed(1), f.p95.toFixed(1), f.p99.toFixed(1), f.cpuMs === null ? '—' : f.cpuMs.toFixed(2), String(f.errors), c.target(f, health)]);
    }
    printTable(['request', 'req/s', 'p50 ms', 'p95 ms', 'p99 ms', 'app CPU ms/req', 'errors', 'target'], rows);
  } finally {
    await app.stop();
  }
}

function verdict(ok: boolean, text: string): string {
  return `${text} ${ok ? 'met' : 'MISSED'}`;
}

function p95Target(f: Figures): string {
  return verdict(f.p95 <= P95_TARGET_MS, `p95 ≤ ${P95_TARGET_MS} ms`);
}
