import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Flight, TrackPoint } from '../../../server/models';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { clubPath, createSession, flightClip, insertClip, upload, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let clipId: number;

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-flights-'));
  fx = await createClubFixture();
  const sessionId = await createSession(fx.coach, fx.clubId);
  const { videoPath } = await flightClip(dir);
  const res = await upload(fx.coach, fx.clubId, sessionId, { video: videoPath });
  clipId = res.body.data.clip.id;
  await testWorker().drain();
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

async function newFlight(body: Record<string, unknown> = {}): Promise<number> {
  const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', ...body });
  if (res.status !== 201) throw new Error(`flight create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.data.id;
}

describe('flight actions', () => {
  it('gives a club the default action list on first use', async () => {
    const res = await fx.athlete.get(clubPath(fx, '/flight-actions'));
    expect(res.status).toBe(200);
    expect((res.body.data as { key: string }[]).map((a) => a.key)).toEqual([
      'punt', 'drop_kick', 'place_kick', 'goal_kick', 'long_throw', 'throw_in', 'serve', 'pitch', 'outfield_throw', 'shot_put',
    ]);
  });

  it('creates the first flights of a new club at once, each finding the default actions', async () => {
    const fresh = await createClubFixture();
    const freshSession = await createSession(fresh.coach, fresh.clubId);
    const clip = await insertClip(fresh.clubId, freshSession);
    const answers = await Promise.all(
      Array.from({ length: 6 }, () => fresh.coach.post(clubPath(fresh, `/clips/${clip.id}/flights`), { athleteId: fresh.otherAthleteProfileId, action: 'punt', ballId: 'football-5' })),
    );
    expect(answers.map((a) => a.status)).toEqual([201, 201, 201, 201, 201, 201]);
  });

  it('adds a club action with a key made from its label, and refuses the same key twice', async () => {
    const res = await fx.coach.post(clubPath(fx, '/flight-actions'), { label: 'Hammer throw' });
    expect(res.status).toBe(201);
    expect(res.body.data).toMatchObject({ key: 'hammer_throw', label: 'Hammer throw', archived: false });
    const again = await fx.coach.post(clubPath(fx, '/flight-actions'), { label: 'Hammer Throw' });
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already uses the key "hammer_throw"/);
  });

  it('refuses to delete an action flights use and suggests archiving it', async () => {
    const list = await fx.coach.get(clubPath(fx, '/flight-actions'));
    const serve = (list.body.data as { id: number; key: string }[]).find((a) => a.key === 'serve')!;
    await newFlight({ action: 'serve' });
    const res = await fx.coach.delete(clubPath(fx, `/flight-actions/${serve.id}`));
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/Archive it instead/);
    const archived = await fx.coach.patch(clubPath(fx, `/flight-actions/${serve.id}`), { archived: true });
    expect(archived.body.data.archived).toBe(true);
    const refused = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'serve', ballId: 'tennis' });
    expect(refused.status).toBe(400);
    expect(refused.body.error.fields.action).toBeDefined();
  });
});

describe('flights API', () => {
  it('creates a flight spanning the whole clip by default, with status uploaded', async () => {
    const res = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.members.athlete.athleteProfileId, action: 'punt', ballId: 'football-5' });
    expect(res.status).toBe(201);
    expect(res.body.data).toMatchObject({
      clipId,
      athleteId: fx.members.athlete.athleteProfileId,
      athleteName: 'Fixture Athlete',
      action: 'punt',
      ballId: 'football-5',
      frameStart: 0,
      frameEnd: 47,
      status: 'uploaded',
      pointCount: 0,
      latestFit: null,
    });
  });

  it('refuses an athlete of another club and a frame range beyond the clip, naming the fields', async () => {
    const other = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: 999_999, action: 'punt', ballId: 'football-5' });
    expect(other.status).toBe(400);
    expect(other.body.error.fields.athleteId).toBeDefined();
    const range = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', frameEnd: 48 });
    expect(range.status).toBe(400);
    expect(range.body.error.fields.frameEnd).toBe('At most 47.');
  });

  it('replaces the points in bulk, turns the flight traced, and clears it back to uploaded', async () => {
    const id = await newFlight({ frameStart: 5, frameEnd: 40 });
    const put = await fx.coach.put(clubPath(fx, `/flights/${id}/points`), {
      points: [
        { frame: 6, xPx: 30.5, yPx: 200.25, radiusPx: 6 },
        { frame: 5, xPx: 28, yPx: 202, source: 'auto', confidence: 0.9 },
      ],
    });
    expect(put.status).toBe(200);
    expect(put.body.data).toEqual([
      { frame: 5, xPx: 28, yPx: 202, radiusPx: null, source: 'auto', confidence: 0.9, tS: 5 / 30, xM: null, yM: null, xRefPx: 28, yRefPx: 202 },
      { frame: 6, xPx: 30.5, yPx: 200.25, radiusPx: 6, source: 'manual', confidence: null, tS: 6 / 30, xM: null, yM: null, xRefPx: 30.5, yRefPx: 200.25 },
    ]);
    expect((await fx.coach.get(clubPath(fx, `/flights/${id}`))).body.data).toMatchObject({ status: 'traced', pointCount: 2 });
    const moved = await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [{ frame: 6, xPx: 31, yPx: 199 }] });
    expect(moved.body.data).toHaveLength(1);
    const cleared = await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [] });
    expect(cleared.body.data).toEqual([]);
    expect((await Flight.findByPk(id))?.status).toBe('uploaded');
  });

  it('saves the points of many flights at once, and of one flight from two writers, without a lock conflict reaching the coach', async () => {
    const ids = await Promise.all(Array.from({ length: 8 }, () => newFlight({ frameStart: 2, frameEnd: 30 })));
    const track = (shift: number) => Array.from({ length: 12 }, (_, i) => ({ frame: 3 + i, xPx: 20 + i * 5 + shift, yPx: 200 - i * 4 }));
    // Every flight written twice at the same moment: the rounds interleave deletes and inserts of neighbouring flights' rows.
    const answers = await Promise.all(ids.flatMap((id) => [0, 1].map((shift) => fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: track(shift) }))));
    expect(answers.map((a) => a.status)).toEqual(answers.map(() => 200));
    for (const id of ids) {
      const points = await TrackPoint.findAll({ where: { flightId: id }, order: [['frame', 'ASC']] });
      expect(points.map((p) => p.frame)).toEqual(track(0).map((p) => p.frame));
      // One writer's track whole, never a mixture of the two.
      const shift = points[0]!.xPx - 20;
      expect(points.map((p) => p.xPx)).toEqual(track(shift).map((p) => p.xPx));
    }
  });

  it('refuses two points on one frame, a point outside the range and a point off the picture, keeping the old points', async () => {
    const id = await newFlight({ frameStart: 10, frameEnd: 20 });
    await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [{ frame: 12, xPx: 50, yPx: 50 }] });
    const dup = await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [{ frame: 11, xPx: 1, yPx: 1 }, { frame: 11, xPx: 2, yPx: 2 }] });
    expect(dup.status).toBe(400);
    expect(dup.body.error.fields['points.1.frame']).toMatch(/Frame 11 has two points/);
    const outside = await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [{ frame: 25, xPx: 1, yPx: 1 }] });
    expect(outside.status).toBe(400);
    expect(outside.body.error.message).toMatch(/Frame 25 is outside this flight's frames 10–20/);
    const off = await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [{ frame: 15, xPx: 400, yPx: 10 }] });
    expect(off.status).toBe(400);
    expect(off.body.error.message).toMatch(/outside the 320×240 picture/);
    expect(await TrackPoint.count({ where: { flightId: id } })).toBe(1);
  });

  it('refuses a narrower range that would leave points outside it', async () => {
    const id = await newFlight();
    await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [{ frame: 30, xPx: 50, yPx: 50 }] });
    const res = await fx.coach.patch(clubPath(fx, `/flights/${id}`), { frameEnd: 20 });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/1 traced point lies outside frames 0–20/);
  });

  it('allows reviewed only after a fit', async () => {
    const id = await newFlight();
    const res = await fx.coach.patch(clubPath(fx, `/flights/${id}`), { status: 'reviewed' });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/Only a fitted flight can be marked reviewed; this one is uploaded/);
  });

  it('imports a pixel CSV (with comments and blank lines) and exports it again', async () => {
    const id = await newFlight();
    const csv = '# traced by hand\nframe,x_px,y_px,radius_px\n3,10.5,200,6\n\n4,14,195.5,\n';
    const res = await fx.coach.post(clubPath(fx, `/flights/${id}/track/import`), { csv });
    expect(res.status).toBe(200);
    expect(res.body.data.map((p: { frame: number; xPx: number; yPx: number; radiusPx: number | null }) => [p.frame, p.xPx, p.yPx, p.radiusPx])).toEqual([
      [3, 10.5, 200, 6],
      [4, 14, 195.5, null],
    ]);
    const out = await fx.coach.agent.get(clubPath(fx, `/flights/${id}/track.csv`)).buffer(true);
    expect(out.status).toBe(200);
    expect(out.headers['content-type']).toMatch(/^text\/csv/);
    expect(out.headers['content-disposition']).toBe(`attachment; filename="flight-${id}-track.csv"`);
    expect(out.text).toBe(`\uFEFFframe,t_s,x_px,y_px,radius_px,source,confidence,x_m,y_m\r\n3,0.1,10.5,200,6,manual,,,\r\n4,0.1333333333,14,195.5,,manual,,,\r\n`);
    // The export imports back as it is (BOM, CRLF and the export's own columns).
    const again = await fx.coach.post(clubPath(fx, `/flights/${id}/track/import`), { csv: out.text });
    expect(again.status).toBe(200);
    expect(again.body.data).toHaveLength(2);
  });

  it('takes a raw text/csv body as well as JSON', async () => {
    const id = await newFlight();
    if (fx.coach.csrfToken === null) await fx.coach.refreshCsrf();
    const res = await fx.coach.agent
      .post(clubPath(fx, `/flights/${id}/track/import`))
      .set('X-CSRF-Token', fx.coach.csrfToken!)
      .set('Content-Type', 'text/csv')
      .send('frame,x_px,y_px\n7,20,30\n');
    expect(res.status).toBe(200);
    expect(res.body.data).toHaveLength(1);
  });

  const csvErrors: [string, string, RegExp][] = [
    ['a cell that is not a number', 'frame,x_px,y_px\n1,10,20\n2,12,1x\n', /^Line 3, column "y_px": "1x" is not a number\.$/],
    ['a frame that is not a whole number', 'frame,x_px,y_px\n1.5,10,20\n', /^Line 2, column "frame": "1\.5" is not a frame index/],
    ['a row with a missing cell', 'frame,x_px,y_px\n1,10\n', /^Line 2: 2 cells where the header has 3\.$/],
    ['a header without known columns', 'a,b,c\n1,2,3\n', /^Line 1: the header must name either the pixel columns frame,x_px,y_px or the metre columns t,x,y/],
    ['an unknown extra column', 'frame,x_px,y_px,speed\n1,2,3,4\n', /^Line 1: unknown column "speed"/],
    ['two rows on one frame', 'frame,x_px,y_px\n4,10,20\n4,11,21\n', /^Line 3, column "frame": frame 4 already has a point \(line 2\)/],
    ['a frame outside the flight', 'frame,x_px,y_px\n90,10,20\n', /^Line 2, column "frame": Frame 90 is outside this flight's frames 0–47/],
    ['a header and no rows', 'frame,x_px,y_px\n', /has a header but no rows/],
  ];
  for (const [what, csv, message] of csvErrors) {
    it(`refuses a CSV with ${what}, naming the line and column`, async () => {
      const id = await newFlight();
      const res = await fx.coach.post(clubPath(fx, `/flights/${id}/track/import`), { csv });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('CSV_INVALID');
      expect(res.body.error.message).toMatch(message);
      expect(res.body.error.fields.csv).toBe(res.body.error.message);
      expect(await TrackPoint.count({ where: { flightId: id } })).toBe(0);
    });
  }

  it('needs the calibration for a metre CSV', async () => {
    const id = await newFlight();
    const res = await fx.coach.post(clubPath(fx, `/flights/${id}/track/import`), { csv: 't,x,y\n0,0,1\n' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CALIBRATION_REQUIRED');
  });

  it('shows an athlete their own flights only, and 404 for anyone else’s', async () => {
    const own = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.members.athlete.athleteProfileId, action: 'punt', ballId: 'football-5' });
    const other = await newFlight();
    const list = await fx.athlete.get(clubPath(fx, '/flights'));
    expect(list.status).toBe(200);
    const ids = (list.body.data as { id: number; athleteId: number }[]).map((f) => f.athleteId);
    expect(new Set(ids)).toEqual(new Set([fx.members.athlete.athleteProfileId]));
    expect((await fx.athlete.get(clubPath(fx, `/flights/${own.body.data.id}`))).status).toBe(200);
    expect((await fx.athlete.get(clubPath(fx, `/flights/${other}`))).status).toBe(404);
    expect((await fx.athlete.get(clubPath(fx, `/flights/${other}/track.csv`))).status).toBe(404);
  });

  it('deletes a flight with its points', async () => {
    const id = await newFlight();
    await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [{ frame: 1, xPx: 1, yPx: 1 }] });
    expect((await fx.coach.delete(clubPath(fx, `/flights/${id}`))).status).toBe(204);
    expect(await TrackPoint.count({ where: { flightId: id } })).toBe(0);
    expect((await fx.coach.get(clubPath(fx, `/flights/${id}`))).status).toBe(404);
  });
});
