import { readdir, utimes } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ballProps, generateTrack } from '../../shared/physics';
import { runSeeders } from '../../server/seeders';
import { DEMO_PASSWORD, seed as seedClub } from '../../server/seeders/0001-demo-club';
import { seed as seedFlights } from '../../server/seeders/0002-demo-flights';
import { BALLS } from '../../shared/physics';
import { clipLayout, daysBefore, DEMO_SESSIONS, type DemoFlightPlan, type DemoSessionPlan } from '../../server/seeders/demo/plan';
import { seededTracks } from '../../server/seeders/demo/tracks';
import { loadFitInput, sessionAir } from '../../server/services/fit-input';
import { sequelize, Session } from '../../server/models';
import { signIn, testApp, type ApiClient } from '../support/app';
import { useTestStorage, type TestStorage } from './clips/helpers';
import { testWorker } from './clips/worker-helper';

/** Tolerances of the fitted flights against the launch and C_d the clips were rendered from. */
const SPEED_TOLERANCE = 0.01; // relative
const ANGLE_TOLERANCE_DEG = 0.5;
const CD_TOLERANCE = 0.05; // relative

/** The flights rendered as clips. */
const PLANS: { session: DemoSessionPlan; flight: DemoFlightPlan }[] = DEMO_SESSIONS.flatMap((session) => session.flights.map((flight) => ({ session, flight })));
/** The reps seeded as tracks without footage. */
const TRACKS = DEMO_SESSIONS.flatMap((session) => seededTracks(session));
const ALL_FLIGHTS = PLANS.length + TRACKS.length;

interface ClipBody {
  id: number;
  label: string;
  sessionId: number;
  status: string;
  framesReady: boolean;
  captureFps: number;
  playbackFps: number;
  slowMotion: boolean;
  width: number;
  height: number;
  frameCount: number;
  calibration: { metresPerPixel: number; levelAngleDeg: number; ballCheck: { ballId: string; ratio: number; ok: boolean } | null } | null;
}

interface FlightBody {
  id: number;
  clipId: number;
  sessionId: number;
  athleteName: string;
  action: string;
  ballId: string;
  status: string;
  pointCount: number;
  attentionReason: string | null;
  latestFit: { model: string; status: string; launchSpeedMps: number; launchAngleDeg: number; carryM: number } | null;
}

async function tableCounts(): Promise<Record<string, number>> {
  const tables = ['sessions', 'clips', 'calibrations', 'flights', 'track_points', 'jobs', 'fits', 'flight_actions', 'athlete_profiles'];
  const out: Record<string, number> = {};
  for (const table of tables) {
    const [rows] = await sequelize.query(`SELECT COUNT(*) AS n FROM ${table}`);
    out[table] = Number((rows as { n: number }[])[0]!.n);
  }
  return out;
}

async function workFolders(store: TestStorage): Promise<string[]> {
  const names = await readdir(join(store.root, '.work')).catch(() => [] as string[]);
  return names.filter((n) => n.startsWith('demo-flights-'));
}

describe('demo flights seed', () => {
  let store: TestStorage;

  beforeAll(async () => {
    store = await useTestStorage();
  });

  afterAll(async () => {
    await store.remove();
  });

  it('leaves no rows and no clip files when the seeding transaction rolls back', async () => {
    const failed = sequelize.transaction(async (transaction) => {
      await seedClub(transaction);
      await seedFlights(transaction);
      throw new Error('a later seeder failed');
    });
    await expect(failed).rejects.toThrow('a later seeder failed');
    expect(await Session.count({ where: { venue: DEMO_SESSIONS.map((s) => s.venue) } })).toBe(0);
    expect(await store.storage.list('clubs')).toEqual([]);
    // The rendered clips wait in a work folder that the next run sweeps once it is stale.
    const left = await workFolders(store);
    expect(left).toHaveLength(1);
    const old = new Date(Date.now() - 60 * 60 * 1000);
    await utimes(join(store.root, '.work', left[0]!), old, old);
  }, 60_000);

  describe('when seeded and the worker has run', () => {
    let coach: ApiClient;
    let athlete: ApiClient;
    let clubId: number;
    let clips: ClipBody[];
    let flights: FlightBody[];

    let seedLines: string[];
    let sessionIds: Map<string, number>;

    beforeAll(async () => {
      seedLines = await runSeeders();
      await testWorker('seed-demo').drain();
      const app = testApp();
      coach = await signIn(app, 'coach@fennickvale.example', DEMO_PASSWORD);
      athlete = await signIn(app, 'athlete@fennickvale.example', DEMO_PASSWORD);
      const me = (await coach.get('/api/v1/auth/me')).body.data as { memberships: { clubId: number; clubName: string }[] };
      clubId = me.memberships.find((m) => m.clubName === 'Fennick Vale Sporting Club')!.clubId;
      clips = (await coach.get(`/api/v1/clubs/${clubId}/clips?pageSize=200`)).body.data as ClipBody[];
      flights = (await coach.get(`/api/v1/clubs/${clubId}/flights?pageSize=200`)).body.data as FlightBody[];
      const sessions = (await coach.get(`/api/v1/clubs/${clubId}/sessions`)).body.data as { id: number; venue: string }[];
      sessionIds = new Map(sessions.map((s) => [s.venue, s.id]));
    }, 120_000);

    function clipOf(flight: DemoFlightPlan): ClipBody {
      const clip = clips.find((c) => c.label === flight.clip.label);
      if (!clip) throw new Error(`no clip "${flight.clip.label}"`);
      return clip;
    }

    /** The clip of a seeded rep: its label within its session. */
    function trackClip(track: (typeof TRACKS)[number]): ClipBody {
      const sessionId = sessionIds.get(track.session.venue);
      const clip = clips.find((c) => c.label === track.clip.label && c.sessionId === sessionId);
      if (!clip) throw new Error(`no clip "${track.clip.label}" in "${track.session.venue}"`);
      return clip;
    }

    function flightOf(flight: DemoFlightPlan): FlightBody {
      const clip = clipOf(flight);
      const found = flights.find((f) => f.clipId === clip.id);
      if (!found) throw new Error(`no flight in clip "${flight.clip.label}"`);
      return found;
    }

    it('creates four sessions of the last month in clearly different air and wind, with their conditions', async () => {
      const res = await coach.get(`/api/v1/clubs/${clubId}/sessions`);
      expect(res.status).toBe(200);
      const sessions = res.body.data as { venue: string; date: string; conditions: Record<string, number | null>; clipCount: number; flightCount: number }[];
      expect(DEMO_SESSIONS.length).toBeGreaterThanOrEqual(4);
      for (const plan of DEMO_SESSIONS) {
        const session = sessions.find((s) => s.venue === plan.venue);
        const count = plan.flights.length + plan.blocks.reduce((n, b) => n + b.reps, 0);
        expect(session).toMatchObject({ date: plan.date, conditions: plan.conditions, clipCount: count, flightCount: count });
        expect(plan.date >= daysBefore(31)).toBe(true);
        expect(plan.date <= daysBefore(0)).toBe(true);
      }
      // Clearly different: temperatures at least 15 K apart, densities 0.9 to 1.3 kg/m³, a tailwind and a headwind.
      const temperatures = DEMO_SESSIONS.map((s) => s.conditions.airTemperatureK!);
      expect(Math.max(...temperatures) - Math.min(...temperatures)).toBeGreaterThan(15);
      const densities = DEMO_SESSIONS.map((s) => sessionAir(s.conditions).densityKgM3);
      expect(Math.max(...densities) - Math.min(...densities)).toBeGreaterThan(0.3);
      const along = DEMO_SESSIONS.map((s) => (s.conditions.windSpeedMps ?? 0) * Math.cos(((s.conditions.windDirectionDeg ?? 90) * Math.PI) / 180));
      expect(Math.max(...along)).toBeGreaterThan(3);
      expect(Math.min(...along)).toBeLessThan(-3);
      const [coast, mountain] = DEMO_SESSIONS;
      expect(coast!.conditions).toMatchObject({ airTemperatureK: 282.15, airPressurePa: 101_500, relativeHumidityPct: 80 });
      expect(mountain!.conditions).toMatchObject({ airTemperatureK: 302.15, altitudeM: 1600, relativeHumidityPct: 30 });
      // Thin warm air against dense cool air: the point of having both.
      expect(sessionAir(coast!.conditions).densityKgM3).toBeGreaterThan(1.24);
      expect(sessionAir(mountain!.conditions).densityKgM3).toBeLessThan(0.97);
    });

    it('stores one processed clip per rendered flight, drawn at the calibration scale so the ball check agrees', async () => {
      expect(clips).toHaveLength(ALL_FLIGHTS);
      for (const { session, flight } of PLANS) {
        const clip = clipOf(flight);
        const layout = clipLayout(session, flight);
        expect(clip).toMatchObject({ status: 'ready', framesReady: true, width: flight.clip.width, height: flight.clip.height, captureFps: flight.clip.captureFps });
        expect(clip.playbackFps).toBeCloseTo(flight.clip.playbackFps ?? flight.clip.captureFps, 6);
        expect(clip.slowMotion).toBe(flight.clip.playbackFps !== undefined && flight.clip.playbackFps < flight.clip.captureFps);
        expect(clip.frameCount).toBe(Math.round(layout.durationS * layout.captureFps));
        expect(await store.storage.list(`clubs/${clubId}/clips/${clip.id}/source`)).toEqual([`clubs/${clubId}/clips/${clip.id}/source/video.mp4`]);
        expect(clip.calibration).not.toBeNull();
        expect(clip.calibration!.metresPerPixel).toBeCloseTo(1 / layout.pxPerMetre, 12);
        expect(clip.calibration!.levelAngleDeg).toBeCloseTo(0, 12);
        expect(clip.calibration!.ballCheck).toMatchObject({ ballId: flight.ballId, ok: true });
        expect(Math.abs(clip.calibration!.ballCheck!.ratio - 1)).toBeLessThan(0.02);
      }
      expect(clips.some((c) => c.slowMotion)).toBe(true);
      expect(await workFolders(store)).toEqual([]);
    });

    it('keeps the seeded reps in clips without footage, calibrated, with no frames to open', async () => {
      for (const track of TRACKS) {
        const clip = trackClip(track);
        expect(clip).toMatchObject({ status: 'ready', framesReady: false, width: 1280, height: 720, captureFps: track.clip.captureFps });
        expect(clip!.calibration).not.toBeNull();
        expect(await store.storage.list(`clubs/${clubId}/clips/${clip!.id}`)).toEqual([]);
      }
      expect(seedLines.find((l) => l.startsWith('0002-demo-flights'))).toMatch(
        new RegExp(`${ALL_FLIGHTS} flight\\(s\\): ${PLANS.length} rendered as clip\\(s\\).*${TRACKS.length} seeded as traced tracks without footage`),
      );
    });

    it('holds at least 60 fitted flights, with 3 to 5 reps per athlete, action and session', () => {
      expect(flights).toHaveLength(ALL_FLIGHTS);
      const fitted = flights.filter((f) => f.status === 'fitted');
      expect(fitted.length).toBeGreaterThanOrEqual(60);
      const reps = new Map<string, number>();
      for (const f of flights) reps.set(`${f.sessionId}|${f.athleteName}|${f.action}`, (reps.get(`${f.sessionId}|${f.athleteName}|${f.action}`) ?? 0) + 1);
      for (const [key, n] of reps) {
        expect(n, key).toBeGreaterThanOrEqual(3);
        expect(n, key).toBeLessThanOrEqual(5);
      }
      expect(new Set(flights.map((f) => f.athleteName)).size).toBeGreaterThanOrEqual(8);
      expect(new Set(flights.map((f) => f.action)).size).toBeGreaterThanOrEqual(7);
    });

    it('fits the seeded reps with the engine and recovers their launch', () => {
      for (const track of TRACKS.filter((t) => t.fault === null)) {
        const body = flights.find((f) => f.clipId === trackClip(track).id)!;
        expect(body.status, track.key).toBe('fitted');
        expect(Math.abs(body.latestFit!.launchSpeedMps / track.launch.speed - 1), track.key).toBeLessThan(0.02);
        expect(body.latestFit!.carryM, track.key).toBeGreaterThan(0);
      }
    });

    it('puts the faulty reps in "needs attention" with the reason the fit gave', () => {
      const attention = flights.filter((f) => f.status === 'needs_attention');
      expect(attention.map((f) => f.athleteName).sort()).toEqual(['Cato Merriweather', 'Elspeth Rook', 'Orrin Calloway']);
      const reason = (name: string) => attention.find((f) => f.athleteName === name)!.attentionReason ?? '';
      expect(reason('Elspeth Rook')).toMatch(/calibration scale may be off/);
      expect(reason('Cato Merriweather')).toMatch(/stretched ×4/);
      expect(reason('Orrin Calloway')).toMatch(/needs at least 5/);
    });

    it('keeps a light ball beside a heavy one of the same size in one session', () => {
      const light = BALLS['table-tennis']!;
      const heavy = BALLS.golf!;
      expect(Math.abs(heavy.diameterM.nominal / light.diameterM.nominal - 1)).toBeLessThan(0.1);
      expect(heavy.massKg.nominal / light.massKg.nominal).toBeGreaterThan(10);
      const bySession = new Map<number, Set<string>>();
      for (const f of flights) bySession.set(f.sessionId, (bySession.get(f.sessionId) ?? new Set()).add(f.ballId));
      expect([...bySession.values()].some((balls) => balls.has('table-tennis') && balls.has('golf'))).toBe(true);
    });

    it('tags flights of several balls and actions to the demo athletes', () => {
      for (const { session, flight } of PLANS) {
        const body = flightOf(flight);
        expect(body).toMatchObject({ athleteName: flight.athlete, action: flight.action, ballId: flight.ballId });
        expect(clips.find((c) => c.id === body.clipId)!.sessionId).toBe(body.sessionId);
        expect(session.venue).toBeTruthy();
      }
      expect(new Set(flights.map((f) => f.ballId)).size).toBeGreaterThanOrEqual(4);
      expect(new Set(flights.map((f) => f.athleteName)).size).toBeGreaterThanOrEqual(3);
    });

    it('shows Isla Brackwater her own flights, at least two, and nothing of the others', async () => {
      const res = await athlete.get(`/api/v1/clubs/${clubId}/flights?pageSize=200`);
      expect(res.status).toBe(200);
      const own = res.body.data as FlightBody[];
      expect(own.length).toBeGreaterThanOrEqual(2);
      expect(new Set(own.map((f) => f.athleteName))).toEqual(new Set(['Isla Brackwater']));
      expect(own.length).toBe(flights.filter((f) => f.athleteName === 'Isla Brackwater').length);
      const sessions = (await athlete.get(`/api/v1/clubs/${clubId}/sessions`)).body.data as unknown[];
      expect(sessions).toHaveLength(new Set(own.map((f) => f.sessionId)).size);
    });

    it('traces points that lie on the engine\'s flight within the tracing error', async () => {
      for (const { session, flight } of PLANS) {
        const layout = clipLayout(session, flight);
        const body = flightOf(flight);
        const points = (await coach.get(`/api/v1/clubs/${clubId}/flights/${body.id}/points`)).body.data as {
          frame: number; xM: number; yM: number; source: string; confidence: number | null;
        }[];
        expect(points.length).toBeGreaterThanOrEqual(40);
        expect(points[0]!.frame).toBe(layout.releaseFrame);
        expect(new Set(points.map((p) => p.source))).toEqual(new Set([flight.tracing.source]));
        // The generator's own integrator against the engine's, through the calibration: only the tracing error remains.
        const engine = generateTrack({ launch: flight.launch, ball: flight.ballId, air: layout.air, aero: { model: 'drag', cd: flight.cd }, fps: layout.captureFps });
        const sigmaM = flight.tracing.noisePx / layout.pxPerMetre;
        let sumSq = 0;
        for (const p of points) {
          const i = p.frame - layout.releaseFrame;
          const dx = p.xM - engine.x[i]!;
          const dy = p.yM - engine.y[i]!;
          expect(Math.hypot(dx, dy)).toBeLessThan(5 * sigmaM);
          sumSq += dx * dx + dy * dy;
        }
        const rmsPerCoordinate = Math.sqrt(sumSq / (2 * points.length));
        expect(rmsPerCoordinate).toBeGreaterThan(0.7 * sigmaM);
        expect(rmsPerCoordinate).toBeLessThan(1.3 * sigmaM);
      }
    });

    it('gives the fit the traced points in metres, the flight\'s ball and the air its clip was rendered in', async () => {
      for (const { session, flight } of PLANS) {
        const layout = clipLayout(session, flight);
        const body = flightOf(flight);
        const points = (await coach.get(`/api/v1/clubs/${clubId}/flights/${body.id}/points`)).body.data as { tS: number; xM: number; yM: number }[];
        const input = await loadFitInput(body.id);
        expect(input.calibration.clipId).toBe(body.clipId);
        expect(input.track.t).toHaveLength(points.length);
        points.forEach((p, i) => {
          expect(input.track.t[i]).toBeCloseTo(p.tS, 12);
          expect(input.track.x[i]).toBeCloseTo(p.xM, 9);
          expect(input.track.y[i]).toBeCloseTo(p.yM, 9);
        });
        expect(input.options.ball).toEqual(ballProps(flight.ballId));
        expect(input.options.windSpeed).toBeCloseTo(0, 9);
        expect(input.options.air!.densityKgM3).toBeCloseTo(layout.air.densityKgM3, 12);
      }
    });

    it(`fits every flight and recovers launch speed within ${SPEED_TOLERANCE * 100} % and C_d within ${CD_TOLERANCE * 100} %`, async () => {
      for (const { flight } of PLANS) {
        const body = flightOf(flight);
        expect(body.status).toBe('fitted');
        const fits = (await coach.get(`/api/v1/clubs/${clubId}/flights/${body.id}/fits`)).body.data as {
          model: string; status: string; result: { cd: number; cdError: number; launch: { speed: number; angleDeg: number; height: number } };
        }[];
        expect(fits).toHaveLength(1);
        const { result } = fits[0]!;
        expect(fits[0]!.model).toBe('drag');
        expect(Math.abs(result.launch.speed / flight.launch.speed - 1)).toBeLessThan(SPEED_TOLERANCE);
        expect(Math.abs(result.launch.angleDeg - flight.launch.angleDeg)).toBeLessThan(ANGLE_TOLERANCE_DEG);
        expect(Math.abs(result.cd / flight.cd - 1)).toBeLessThan(CD_TOLERANCE);
        // The stated error must cover the miss: within four standard errors.
        expect(Math.abs(result.cd - flight.cd)).toBeLessThan(4 * result.cdError);
      }
    });

    it('creates nothing new when the seed runs again', async () => {
      const before = await tableCounts();
      const files = await store.files();
      const lines = await runSeeders();
      expect(lines.find((l) => l.startsWith('0002-demo-flights'))).toMatch(/already present/);
      expect(await tableCounts()).toEqual(before);
      expect(await store.files()).toEqual(files);
    });
  });
});
