import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CameraMotion } from '../../../shared/schemas/camera-motion';
import { claimNext } from '../../../server/jobs/queue';
import type { FlightTruth } from '../../../server/video/synth';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { CLIP_SPECS, testClip } from '../../support/clips';
import { clubPath, createSession, getJob, upload, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

/**
 * Auto-follow on a clip filmed by a camera that pans most of a picture width with a 2° roll (generated with a
 * known motion): the track is kept in the pixels of the frame the calibration was marked on, the motion found is
 * stored and shown, the fit says the camera moved, and "camera was still" on the clip skips the estimate.
 */
let fx: ClubFixture;
let store: TestStorage;
let sessionId: number;
let clipId: number;
let truth: FlightTruth;

const START = 14;
const spec = CLIP_SPECS.panning;
// The generator's scene scale and launch point (server/video/synth.ts defaults) in frame 0's pixels.
const pxPerMetre = spec.width / 36;
const groundY = spec.height * 0.85;

interface Point {
  frame: number;
  xPx: number;
  yPx: number;
  xRefPx: number;
  yRefPx: number;
  source: string;
}

const median = (values: number[]) => {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
};

async function newFlight(): Promise<number> {
  const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
  if (res.status !== 201) throw new Error(JSON.stringify(res.body));
  return res.body.data.id as number;
}

async function followFrom(flightId: number, body: Record<string, unknown> = {}) {
  const at = truth.frames[START]!;
  const res = await fx.coach.post(clubPath(fx, `/flights/${flightId}/follow`), { frame: START, xPx: at.x, yPx: at.y, ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  await testWorker().drain();
  return getJob(fx.coach, fx.clubId, res.body.data.id);
}

beforeAll(async () => {
  store = await useTestStorage();
  fx = await createClubFixture();
  sessionId = await createSession(fx.coach, fx.clubId);
  const clip = await testClip('panning', spec);
  truth = clip.truth;
  const res = await upload(fx.coach, fx.clubId, sessionId, { video: clip.videoPath });
  if (res.status !== 201) throw new Error(JSON.stringify(res.body));
  clipId = res.body.data.clip.id;
  await testWorker().drain();
  // Calibrated on frame 0: the ground line and 10 m along it as the scene was drawn.
  const x0 = spec.launchXPx;
  const cal = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), {
    frame: 0,
    scale: { a: { xPx: x0, yPx: groundY }, b: { xPx: x0 + 10 * pxPerMetre, yPx: groundY }, distanceM: 10 },
    origin: { xPx: x0, yPx: groundY },
    direction: 'right',
  });
  expect(cal.status, JSON.stringify(cal.body)).toBe(200);
}, 240_000);

afterAll(async () => {
  await store.remove();
});

describe('auto-follow with a moving camera', () => {
  it('stores the track in the calibration frame’s pixels within 2 px median of the truth, with the motion found', async () => {
    const flightId = await newFlight();
    const job = await followFrom(flightId);
    expect(job).toMatchObject({ status: 'done', error: null, result: { camera: 'moving' } });

    const points = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/points`))).body.data as Point[];
    expect(points.length).toBeGreaterThan(40);
    const refErrors = points.map((p) => Math.hypot(p.xRefPx - truth.frames[p.frame]!.xRef!, p.yRefPx - truth.frames[p.frame]!.yRef!));
    expect(median(refErrors)).toBeLessThanOrEqual(2);
    // The points themselves stay in each frame's own pixels (where the Trace screen draws them).
    const ownErrors = points.map((p) => Math.hypot(p.xPx - truth.frames[p.frame]!.x, p.yPx - truth.frames[p.frame]!.y));
    expect(median(ownErrors)).toBeLessThanOrEqual(1.5);
    const last = points.at(-1)!;
    expect(last.xRefPx - last.xPx).toBeGreaterThan(200);

    const motion = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/camera-motion`))).body.data as CameraMotion;
    expect(motion).toMatchObject({ flightId, cameraStill: false, estimated: true, referenceFrame: 0, moved: true });
    // Frame 0 to the start of the follow and on: the camera is tracked back to the calibration frame.
    expect(motion.frames[0]!.frame).toBe(0);
    expect(motion.frames.length).toBeGreaterThanOrEqual(last.frame + 1);
    // The truth maps each frame about the picture centre, so its centre's pan is the map's shift (dx, dy).
    const panErrors = motion.frames.map((f) => {
      const t = truth.frames[f.frame]!.camera!;
      return Math.hypot(f.panXPx - t.dx, f.panYPx - t.dy);
    });
    expect(median(panErrors)).toBeLessThan(2);
    const rollErrors = motion.frames.map((f) => Math.abs(f.rollDeg - (truth.frames[f.frame]!.camera!.rotRad * 180) / Math.PI));
    expect(median(rollErrors)).toBeLessThan(0.1);
    expect(motion.maxPanPx).toBeGreaterThan(200);
    expect(Math.abs(motion.maxRollDeg)).toBeGreaterThan(1);

    // The fit reads the reference-frame track and says the camera moved.
    const fitJob = await fx.coach.post(clubPath(fx, `/flights/${flightId}/fit`), { model: 'drag' });
    expect(fitJob.status, JSON.stringify(fitJob.body)).toBe(202);
    await testWorker().drain();
    const flight = (await fx.coach.get(clubPath(fx, `/flights/${flightId}`))).body.data;
    expect(flight.latestFit.warnings).toContainEqual({
      code: 'MOVING_CAMERA',
      message: expect.stringMatching(/^Filmed with a moving camera: camera motion was estimated from the background\. The figures carry the extra uncertainty of the motion estimate/),
    });
    expect(Math.abs(flight.latestFit.launchAngleDeg - spec.angleDeg)).toBeLessThan(2);
  }, 240_000);

  it('skips the estimate when the coach marks the camera as still, and follows as still', async () => {
    const bad = await fx.coach.patch(clubPath(fx, `/clips/${clipId}`), { cameraStill: 'yes' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/cameraStill must be true/);
    const marked = await fx.coach.patch(clubPath(fx, `/clips/${clipId}`), { cameraStill: true });
    expect(marked.status).toBe(200);
    expect(marked.body.data.cameraStill).toBe(true);
    expect((await fx.coach.get(clubPath(fx, `/clips/${clipId}`))).body.data.cameraStill).toBe(true);

    const flightId = await newFlight();
    const job = await followFrom(flightId);
    expect(job).toMatchObject({ status: 'done', result: { camera: 'still' } });
    const motion = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/camera-motion`))).body.data as CameraMotion;
    expect(motion).toMatchObject({ cameraStill: true, estimated: false, moved: false, frames: [] });
    const points = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/points`))).body.data as Point[];
    for (const p of points) expect([p.xRefPx, p.yRefPx]).toEqual([p.xPx, p.yPx]);

    // An explicit choice in the request wins over the clip's mark.
    const again = await followFrom(flightId, { camera: 'moving' });
    expect(again.result).toMatchObject({ camera: 'moving' });
    const wrong = await fx.coach.post(clubPath(fx, `/flights/${flightId}/follow`), { frame: START, xPx: 10, yPx: 10, camera: 'tripod' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.message).toMatch(/camera must be "still"/);
    expect((await fx.coach.patch(clubPath(fx, `/clips/${clipId}`), { cameraStill: false })).body.data.cameraStill).toBe(false);
  }, 240_000);

  it('runs a follow again with its camera choice when the worker that had it died', async () => {
    const flightId = await newFlight();
    const at = truth.frames[START]!;
    const res = await fx.coach.post(clubPath(fx, `/flights/${flightId}/follow`), { frame: START, xPx: at.x, yPx: at.y });
    expect(res.status).toBe(202);
    // A worker claims the job and dies without renewing its lease; the next worker takes it over.
    const dead = await claimNext('dead-worker', { types: ['flight.follow'], leaseMs: 100 });
    expect(dead?.job.id).toBe(res.body.data.id);
    await new Promise((done) => setTimeout(done, 300));
    await testWorker().drain();
    const job = await getJob(fx.coach, fx.clubId, res.body.data.id);
    expect(job).toMatchObject({ status: 'done', attempts: 2, result: { camera: 'moving' } });
    const motion = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/camera-motion`))).body.data as CameraMotion;
    expect(motion).toMatchObject({ estimated: true, moved: true, referenceFrame: 0 });
  }, 240_000);

  it('refuses a calibration frame past the clip’s last frame', async () => {
    const res = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), {
      frame: 100_000,
      scale: { a: { xPx: 10, yPx: 200 }, b: { xPx: 110, yPx: 200 }, distanceM: 10 },
      origin: { xPx: 10, yPx: 200 },
      direction: 'right',
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.frame).toMatch(/^Frame 100000 is past the clip's last frame \d+: give the frame the calibration was marked on\.$/);
  });

  it('shows the camera motion and takes "camera was still" from staff only: athletes 403, other clubs 404', async () => {
    const flightId = await newFlight();
    expect((await fx.athlete.get(clubPath(fx, `/flights/${flightId}/camera-motion`))).status).toBe(403);
    expect((await fx.outsider.get(clubPath(fx, `/flights/${flightId}/camera-motion`))).status).toBe(404);
    expect((await fx.outsider.get(`/api/v1/clubs/${fx.otherClubId}/flights/${flightId}/camera-motion`)).status).toBe(404);
    expect((await fx.athlete.patch(clubPath(fx, `/clips/${clipId}`), { cameraStill: true })).status).toBe(403);
    expect((await fx.outsider.patch(clubPath(fx, `/clips/${clipId}`), { cameraStill: true })).status).toBe(404);
    expect((await fx.outsider.patch(`/api/v1/clubs/${fx.otherClubId}/clips/${clipId}`, { cameraStill: true })).status).toBe(404);
    expect((await fx.coach.get(clubPath(fx, `/clips/${clipId}`))).body.data.cameraStill).toBe(false);
    expect((await fx.admin.get(clubPath(fx, `/flights/${flightId}/camera-motion`))).body.data).toMatchObject({ estimated: false, frames: [] });
  });
});
