import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Flight, FlightAction, Job } from '../../../server/models';
import { clipUploadsRouter } from '../../../server/routes/clip-uploads';
import { clipsRouter } from '../../../server/routes/clips';
import { exportsRouter } from '../../../server/routes/exports';
import { flightsRouter } from '../../../server/routes/flights';
import { jobsRouter } from '../../../server/routes/jobs';
import { sessionsRouter } from '../../../server/routes/sessions';
import { createClubFixture, type ApiClient, type ClubFixture } from '../../support/app';
import { routesOf } from '../../support/routes';
import { createSession, flightClip, upload, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

/**
 * Who may use each clips route. Reads: every role, an athlete only for records holding their own flights
 * (others' → 404). Writes: admins and coaches; athletes 403. Another club's admin: 404. Anonymous: 401.
 */
let fx: ClubFixture;
let store: TestStorage;
let dir: string;
const ids = {
  session: 0, // holds the athlete's own flight
  otherSession: 0, // holds only someone else's flight
  clip: 0,
  otherClip: 0,
  ownFlight: 0,
  otherFlight: 0,
  job: 0,
  usedAction: 0,
  action: 0,
};
let seq = 0;

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-authz-'));
  fx = await createClubFixture();
  ids.session = await createSession(fx.coach, fx.clubId, 'Authz main');
  ids.otherSession = await createSession(fx.coach, fx.clubId, 'Authz other');
  const { videoPath } = await flightClip(dir);
  const res = await upload(fx.coach, fx.clubId, ids.session, { video: videoPath });
  ids.clip = res.body.data.clip.id;
  ids.job = res.body.data.job.id;
  await testWorker().drain();
  const mk = async (clipId: number, athleteId: number) =>
    (await fx.coach.post(`/api/v1/clubs/${fx.clubId}/clips/${clipId}/flights`, { athleteId, action: 'punt', ballId: 'football-5' })).body.data.id as number;
  ids.ownFlight = await mk(ids.clip, fx.members.athlete.athleteProfileId!);
  ids.otherFlight = await mk(ids.clip, fx.otherAthleteProfileId);
  const other = await Clip.create({
    clubId: fx.clubId,
    sessionId: ids.otherSession,
    label: 'not the athlete’s',
    kind: 'video',
    originalName: 'x.mp4',
    sizeBytes: 1,
    sourceKey: 'none',
    container: 'mp4',
    codec: 'h264',
    width: 320,
    height: 240,
    playbackFps: 30,
    captureFps: 30,
    frameCount: 48,
    frameNamePattern: null,
    strip: null,
    failureReason: null,
  });
  ids.otherClip = other.id;
  await Flight.create({ clubId: fx.clubId, clipId: other.id, athleteProfileId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', frameStart: 0, frameEnd: 47, attentionReason: null, notes: null });
  ids.usedAction = (await FlightAction.findOne({ where: { clubId: fx.clubId, key: 'punt' } }))!.id;
  ids.action = (await FlightAction.findOne({ where: { clubId: fx.clubId, key: 'pitch' } }))!.id;
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

type Method = 'get' | 'head' | 'post' | 'put' | 'patch' | 'delete';
interface RouteCase {
  name: string;
  /** The Express route pattern, to prove the table covers every route. */
  route: string;
  method: Method;
  /** Path under /api/v1/clubs/:clubId; `own` picks the athlete's record or someone else's. */
  path: (own: boolean) => string | Promise<string>;
  body?: () => unknown;
  /** Status for admins and coaches (a list where either may come). */
  staff: number | number[];
  /** Reads: athletes get `staff` on their own records and 404 on others'. Writes: 403. */
  write: boolean;
}

const calibrationBody = () => ({
  scale: { a: { xPx: 10, yPx: 200 }, b: { xPx: 110, yPx: 200 }, distanceM: 10 },
  origin: { xPx: 10, yPx: 200 },
  direction: 'right',
});

async function freshFlight(): Promise<string> {
  const f = await Flight.create({ clubId: fx.clubId, clipId: ids.clip, athleteProfileId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', frameStart: 0, frameEnd: 47, attentionReason: null, notes: null });
  return `/flights/${f.id}`;
}

const UPLOAD = '/clubs/:clubId/sessions/:sessionId/clips/uploads/:uploadId';
/** An id of the right form that names no upload: refusals come before the upload is looked up. */
const UPLOAD_ID = 'a'.repeat(32);

const routes: RouteCase[] = [
  { name: 'list sessions', route: '/clubs/:clubId/sessions', method: 'get', path: () => '/sessions', staff: 200, write: false },
  { name: 'read a session', route: '/clubs/:clubId/sessions/:sessionId', method: 'get', path: (own) => `/sessions/${own ? ids.session : ids.otherSession}`, staff: 200, write: false },
  { name: 'list a session’s clips', route: '/clubs/:clubId/sessions/:sessionId/clips', method: 'get', path: (own) => `/sessions/${own ? ids.session : ids.otherSession}/clips`, staff: 200, write: false },
  { name: 'create a session', route: '/clubs/:clubId/sessions', method: 'post', path: () => '/sessions', body: () => ({ date: '2025-01-01', venue: 'Authz' }), staff: 201, write: true },
  { name: 'edit a session', route: '/clubs/:clubId/sessions/:sessionId', method: 'patch', path: () => `/sessions/${ids.session}`, body: () => ({ notes: 'edited' }), staff: 200, write: true },
  { name: 'delete a session with flights (unconfirmed)', route: '/clubs/:clubId/sessions/:sessionId', method: 'delete', path: () => `/sessions/${ids.session}`, staff: 409, write: true },
  { name: 'upload a clip (no file)', route: '/clubs/:clubId/sessions/:sessionId/clips', method: 'post', path: () => `/sessions/${ids.session}/clips`, staff: 400, write: true },
  { name: 'start a resumable upload (no protocol header)', route: '/clubs/:clubId/sessions/:sessionId/clips/uploads', method: 'post', path: () => `/sessions/${ids.session}/clips/uploads`, staff: 400, write: true },
  { name: 'ask a resumable upload’s offset (no protocol header)', route: `${UPLOAD}`, method: 'head', path: () => `/sessions/${ids.session}/clips/uploads/${UPLOAD_ID}`, staff: 400, write: true },
  { name: 'send a part of a resumable upload (no protocol header)', route: `${UPLOAD}`, method: 'patch', path: () => `/sessions/${ids.session}/clips/uploads/${UPLOAD_ID}`, staff: 400, write: true },
  { name: 'abandon a resumable upload (no protocol header)', route: `${UPLOAD}`, method: 'delete', path: () => `/sessions/${ids.session}/clips/uploads/${UPLOAD_ID}`, staff: 400, write: true },
  { name: 'list clips', route: '/clubs/:clubId/clips', method: 'get', path: () => '/clips', staff: 200, write: false },
  { name: 'read a clip', route: '/clubs/:clubId/clips/:clipId', method: 'get', path: (own) => `/clips/${own ? ids.clip : ids.otherClip}`, staff: 200, write: false },
  { name: 'edit a clip', route: '/clubs/:clubId/clips/:clipId', method: 'patch', path: () => `/clips/${ids.clip}`, body: () => ({ label: 'Edited label' }), staff: 200, write: true },
  { name: 'mark a clip’s camera as still (or not)', route: '/clubs/:clubId/clips/:clipId', method: 'patch', path: () => `/clips/${ids.clip}`, body: () => ({ cameraStill: false }), staff: 200, write: true },
  { name: 'delete a clip with flights (unconfirmed)', route: '/clubs/:clubId/clips/:clipId', method: 'delete', path: () => `/clips/${ids.clip}`, staff: 409, write: true },
  { name: 'read a frame', route: '/clubs/:clubId/clips/:clipId/frames/:n', method: 'get', path: (own) => `/clips/${own ? ids.clip : ids.otherClip}/frames/0`, staff: 200, write: false },
  { name: 'read the strip', route: '/clubs/:clubId/clips/:clipId/strip', method: 'get', path: (own) => `/clips/${own ? ids.clip : ids.otherClip}/strip`, staff: 200, write: false },
  { name: 'read the calibration', route: '/clubs/:clubId/clips/:clipId/calibration', method: 'get', path: (own) => `/clips/${own ? ids.clip : ids.otherClip}/calibration`, staff: 200, write: false },
  { name: 'calibrate', route: '/clubs/:clubId/clips/:clipId/calibration', method: 'put', path: () => `/clips/${ids.clip}/calibration`, body: calibrationBody, staff: 200, write: true },
  { name: 'remove the calibration', route: '/clubs/:clubId/clips/:clipId/calibration', method: 'delete', path: () => `/clips/${ids.clip}/calibration`, staff: 204, write: true },
  { name: 'list a clip’s flights', route: '/clubs/:clubId/clips/:clipId/flights', method: 'get', path: (own) => `/clips/${own ? ids.clip : ids.otherClip}/flights`, staff: 200, write: false },
  { name: 'create a flight', route: '/clubs/:clubId/clips/:clipId/flights', method: 'post', path: () => `/clips/${ids.clip}/flights`, body: () => ({ athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' }), staff: 201, write: true },
  { name: 'list flights', route: '/clubs/:clubId/flights', method: 'get', path: () => '/flights', staff: 200, write: false },
  { name: 'read a flight', route: '/clubs/:clubId/flights/:flightId', method: 'get', path: (own) => `/flights/${own ? ids.ownFlight : ids.otherFlight}`, staff: 200, write: false },
  { name: 'edit a flight', route: '/clubs/:clubId/flights/:flightId', method: 'patch', path: () => `/flights/${ids.otherFlight}`, body: () => ({ notes: 'n' }), staff: 200, write: true },
  { name: 'delete a flight', route: '/clubs/:clubId/flights/:flightId', method: 'delete', path: freshFlight, staff: 204, write: true },
  { name: 'read points', route: '/clubs/:clubId/flights/:flightId/points', method: 'get', path: (own) => `/flights/${own ? ids.ownFlight : ids.otherFlight}/points`, staff: 200, write: false },
  { name: 'replace points', route: '/clubs/:clubId/flights/:flightId/points', method: 'put', path: () => `/flights/${ids.otherFlight}/points`, body: () => ({ points: [{ frame: 3, xPx: 5, yPx: 5 }] }), staff: 200, write: true },
  { name: 'read a flight’s camera motion (staff only)', route: '/clubs/:clubId/flights/:flightId/camera-motion', method: 'get', path: (own) => `/flights/${own ? ids.ownFlight : ids.otherFlight}/camera-motion`, staff: 200, write: true },
  { name: 'start auto-follow', route: '/clubs/:clubId/flights/:flightId/follow', method: 'post', path: () => `/flights/${ids.otherFlight}/follow`, body: () => ({ frame: 6, xPx: 25, yPx: 196 }), staff: 202, write: true },
  { name: 'import a CSV', route: '/clubs/:clubId/flights/:flightId/track/import', method: 'post', path: () => `/flights/${ids.otherFlight}/track/import`, body: () => ({ csv: 'frame,x_px,y_px\n2,3,4\n' }), staff: 200, write: true },
  { name: 'export a CSV', route: '/clubs/:clubId/flights/:flightId/track.csv', method: 'get', path: (own) => `/flights/${own ? ids.ownFlight : ids.otherFlight}/track.csv`, staff: 200, write: false },
  { name: 'request a fit (too few points)', route: '/clubs/:clubId/flights/:flightId/fit', method: 'post', path: () => `/flights/${ids.otherFlight}/fit`, staff: 409, write: true },
  { name: 'list fits', route: '/clubs/:clubId/flights/:flightId/fits', method: 'get', path: (own) => `/flights/${own ? ids.ownFlight : ids.otherFlight}/fits`, staff: 200, write: false },
  { name: 'list actions', route: '/clubs/:clubId/flight-actions', method: 'get', path: () => '/flight-actions', staff: 200, write: false },
  { name: 'add an action', route: '/clubs/:clubId/flight-actions', method: 'post', path: () => '/flight-actions', body: () => ({ label: `Authz action ${++seq}` }), staff: 201, write: true },
  { name: 'edit an action', route: '/clubs/:clubId/flight-actions/:actionId', method: 'patch', path: () => `/flight-actions/${ids.action}`, body: () => ({ label: 'Pitch' }), staff: 200, write: true },
  { name: 'delete an action in use', route: '/clubs/:clubId/flight-actions/:actionId', method: 'delete', path: () => `/flight-actions/${ids.usedAction}`, staff: 409, write: true },
  { name: 'export the flights list', route: '/clubs/:clubId/flights.csv', method: 'get', path: () => '/flights.csv', staff: 200, write: false },
  { name: 'export a session’s flights', route: '/clubs/:clubId/sessions/:sessionId/flights.csv', method: 'get', path: (own) => `/sessions/${own ? ids.session : ids.otherSession}/flights.csv`, staff: 200, write: false },
  { name: 'list jobs', route: '/clubs/:clubId/jobs', method: 'get', path: () => '/jobs', staff: 200, write: true },
  { name: 'read a job', route: '/clubs/:clubId/jobs/:jobId', method: 'get', path: () => `/jobs/${ids.job}`, staff: 200, write: true },
  { name: 'retry a job that did not fail', route: '/clubs/:clubId/jobs/:jobId/retry', method: 'post', path: () => `/jobs/${ids.job}/retry`, staff: 409, write: true },
];

async function call(client: ApiClient, route: RouteCase, clubId: number, own: boolean): Promise<number> {
  const path = `/api/v1/clubs/${clubId}${await route.path(own)}`;
  const res = await client.request(route.method, path, route.body?.());
  const codes: Record<number, string> = { 401: 'UNAUTHENTICATED', 403: 'FORBIDDEN', 404: 'NOT_FOUND' };
  // A HEAD answer has no body to read the code from.
  if (codes[res.status] && route.method !== 'head') expect(res.body.error.code).toBe(codes[res.status]);
  return res.status;
}

const allowed = (staff: number | number[]) => (Array.isArray(staff) ? staff : [staff]);

describe('clips API authorization', () => {
  it('covers every route of the sessions, clips, clip uploads, flights, exports and jobs routers', () => {
    const declared = [sessionsRouter, clipsRouter, clipUploadsRouter, flightsRouter, exportsRouter, jobsRouter].flatMap(routesOf).sort();
    const tested = [...new Set(routes.map((r) => `${r.method} ${r.route}`))].sort();
    expect(tested).toEqual(declared);
  });

  for (const route of routes) {
    it(`${route.method.toUpperCase()} ${route.name}: staff ${route.staff}, athlete ${route.write ? '403' : 'own only'}, other club 404, anonymous 401`, async () => {
      expect(allowed(route.staff)).toContain(await call(fx.admin, route, fx.clubId, true));
      expect(allowed(route.staff)).toContain(await call(fx.coach, route, fx.clubId, true));
      if (route.write) {
        expect(await call(fx.athlete, route, fx.clubId, true)).toBe(403);
      } else {
        expect(allowed(route.staff)).toContain(await call(fx.athlete, route, fx.clubId, true));
        const other = await call(fx.athlete, route, fx.clubId, false);
        // Lists answer 200 (filtered); single records of others answer 404.
        expect((await route.path(true)) === (await route.path(false)) ? [200] : [404]).toContain(other);
      }
      expect(await call(fx.outsider, route, fx.clubId, true)).toBe(404);
      expect(await call(fx.anonymous, route, fx.clubId, true)).toBe(401);
    });
  }

  it('answers 404 for another club’s records even through the caller’s own club id', async () => {
    const outsiderSession = await createSession(fx.outsider, fx.otherClubId, 'Elsewhere');
    const res = await fx.admin.get(`/api/v1/clubs/${fx.clubId}/sessions/${outsiderSession}`);
    expect(res.status).toBe(404);
    const job = await Job.findByPk(ids.job);
    expect((await fx.outsider.get(`/api/v1/clubs/${fx.otherClubId}/jobs/${job!.id}`)).status).toBe(404);
    expect((await fx.outsider.get(`/api/v1/clubs/${fx.otherClubId}/clips/${ids.clip}/frames/0`)).status).toBe(404);
  });

  it('filters the lists of an athlete to their own records', async () => {
    const flights = (await fx.athlete.get(`/api/v1/clubs/${fx.clubId}/flights`)).body.data as { id: number }[];
    expect(flights.map((f) => f.id)).toEqual([ids.ownFlight]);
    const clips = (await fx.athlete.get(`/api/v1/clubs/${fx.clubId}/clips`)).body.data as { id: number }[];
    expect(clips.map((c) => c.id)).toEqual([ids.clip]);
    const clipFlights = (await fx.athlete.get(`/api/v1/clubs/${fx.clubId}/clips/${ids.clip}/flights`)).body.data as { id: number }[];
    expect(clipFlights.map((f) => f.id)).toEqual([ids.ownFlight]);
  });
});
