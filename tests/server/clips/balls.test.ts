import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Fit } from '../../../server/models';
import { generateTrack, standardAir } from '../../../shared/physics';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { clubPath, createSession, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

let fx: ClubFixture;
let store: TestStorage;
let clipId: number;
/** A 1280×720 picture at 100 px/m with the ground 40 px above its bottom edge. */
const PX_PER_M = 100;
const ORIGIN = { xPx: 40, yPx: 680 };
const calibration = {
  scale: { a: { ...ORIGIN }, b: { xPx: ORIGIN.xPx + 10 * PX_PER_M, yPx: ORIGIN.yPx }, distanceM: 10 },
  level: { a: { ...ORIGIN }, b: { xPx: 1200, yPx: ORIGIN.yPx } },
  origin: { ...ORIGIN },
  direction: 'right',
};

beforeAll(async () => {
  store = await useTestStorage();
  fx = await createClubFixture();
  const sessionId = await createSession(fx.coach, fx.clubId);
  const clip = await Clip.create({
    clubId: fx.clubId, sessionId, label: 'club balls', kind: 'video', originalName: 'club-balls.mp4', sizeBytes: 1, sourceKey: 'none',
    container: 'mp4', codec: 'h264', width: 1280, height: 720, playbackFps: 30, captureFps: 120, frameCount: 400,
    frameNamePattern: null, strip: null, failureReason: null,
  });
  clipId = clip.id;
  const cal = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), calibration);
  if (cal.status !== 200) throw new Error(JSON.stringify(cal.body));
});

afterAll(async () => {
  await store.remove();
});

const PLAY_BALL = { name: 'Play ball 40 cm', massKg: 0.35, diameterM: 0.4, cdMin: 0.35, cdMax: 0.55 };

/** A flight of `ballId` with an exact generated track of a play ball (C_d 0.45) imported in metres, and a drag fit queued. */
async function importedFlight(ballId: string, launch = { speed: 12, angleDeg: 40, height: 1.5 }, cd = 0.45): Promise<number> {
  const created = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'long_throw', ballId });
  const flightId = created.body.data.id as number;
  const ball = ballId === 'football-5' ? 'football-5' : PLAY_BALL;
  const track = generateTrack({ launch, ball, air: standardAir(), aero: { model: 'drag', cd }, fps: 120, endTime: 1 });
  const csv = `# metres\nt,x,y\n${track.t.map((t, i) => `${t},${track.x[i]},${track.y[i]}`).join('\n')}\n`;
  const imported = await fx.coach.post(clubPath(fx, `/flights/${flightId}/track/import`), { csv });
  if (imported.status !== 200) throw new Error(JSON.stringify(imported.body));
  await fx.coach.post(clubPath(fx, `/flights/${flightId}/fit`), { model: 'drag' });
  return flightId;
}

describe('club balls', () => {
  it('adds a club ball that coaches and athletes then read beside the catalogue', async () => {
    const res = await fx.coach.post(clubPath(fx, '/balls'), PLAY_BALL);
    expect(res.status).toBe(201);
    expect(res.body.data).toMatchObject({ ...PLAY_BALL, ballId: `club:${res.body.data.id}`, flightCount: 0 });
    const read = await fx.athlete.get(clubPath(fx, '/balls'));
    expect(read.status).toBe(200);
    expect(read.body.data.map((b: { name: string }) => b.name)).toContain(PLAY_BALL.name);
  });

  it('refuses a ball of zero or negative size or mass, saying what unit to use', async () => {
    const zero = await fx.coach.post(clubPath(fx, '/balls'), { ...PLAY_BALL, name: 'Zero ball', diameterM: 0 });
    expect(zero.status).toBe(400);
    expect(zero.body.error.fields.diameterM).toBe('Diameter must be more than 0 m: give it in metres (a 40 cm ball is 0.40).');
    const negative = await fx.coach.post(clubPath(fx, '/balls'), { ...PLAY_BALL, name: 'Negative ball', massKg: -0.2 });
    expect(negative.status).toBe(400);
    expect(negative.body.error.fields.massKg).toBe('Mass must be more than 0 kg: give it in kilograms (a 430 g ball is 0.43).');
  });

  it('refuses half a C_d range and a range whose ends are the wrong way round', async () => {
    const half = await fx.coach.post(clubPath(fx, '/balls'), { ...PLAY_BALL, name: 'Half range', cdMax: null });
    expect(half.status).toBe(400);
    expect(half.body.error.fields.cdMax).toBe('Give both ends of the C_d range, or neither.');
    const swapped = await fx.coach.post(clubPath(fx, '/balls'), { ...PLAY_BALL, name: 'Swapped range', cdMin: 0.5, cdMax: 0.3 });
    expect(swapped.status).toBe(400);
    expect(swapped.body.error.fields.cdMax).toBe('The highest C_d must be above the lowest.');
  });

  it('refuses a duplicate name, whatever its case, and a catalogue ball’s name', async () => {
    const dup = await fx.coach.post(clubPath(fx, '/balls'), { ...PLAY_BALL, name: 'play BALL 40 cm' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.message).toBe('The club already has a ball called "Play ball 40 cm": give this one another name, or edit that one.');
    expect(dup.body.error.fields.name).toBeDefined();
    const catalogue = await fx.coach.post(clubPath(fx, '/balls'), { ...PLAY_BALL, name: 'Tennis ball' });
    expect(catalogue.status).toBe(409);
    expect(catalogue.body.error.message).toMatch(/is a catalogue ball already/);
  });

  it('refuses a flight whose ball is neither in the catalogue nor the club’s, on create and on edit', async () => {
    const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'playball-400mm' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.message).toMatch(/"playball-400mm" is neither a catalogue ball nor one of the club's balls/);
    expect(res.body.error.fields.ballId).toBeDefined();
    const ok = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
    const patch = await fx.coach.patch(clubPath(fx, `/flights/${ok.body.data.id}`), { ballId: 'club:999999' });
    expect(patch.status).toBe(400);
    expect(patch.body.error.fields.ballId).toBeDefined();
  });

  it('refuses another club’s ball for a flight', async () => {
    const other = await createClubFixture();
    const theirs = await other.coach.post(clubPath(other, '/balls'), { ...PLAY_BALL, name: 'Their ball' });
    const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: theirs.body.data.ballId });
    expect(res.status).toBe(400);
    const edit = await fx.coach.patch(clubPath(fx, `/balls/${theirs.body.data.id}`), { massKg: 0.2 });
    expect(edit.status).toBe(404);
  });

  it('fits a flight of a club ball with its own mass, diameter and C_d range, and refits it when the ball is edited', async () => {
    const list = await fx.coach.get(clubPath(fx, '/balls'));
    const ball = (list.body.data as { id: number; ballId: string; name: string }[]).find((b) => b.name === PLAY_BALL.name)!;
    const created = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'long_throw', ballId: ball.ballId });
    expect(created.status).toBe(201);
    const flightId = created.body.data.id as number;
    // A light, large ball: drag matters, so a wrong mass or size would show in C_d at once.
    const track = generateTrack({ launch: { speed: 12, angleDeg: 40, height: 1.5 }, ball: PLAY_BALL, air: standardAir(), aero: { model: 'drag', cd: 0.45 }, fps: 120, endTime: 1.2 });
    const csv = `# metres\nt,x,y\n${track.t.map((t, i) => `${t},${track.x[i]},${track.y[i]}`).join('\n')}\n`;
    const imported = await fx.coach.post(clubPath(fx, `/flights/${flightId}/track/import`), { csv });
    expect(imported.status, JSON.stringify(imported.body)).toBe(200);
    expect((await fx.coach.post(clubPath(fx, `/flights/${flightId}/fit`), { model: 'drag' })).status).toBe(202);
    await testWorker().drain();
    const fit = await Fit.findOne({ where: { flightId }, order: [['id', 'DESC']] });
    const result = fit!.result as { cd: number; setup: { ball: { massKg: number; diameterM: number; cdRange: { min: number; max: number } } } };
    expect(result.setup.ball).toMatchObject({ massKg: 0.35, diameterM: 0.4, cdRange: { min: 0.35, max: 0.55 } });
    // Noise-free samples snapped to the 120 fps frames: C_d recovered to 1 % (common practice for exact tracks).
    expect(result.cd).toBeGreaterThan(0.45 * 0.99);
    expect(result.cd).toBeLessThan(0.45 * 1.01);

    const edited = await fx.coach.patch(clubPath(fx, `/balls/${ball.id}`), { massKg: 0.4 });
    expect(edited.status).toBe(200);
    expect(edited.body.data).toMatchObject({ massKg: 0.4, flightCount: 1 });
    expect(edited.body.data.refitJobIds).toHaveLength(1);
    await testWorker().drain();
    const refit = await Fit.findOne({ where: { flightId }, order: [['id', 'DESC']] });
    expect(refit!.id).toBeGreaterThan(fit!.id);
    expect((refit!.result as { setup: { ball: { massKg: number } } }).setup.ball.massKg).toBe(0.4);
    // Same track, heavier ball: the same deceleration needs a C_d larger in proportion to the mass (F = ½ρC_dAV², a = F/m).
    expect((refit!.result as { cd: number }).cd).toBeCloseTo(result.cd * (0.4 / 0.35), 2);
  });

  it('puts a flight in needs attention, with the reason, when its C_d lies outside the ball’s range', async () => {
    const narrow = await fx.coach.post(clubPath(fx, '/balls'), { ...PLAY_BALL, name: 'Narrow range ball', cdMin: 0.1, cdMax: 0.15 });
    const flightId = await importedFlight(narrow.body.data.ballId);
    await testWorker().drain();
    const flight = (await fx.coach.get(clubPath(fx, `/flights/${flightId}`))).body.data;
    expect(flight.status).toBe('needs_attention');
    expect(flight.attentionReason).toMatch(/lies outside the typical 0.1–0.15 for Narrow range ball/);
    expect(flight.latestFit.warnings.map((w: { code: string }) => w.code)).toContain('CD_OUTSIDE_RANGE');
  });

  it('assumes the catalogue ball a club ball’s mass and diameter match when the track cannot determine C_d, and says so', async () => {
    // 0.43 kg and 0.22 m lie within IFAB Law 2's ranges (410–450 g, 68–70 cm circumference, from memory).
    const own = await fx.coach.post(clubPath(fx, '/balls'), { name: 'Fennick Vale match ball', massKg: 0.43, diameterM: 0.22 });
    expect(own.status).toBe(201);
    const created = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'long_throw', ballId: own.body.data.ballId });
    const flightId = created.body.data.id as number;
    // A quarter of a second of a noisy kick: far too little to measure C_d.
    const track = generateTrack({ launch: { speed: 20, angleDeg: 35, height: 0.2 }, ball: 'football-5', air: standardAir(), aero: { model: 'drag', cd: 0.25 }, fps: 120, endTime: 0.25, noise: 0.03, seed: 5 });
    const csv = `# metres\nt,x,y\n${track.t.map((t, i) => `${t},${track.x[i]},${track.y[i]}`).join('\n')}\n`;
    expect((await fx.coach.post(clubPath(fx, `/flights/${flightId}/track/import`), { csv })).status).toBe(200);
    expect((await fx.coach.post(clubPath(fx, `/flights/${flightId}/fit`), { model: 'drag' })).status).toBe(202);
    await testWorker().drain();
    const fit = await Fit.findOne({ where: { flightId }, order: [['id', 'DESC']] });
    const result = fit!.result as { cd: number; cdPrior: { used: boolean; mean: number; assumedBall: { id: string } | null } };
    expect(result.cdPrior).toMatchObject({ used: true, mean: 0.25, assumedBall: { id: 'football-5' } });
    const flight = (await fx.coach.get(clubPath(fx, `/flights/${flightId}`))).body.data;
    const prior = (flight.latestFit.warnings as { code: string; message: string }[]).find((w) => w.code === 'CD_PRIOR_USED');
    expect(prior?.message).toMatch(/0\.2–0\.3 for Association football, size 5 \(the ball was assumed to be one: its 0\.43 kg and 0\.22 m/);
  });

  it('puts a flight in needs attention when the calibration’s ball-size cross-check failed', async () => {
    // The ball drawn at twice its size: the scale or the ball picked is off.
    const bad = await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), { ...calibration, ball: { ballId: 'football-5', diameterPx: 2 * (0.69 / Math.PI) * PX_PER_M } });
    expect(bad.body.data.ballCheck.ok).toBe(false);
    const flightId = await importedFlight('football-5', { speed: 14, angleDeg: 35, height: 0.2 }, 0.25);
    await testWorker().drain();
    const flight = (await fx.coach.get(clubPath(fx, `/flights/${flightId}`))).body.data;
    expect(flight.status).toBe('needs_attention');
    expect(flight.attentionReason).toMatch(/^The ball measures 200 % of its real diameter in the calibration/);
    await fx.coach.put(clubPath(fx, `/clips/${clipId}/calibration`), calibration);
    await testWorker().drain();
  });

  it('refuses to delete a ball flights use, and deletes an unused one', async () => {
    const list = await fx.coach.get(clubPath(fx, '/balls'));
    const used = (list.body.data as { id: number; name: string }[]).find((b) => b.name === PLAY_BALL.name)!;
    const refused = await fx.coach.delete(clubPath(fx, `/balls/${used.id}`));
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe(`1 flight uses the ball "${PLAY_BALL.name}": tag it with another ball first, or keep this one.`);
    const spare = await fx.coach.post(clubPath(fx, '/balls'), { name: 'Spare', massKg: 0.1, diameterM: 0.1 });
    expect((await fx.coach.delete(clubPath(fx, `/balls/${spare.body.data.id}`))).status).toBe(204);
    expect((await fx.coach.get(clubPath(fx, '/balls'))).body.data.map((b: { name: string }) => b.name)).not.toContain('Spare');
  });
});
