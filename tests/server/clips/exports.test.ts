import { beforeAll, describe, expect, it } from 'vitest';
import { AthleteProfile, Fit, Flight, TrackPoint } from '../../../server/models';
import { Club, createClubFixture, type ApiClient, type ClubFixture } from '../../support/app';
import { exportRecords } from '../../support/csv';
import { clubPath, createSession, insertClip } from './helpers';

/**
 * CSV exports: the Flights list, a session's flights and a flight's track. Units in the header (the member's own,
 * or `?units=`), a UTF-8 BOM first, formula-like names defused, and an athlete's files only with their own flights.
 */
let fx: ClubFixture;
const ids = { session: 0, otherSession: 0, ownFlight: 0, otherFlight: 0, loneFlight: 0 };
const BOM = '\uFEFF';

/** The body of a CSV answer as text (supertest does not buffer text/csv as text by itself). */
async function csv(client: ApiClient, path: string): Promise<{ status: number; type: string; disposition: string; text: string; body: { error?: { code: string; message: string; fields: Record<string, string> } } }> {
  const res = await client.agent.get(clubPath(fx, path)).buffer(true).parse((r, done) => {
    let text = '';
    r.setEncoding('utf8');
    r.on('data', (chunk: string) => (text += chunk));
    r.on('end', () => done(null, text));
  });
  const text = res.body as unknown as string;
  const json = res.headers['content-type']?.startsWith('application/json') ? JSON.parse(text) : {};
  return { status: res.status, type: res.headers['content-type'] ?? '', disposition: res.headers['content-disposition'] ?? '', text, body: json };
}

const records = exportRecords;

beforeAll(async () => {
  fx = await createClubFixture();
  await AthleteProfile.update({ displayName: '=HYPERLINK("x")' }, { where: { id: fx.members.athlete.athleteProfileId! } });
  await AthleteProfile.update({ displayName: 'Sølvi Ærendal' }, { where: { id: fx.otherAthleteProfileId } });
  ids.session = await createSession(fx.coach, fx.clubId, 'Prés du Lac');
  ids.otherSession = await createSession(fx.coach, fx.clubId, 'North field');
  const clip = await insertClip(fx.clubId, ids.session);
  const otherClip = await insertClip(fx.clubId, ids.otherSession);
  const flight = (clipId: number, athleteProfileId: number) =>
    Flight.create({ clubId: fx.clubId, clipId, athleteProfileId, action: 'punt', ballId: 'football-5', frameStart: 0, frameEnd: 47, status: 'fitted', attentionReason: null, notes: null });
  ids.ownFlight = (await flight(clip.id, fx.members.athlete.athleteProfileId!)).id;
  ids.otherFlight = (await flight(clip.id, fx.otherAthleteProfileId)).id;
  ids.loneFlight = (await flight(otherClip.id, fx.otherAthleteProfileId)).id;
  for (const flightId of [ids.ownFlight, ids.otherFlight]) {
    await Fit.create({
      clubId: fx.clubId, flightId, jobId: null, calibrationId: null, model: 'drag', engineVersion: 'test', status: 'fitted',
      // 60 mph and 100 ft exactly (0.44704 m/s per mph, 0.3048 m per ft).
      launchSpeedMps: 26.8224, launchAngleDeg: -2.5, carryM: 30.48, warnings: [], params: {}, result: { cd: 0.25, cdError: 0.01, standardCarry: 3.048 },
    });
  }
  await TrackPoint.bulkCreate([3, 4].map((frame) => ({ flightId: ids.ownFlight, frame, xPx: 10 + frame, yPx: 200, radiusPx: null, source: 'manual' as const, confidence: null })));
  // A calibration of 100 px = 30.48 m, so positions in feet are round numbers.
  const cal = await fx.coach.put(clubPath(fx, `/clips/${clip.id}/calibration`), {
    scale: { a: { xPx: 10, yPx: 200 }, b: { xPx: 110, yPx: 200 }, distanceM: 30.48 },
    origin: { xPx: 10, yPx: 200 },
    direction: 'right',
  });
  if (cal.status !== 200) throw new Error(`calibration failed: ${cal.status} ${JSON.stringify(cal.body)}`);
});

describe('flights export', () => {
  it('writes a BOM, metre columns and every flight for a coach of a metric club', async () => {
    const res = await csv(fx.coach, '/flights.csv');
    expect(res.status).toBe(200);
    expect(res.type).toBe('text/csv; charset=utf-8');
    expect(res.disposition).toMatch(/^attachment; filename="arcwright-flights-\d{4}-\d{2}-\d{2}\.csv"$/);
    expect(res.text.startsWith(BOM)).toBe(true);
    const [header, ...rows] = records(res.text);
    expect(header).toEqual([
      'flight_id', 'session_date', 'venue', 'athlete', 'action', 'ball', 'status', 'launch_speed_mps', 'launch_angle_deg',
      'carry_m', 'standard_carry_m', 'cd', 'cd_error', 'model', 'fitted_at',
    ]);
    expect(rows.map((r) => Number(r[0]))).toEqual([ids.ownFlight, ids.otherFlight, ids.loneFlight]);
    expect(rows[0].slice(2, 13)).toEqual(['Prés du Lac', "'=HYPERLINK(\"x\")", 'Punt', 'Association football, size 5', 'fitted', '26.822', '-2.5', '30.48', '3.048', '0.25', '0.01']);
  });

  it('defuses a formula-like athlete name and keeps accented names and negative numbers', async () => {
    const res = await csv(fx.coach, '/flights.csv');
    expect(res.text).toContain(`"'=HYPERLINK(""x"")"`);
    expect(res.text).toContain('Sølvi Ærendal');
    expect(res.text).toContain('Prés du Lac');
    expect(res.text).toContain(',-2.5,');
    expect(res.text).not.toMatch(/,=HYPERLINK/);
  });

  it('names feet and mph and converts the values when the club is on imperial', async () => {
    await Club.update({ units: 'imperial' }, { where: { id: fx.clubId } });
    try {
      const res = await csv(fx.admin, '/flights.csv');
      const [header, first] = records(res.text);
      expect(header).toContain('carry_ft');
      expect(header).toContain('launch_speed_mph');
      expect(header).not.toContain('carry_m');
      expect(first[header.indexOf('carry_ft')]).toBe('100');
      expect(first[header.indexOf('launch_speed_mph')]).toBe('60');
      expect(first[header.indexOf('standard_carry_ft')]).toBe('10');
      // The request may ask for metric columns all the same.
      const metric = records((await csv(fx.admin, '/flights.csv?units=metric')).text)[0];
      expect(metric).toContain('carry_m');
    } finally {
      await Club.update({ units: 'metric' }, { where: { id: fx.clubId } });
    }
  });

  it('uses the member’s own units over the club’s when they chose them', async () => {
    await fx.coach.patch('/api/v1/account', { unitsPreference: 'imperial' });
    try {
      expect(records((await csv(fx.coach, '/flights.csv')).text)[0]).toContain('carry_ft');
      expect(records((await csv(fx.admin, '/flights.csv')).text)[0]).toContain('carry_m');
    } finally {
      await fx.coach.patch('/api/v1/account', { unitsPreference: 'club' });
    }
  });

  it('applies the list’s filters when the query names them', async () => {
    const res = await csv(fx.coach, `/flights.csv?sessionId=${ids.otherSession}`);
    expect(records(res.text).slice(1).map((r) => Number(r[0]))).toEqual([ids.loneFlight]);
  });

  it('holds only the athlete’s own flights when an athlete exports', async () => {
    const res = await csv(fx.athlete, '/flights.csv');
    expect(res.status).toBe(200);
    expect(records(res.text).slice(1).map((r) => Number(r[0]))).toEqual([ids.ownFlight]);
    expect(res.text).not.toContain('Sølvi');
    const asked = await csv(fx.athlete, `/flights.csv?athleteId=${fx.otherAthleteProfileId}`);
    expect(records(asked.text)).toHaveLength(1);
  });

  it('refuses unknown units and a bad filter with a clear 400', async () => {
    const res = await csv(fx.coach, '/flights.csv?units=cubits');
    expect(res.status).toBe(400);
    expect(res.body.error?.fields.units).toBe('Pick metric or imperial units.');
    expect((await csv(fx.coach, '/flights.csv?sessionId=abc')).status).toBe(400);
  });

  it('answers 404 to another club’s admin and 401 to someone not signed in', async () => {
    const outsider = await csv(fx.outsider, '/flights.csv');
    expect(outsider.status).toBe(404);
    expect(outsider.body.error?.code).toBe('NOT_FOUND');
    expect((await csv(fx.anonymous, '/flights.csv')).status).toBe(401);
  });
});

describe('session flights export', () => {
  it('writes every flight of the session, named after its day and venue, for staff', async () => {
    const res = await csv(fx.coach, `/sessions/${ids.session}/flights.csv`);
    expect(res.status).toBe(200);
    expect(res.disposition).toMatch(/^attachment; filename="arcwright-session-\d{4}-\d{2}-\d{2}-pr-s-du-lac\.csv"$/);
    expect(res.text.startsWith(BOM)).toBe(true);
    expect(records(res.text).slice(1).map((r) => Number(r[0]))).toEqual([ids.ownFlight, ids.otherFlight]);
  });

  it('writes feet when asked for imperial', async () => {
    const [header] = records((await csv(fx.coach, `/sessions/${ids.session}/flights.csv?units=imperial`)).text);
    expect(header).toContain('standard_carry_ft');
  });

  it('gives an athlete only their own flights of a session they flew in, and 404 for one they did not', async () => {
    const own = await csv(fx.athlete, `/sessions/${ids.session}/flights.csv`);
    expect(own.status).toBe(200);
    expect(records(own.text).slice(1).map((r) => Number(r[0]))).toEqual([ids.ownFlight]);
    const other = await csv(fx.athlete, `/sessions/${ids.otherSession}/flights.csv`);
    expect(other.status).toBe(404);
    expect(other.body.error?.code).toBe('NOT_FOUND');
  });

  it('answers 404 to another club’s admin and for a session that does not exist', async () => {
    expect((await csv(fx.outsider, `/sessions/${ids.session}/flights.csv`)).status).toBe(404);
    expect((await csv(fx.coach, '/sessions/999999999/flights.csv')).status).toBe(404);
    expect((await csv(fx.anonymous, `/sessions/${ids.session}/flights.csv`)).status).toBe(401);
  });
});

describe('track export', () => {
  it('writes pixels and metre positions with a BOM when metric', async () => {
    const res = await csv(fx.coach, `/flights/${ids.ownFlight}/track.csv`);
    expect(res.status).toBe(200);
    expect(res.text).toBe(`${BOM}frame,t_s,x_px,y_px,radius_px,source,confidence,x_m,y_m\r\n3,0.1,13,200,,manual,,0.9144,0\r\n4,0.1333333333,14,200,,manual,,1.2192,0\r\n`);
  });

  it('writes positions in feet when the member sees imperial', async () => {
    const res = await csv(fx.coach, `/flights/${ids.ownFlight}/track.csv?units=imperial`);
    expect(res.text.split('\r\n')[0]).toBe(`${BOM}frame,t_s,x_px,y_px,radius_px,source,confidence,x_ft,y_ft`);
    expect(res.text.split('\r\n')[1]).toBe('3,0.1,13,200,,manual,,3,0');
  });

  it('gives an athlete their own track and 404 for a teammate’s', async () => {
    expect((await csv(fx.athlete, `/flights/${ids.ownFlight}/track.csv`)).status).toBe(200);
    const other = await csv(fx.athlete, `/flights/${ids.otherFlight}/track.csv`);
    expect(other.status).toBe(404);
    expect(other.body.error?.code).toBe('NOT_FOUND');
  });
});
