import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FlightTruth } from '../../../server/video/synth';
import { ballProps, crossSectionArea, simulateFlight, standardAir } from '../../../shared/physics';
import { testClip } from '../../support/clips';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { clubPath, createSession, upload, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

/**
 * End to end through the API (upload → calibrate → trace → fit) on generated clips whose ground lies
 * below the picture and whose trace starts after the release: the launch figures must be those of
 * the true release. Bounds from the issue: speed within 1 %, angle within 0.5°, carry within 1 %.
 */
let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let sessionId: number;

/** 640×360 at 60 fps, 24 px/m, the ground 40 px below the bottom edge (1.67 m out of the picture). */
const SCENE = { width: 640, height: 360, captureFps: 60, durationS: 2.2, ballRadiusPx: 5, pxPerMetre: 24, launchXPx: 40, groundYPx: 400, speedMps: 16, angleDeg: 40, preset: 'ultrafast', clutter: false } as const;
const PX_PER_M = SCENE.pxPerMetre;
/** The synth's default drag, k = κ·C_d (1/m), read as C_d of a size-5 football in standard air (the session gives no conditions). */
const K = 0.013;
const football = ballProps('football-5');
const CD = K / ((standardAir().densityKgM3 * crossSectionArea(football.diameterM)) / (2 * football.massKg));

function trueCarry(heightM: number): number {
  return simulateFlight({ speed: SCENE.speedMps, angleDeg: SCENE.angleDeg, height: heightM }, football, standardAir(), { model: 'drag', cd: CD }, { rtol: 1e-12 }).carry;
}

/** Ground reference below the picture: origin and both scale points on the ground, off the picture. */
function groundCalibration() {
  const ground: { xPx: number; yPx: number } = { xPx: SCENE.launchXPx, yPx: SCENE.groundYPx };
  return {
    scale: { a: ground, b: { xPx: ground.xPx + 20 * PX_PER_M, yPx: ground.yPx }, distanceM: 20 },
    level: { a: ground, b: { xPx: 600, yPx: ground.yPx } },
    origin: ground,
    direction: 'right',
  };
}

/** Ground reference as a line on the picture 2 m above the ground ("the marked line is 2 m above the ground"). */
function lineCalibration() {
  const line = { xPx: SCENE.launchXPx, yPx: SCENE.groundYPx - 2 * PX_PER_M };
  return {
    scale: { a: line, b: { xPx: line.xPx + 20 * PX_PER_M, yPx: line.yPx }, distanceM: 20 },
    level: { a: line, b: { xPx: 600, yPx: line.yPx } },
    origin: line,
    groundOffsetM: 2,
    direction: 'right',
  };
}

async function clipWith(name: string, launchHeightM: number): Promise<{ clipId: number; truth: FlightTruth }> {
  const clip = await testClip(name, { ...SCENE, launchHeightM });
  const res = await upload(fx.coach, fx.clubId, sessionId, { video: clip.videoPath });
  if (res.status !== 201) throw new Error(JSON.stringify(res.body));
  await testWorker().drain();
  return { clipId: res.body.data.clip.id, truth: clip.truth };
}

/** A flight traced with the true centres of the frames where the whole ball is in the picture, from `fromFrame` on. */
async function tracedFlight(clipId: number, truth: FlightTruth, fromFrame: number, release: { releaseFrame?: number; releaseHeightM?: number }): Promise<number> {
  const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'long_throw', ballId: 'football-5', ...release });
  if (res.status !== 201) throw new Error(JSON.stringify(res.body));
  const points = truth.frames
    .filter((f) => f.visible && f.frame >= fromFrame && (truth.landingFrame === null || f.frame < truth.landingFrame))
    .map((f) => ({ frame: f.frame, xPx: f.x, yPx: f.y }));
  const put = await fx.coach.put(clubPath(fx, `/flights/${res.body.data.id}/points`), { points });
  if (put.status !== 200) throw new Error(JSON.stringify(put.body));
  return res.body.data.id as number;
}

async function fitted(flightId: number) {
  const job = await fx.coach.post(clubPath(fx, `/flights/${flightId}/fit`), { model: 'drag' });
  expect(job.status, JSON.stringify(job.body)).toBe(202);
  await testWorker().drain();
  const flight = (await fx.coach.get(clubPath(fx, `/flights/${flightId}`))).body.data;
  const fits = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/fits`))).body.data as { result: { release: { mode: string; backTime: number; backFrames: number }; launch: { height: number }; flight: { carry: number } }; warnings: { code: string }[] }[];
  return { flight, fit: fits[0]! };
}

function expectTrueRelease(latest: { launchSpeedMps: number; launchAngleDeg: number; carryM: number }, carry: number): void {
  expect(Math.abs(latest.launchSpeedMps - SCENE.speedMps) / SCENE.speedMps).toBeLessThan(0.01);
  expect(Math.abs(latest.launchAngleDeg - SCENE.angleDeg)).toBeLessThan(0.5);
  expect(Math.abs(latest.carryM - carry) / carry).toBeLessThan(0.01);
}

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-release-'));
  fx = await createClubFixture();
  sessionId = await createSession(fx.coach, fx.clubId);
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

describe('release and ground outside the picture, end to end', () => {
  it('measures a kick from the ground whose ball enters the picture late, with the ground below it', async () => {
    const { clipId, truth } = await clipWith('release-ground', 0);
    const cal = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), groundCalibration());
    expect(cal.status, JSON.stringify(cal.body)).toBe(200);
    const firstVisible = truth.frames.find((f) => f.visible && f.airborne)!.frame;
    expect(firstVisible - truth.launchFrame).toBeGreaterThan(5);
    const flightId = await tracedFlight(clipId, truth, truth.launchFrame, { releaseHeightM: 0 });
    const { flight, fit } = await fitted(flightId);
    expect(flight.releaseHeightM).toBe(0);
    expectTrueRelease(flight.latestFit, trueCarry(0));
    expect(fit.result.launch.height).toBeCloseTo(0, 9);
    expect(fit.result.release.mode).toBe('height');
    expect(fit.result.release.backFrames).toBeCloseTo(firstVisible - truth.launchFrame, 0);
    expect(fit.warnings.map((w) => w.code)).toContain('RELEASE_EXTRAPOLATED');
    expect(flight.status).toBe('fitted');
  });

  it('measures a throw from a known height traced from 5 frames after the release, against a marked line 2 m up', async () => {
    const { clipId, truth } = await clipWith('release-height', 2);
    const cal = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), lineCalibration());
    expect(cal.status, JSON.stringify(cal.body)).toBe(200);
    expect(cal.body.data.originHeightM).toBe(2);
    const flightId = await tracedFlight(clipId, truth, truth.launchFrame + 5, { releaseHeightM: 2 });
    const { flight, fit } = await fitted(flightId);
    expectTrueRelease(flight.latestFit, trueCarry(2));
    expect(fit.result.launch.height).toBeCloseTo(2, 9);
    expect(fit.result.release.backFrames).toBeGreaterThanOrEqual(5);
  });

  it('measures from a marked release frame, leaving out the ball at rest before it, and reads far off without it', async () => {
    const { clipId, truth } = await clipWith('release-frame', 2.5);
    await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), groundCalibration());
    // The trace starts on the ball held still three frames before the release.
    const marked = await tracedFlight(clipId, truth, truth.launchFrame - 3, { releaseFrame: truth.launchFrame });
    const { flight, fit } = await fitted(marked);
    expectTrueRelease(flight.latestFit, trueCarry(2.5));
    expect(fit.result.launch.height).toBeCloseTo(2.5, 1);
    expect(fit.result.release.mode).toBe('time');

    // The same clip traced from 8 frames after the release with no release given reads low.
    const late = await tracedFlight(clipId, truth, truth.launchFrame + 8, {});
    const plain = await fitted(late);
    expect(plain.flight.latestFit.launchSpeedMps).toBeLessThan(SCENE.speedMps * 0.97);
    // Marking the release afterwards refits it to the true release.
    const patch = await fx.coach.patch(clubPath(fx, `/flights/${late}`), { releaseFrame: truth.launchFrame });
    expect(patch.status, JSON.stringify(patch.body)).toBe(200);
    await testWorker().drain();
    const refit = (await fx.coach.get(clubPath(fx, `/flights/${late}`))).body.data;
    expectTrueRelease(refit.latestFit, trueCarry(2.5));
  });
});

describe('release and ground reference: bad input', () => {
  let clipId: number;
  let truth: FlightTruth;
  beforeAll(async () => {
    ({ clipId, truth } = await clipWith('release-height', 2));
    await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), lineCalibration());
  });

  it('refuses a release frame after the last traced point', async () => {
    const flightId = await tracedFlight(clipId, truth, truth.launchFrame, {});
    // Keep the first 30 points only, so that frames after the last traced point lie inside the flight's range.
    const points = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/points`))).body.data.slice(0, 30) as { frame: number; xPx: number; yPx: number }[];
    await fx.coach.put(clubPath(fx, `/flights/${flightId}/points`), { points: points.map((p) => ({ frame: p.frame, xPx: p.xPx, yPx: p.yPx })) });
    const last = points.at(-1)!.frame;
    const res = await fx.coach.patch(clubPath(fx, `/flights/${flightId}`), { releaseFrame: last + 2 });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe(`The release frame ${last + 2} comes after the last traced point (frame ${last}): the release is where the ball left the foot or hand, before the traced flight.`);
    expect(res.body.error.fields.releaseFrame).toBe(`At most ${last}, the last traced frame.`);
  });

  it('refuses a release height below the ground or above 5 m', async () => {
    const below = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', releaseHeightM: -0.2 });
    expect(below.status).toBe(400);
    expect(below.body.error.fields.releaseHeightM).toBe('The release height cannot be below the ground: give 0 for a ball on the ground or a tee, or the height of the hand at release.');
    const above = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', releaseHeightM: 5.5 });
    expect(above.status).toBe(400);
    expect(above.body.error.fields.releaseHeightM).toBe('The release height must be at most 5 m: give it in metres (a 2.1 m release is 2.1).');
  });

  it('keeps an athlete’s usual release height, and refuses one above 5 m', async () => {
    const created = await fx.coach.post(clubPath(fx, '/athletes'), { displayName: 'Wren Halloway', releaseHeightM: 2.05 });
    expect(created.status).toBe(201);
    expect((await fx.coach.get(clubPath(fx, `/athletes/${created.body.data.id}`))).body.data.releaseHeightM).toBe(2.05);
    const high = await fx.coach.patch(clubPath(fx, `/athletes/${created.body.data.id}`), { releaseHeightM: 6 });
    expect(high.status).toBe(400);
    expect(high.body.error.fields.releaseHeightM).toBe('The release height must be at most 5 m: enter it in metres (a 2.1 m release is 2.1).');
  });

  it('refuses a release frame and a release height together', async () => {
    const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', releaseHeightM: 1, releaseFrame: 20 });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.releaseHeightM).toMatch(/^Give either the release frame or the release height, not both/);
  });

  it('refuses a release frame outside the flight’s frames', async () => {
    const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', frameStart: 10, frameEnd: 80, releaseFrame: 5 });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.releaseFrame).toBe('Between 10 and 80.');
  });

  it('refuses a ground point farther off the picture than its own height, and a marked line below the ground', async () => {
    const far = { ...groundCalibration(), origin: { xPx: 40, yPx: 360 + 400 } };
    const res = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), far);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.origin).toBe("This point (40, 760) lies more than a picture's width or height outside the 640×360 frame, too far to place with any accuracy: mark a nearer point, or a level line on the picture and give its height above the ground.");
    const below = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), { ...lineCalibration(), groundOffsetM: -1 });
    expect(below.status).toBe(400);
    expect(below.body.error.fields.groundOffsetM).toBe('The marked line cannot be below the ground: mark the ground itself, or a line above it and give its height.');
  });
});
