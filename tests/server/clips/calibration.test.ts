import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Fit, Flight, Job } from '../../../server/models';
import type { FlightTruth } from '../../../server/video/synth';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { clubPath, createSession, flightClip, upload, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let clipId: number;
let truth: FlightTruth;
/** Scene geometry of the generated clip (server/video/synth.ts defaults for 320×240). */
const PX_PER_M = 320 / 36;
const ORIGIN = { xPx: 320 * 0.08, yPx: 240 * 0.85 };

/** A calibration from the clip's known geometry; `distanceM` lets a test give a wrong distance on purpose. */
function calibration(distanceM = 10) {
  return {
    scale: { a: { ...ORIGIN }, b: { xPx: ORIGIN.xPx + 10 * PX_PER_M, yPx: ORIGIN.yPx }, distanceM },
    level: { a: { xPx: 10, yPx: ORIGIN.yPx }, b: { xPx: 300, yPx: ORIGIN.yPx } },
    origin: { ...ORIGIN },
    direction: 'right',
    ball: { ballId: 'football-5', diameterPx: 0.2228 * PX_PER_M },
  };
}

/** A flight traced with the true centres of the visible frames from the release (the fit's launch is its first point) until landing. */
async function tracedFlight(): Promise<number> {
  const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
  const id = res.body.data.id as number;
  const points = truth.frames
    .filter((f) => f.visible && f.frame >= truth.launchFrame && (truth.landingFrame === null || f.frame < truth.landingFrame))
    .map((f) => ({ frame: f.frame, xPx: f.x, yPx: f.y }));
  const put = await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points });
  if (put.status !== 200) throw new Error(JSON.stringify(put.body));
  return id;
}

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-calibration-'));
  fx = await createClubFixture();
  const sessionId = await createSession(fx.coach, fx.clubId);
  const clip = await flightClip(dir);
  truth = clip.truth;
  const res = await upload(fx.coach, fx.clubId, sessionId, { video: clip.videoPath });
  clipId = res.body.data.clip.id;
  await testWorker().drain();
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

describe('calibration API', () => {
  it('refuses two identical scale points with a message saying where to put them', async () => {
    const body = calibration();
    body.scale.b = { ...body.scale.a };
    const res = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields['scale.b']).toBe('The two scale points are the same pixel: put them at the two ends of the known distance.');
  });

  it('refuses a zero distance', async () => {
    const res = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), calibration(0));
    expect(res.status).toBe(400);
    expect(res.body.error.fields['scale.distanceM']).toBe('The known distance must be more than 0 m.');
  });

  it('refuses a level line of one point and a point far off the picture', async () => {
    const body = calibration();
    body.level.b = { ...body.level.a };
    const level = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), body);
    expect(level.status).toBe(400);
    expect(level.body.error.fields['level.b']).toMatch(/same pixel/);
    const off = calibration();
    off.origin = { xPx: -400, yPx: 10 };
    const res = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), off);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.origin).toMatch(/more than a picture's width or height outside the 320×240 frame/);
  });

  it('stores the scale and the ball cross-check, and maps traced pixels to metres', async () => {
    const flightId = await tracedFlight();
    const res = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), calibration());
    expect(res.status).toBe(200);
    expect(res.body.data.metresPerPixel).toBeCloseTo(1 / PX_PER_M, 12);
    expect(res.body.data.levelAngleDeg).toBeCloseTo(0, 12);
    expect(res.body.data.ballCheck.ratio).toBeCloseTo(0.2228 / (0.69 / Math.PI), 3);
    expect(res.body.data.ballCheck.ok).toBe(true);
    expect(res.body.data.refitJobIds).toHaveLength(1);

    const points = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/points`))).body.data as { frame: number; xM: number; yM: number }[];
    const first = truth.frames.find((f) => f.frame === points[0]!.frame)!;
    // Inverse of the generator's mapping: x = (px − launch x) / scale, y = (ground − py) / scale.
    expect(points[0]!.xM).toBeCloseTo((first.x - ORIGIN.xPx) / PX_PER_M, 9);
    expect(points[0]!.yM).toBeCloseTo((ORIGIN.yPx - first.y) / PX_PER_M, 9);
    const clip = await fx.coach.get(clubPath(fx, `/clips/${clipId}`));
    expect(clip.body.data.calibration).toMatchObject({ direction: 'right', metresPerPixel: res.body.data.metresPerPixel });
  });

  it('fits the traced flight back to its launch and keeps every refit in the history', async () => {
    const flightId = await tracedFlight();
    await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), calibration());
    await testWorker().drain();
    const flight = (await fx.coach.get(clubPath(fx, `/flights/${flightId}`))).body.data;
    expect(flight.status).toBe('fitted');
    // The generator launches at 14 m/s and 45° from 1 m (server/video/synth.ts defaults); exact centres, so close agreement.
    expect(flight.latestFit.launchSpeedMps).toBeCloseTo(14, 0);
    expect(flight.latestFit.launchAngleDeg).toBeCloseTo(45, 0);
    // The summary carries the drag coefficient and the standard-conditions carry that the Flights list shows.
    const full = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/fits`))).body.data[0] as { result: { cd: number; cdError: number; standardCarry: number } };
    expect(flight.latestFit.cd).toBe(full.result.cd);
    expect(flight.latestFit.cdError).toBe(full.result.cdError);
    expect(flight.latestFit.standardCarryM).toBe(full.result.standardCarry);
    expect(flight.latestFit.cd).toBeGreaterThan(0);

    const refit = await fx.coach.post(clubPath(fx, `/flights/${flightId}/fit`), { model: 'drag' });
    expect(refit.status).toBe(202);
    await testWorker().drain();
    const fits = (await fx.coach.get(clubPath(fx, `/flights/${flightId}/fits`))).body.data as { id: number; model: string; result: { launch: { height: number } } }[];
    expect(fits.length).toBe(2);
    expect(fits[0]!.id).toBeGreaterThan(fits[1]!.id);
    expect(fits[0]!.model).toBe('drag');
    expect(fits[0]!.result.launch.height).toBeCloseTo(1, 0);
  });

  it('flags a scale that disagrees with gravity: the refit after a wrong calibration needs attention', async () => {
    const flightId = await tracedFlight();
    // Claiming 10 m where the scene has 12.5 m makes everything 20 % short: gravity no longer fits.
    const res = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), calibration(8));
    expect(res.body.data.refitJobIds.length).toBeGreaterThanOrEqual(1);
    await testWorker().drain();
    const flight = await Flight.findByPk(flightId);
    expect(flight?.status).toBe('needs_attention');
    expect(flight?.attentionReason).toBeTruthy();
    const fit = await Fit.findOne({ where: { flightId }, order: [['id', 'DESC']] });
    expect(fit?.warnings.map((w) => w.code)).toContain('SCALE_DISAGREES');
  });

  it('queues refits of every traced flight of the clip when it is recalibrated', async () => {
    const flights = await Flight.findAll({ where: { clipId } });
    const before = await Job.count({ where: { clipId, type: 'flight.fit' } });
    const res = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), calibration());
    const withPoints = flights.filter((f) => f.status !== 'uploaded').length;
    expect(res.body.data.refitJobIds).toHaveLength(withPoints);
    expect(await Job.count({ where: { clipId, type: 'flight.fit' } })).toBe(before + withPoints);
    await testWorker().drain();
    for (const f of await Flight.findAll({ where: { clipId } })) expect(f.status).toBe('fitted');
  });

  it('refuses a fit before calibration with CALIBRATION_REQUIRED', async () => {
    await fx.coach.delete(clubPath(fx, `/clips/${clipId}/calibration`));
    const flightId = await tracedFlight();
    const res = await fx.coach.post(clubPath(fx, `/flights/${flightId}/fit`));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CALIBRATION_REQUIRED');
    expect((await fx.coach.get(clubPath(fx, `/clips/${clipId}/calibration`))).body.data).toBeNull();
  });

  it('imports a metre CSV through the calibration onto the nearest frames', async () => {
    await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), calibration());
    const res0 = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
    const id = res0.body.data.id as number;
    const res = await fx.coach.post(clubPath(fx, `/flights/${id}/track/import`), { csv: '# metres\nt,x,y\n0.2,0,1\n0.2333,2,3\n' });
    expect(res.status).toBe(200);
    expect(res.body.data.map((p: { frame: number }) => p.frame)).toEqual([6, 7]);
    expect(res.body.data[1].xPx).toBeCloseTo(ORIGIN.xPx + 2 * PX_PER_M, 9);
    expect(res.body.data[1].yPx).toBeCloseTo(ORIGIN.yPx - 3 * PX_PER_M, 9);
    expect(res.body.data[1].xM).toBeCloseTo(2, 9);
  });
});
