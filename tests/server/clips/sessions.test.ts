import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Flight, Session } from '../../../server/models';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { clubPath, useTestStorage, type TestStorage } from './helpers';

let fx: ClubFixture;
let store: TestStorage;

beforeAll(async () => {
  store = await useTestStorage();
  fx = await createClubFixture();
});

afterAll(async () => {
  await store.remove();
});

/** A clip row and a flight of the given athlete, straight in the database (no upload needed for session rules). */
async function seedFlight(sessionId: number, athleteProfileId: number): Promise<{ clipId: number; flightId: number }> {
  const clip = await Clip.create({
    clubId: fx.clubId,
    sessionId,
    label: 'seeded',
    kind: 'video',
    originalName: 'seeded.mp4',
    sizeBytes: 10,
    sourceKey: `clubs/${fx.clubId}/clips/0/source/video.mp4`,
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
  const flight = await Flight.create({
    clubId: fx.clubId,
    clipId: clip.id,
    athleteProfileId,
    action: 'punt',
    ballId: 'football-5',
    frameStart: 0,
    frameEnd: 47,
    attentionReason: null,
    notes: null,
  });
  return { clipId: clip.id, flightId: flight.id };
}

describe('sessions API', () => {
  it('creates a session with SI conditions and lists it newest first when a coach posts one', async () => {
    const res = await fx.coach.post(clubPath(fx, '/sessions'), {
      date: '2025-03-02',
      venue: 'Fennick Vale lower field',
      notes: 'Cool evening, light breeze',
      conditions: { airTemperatureK: 283.15, airPressurePa: 101_000, relativeHumidityPct: 70, windSpeedMps: 3, windDirectionDeg: 180 },
    });
    expect(res.status).toBe(201);
    expect(res.body.data).toMatchObject({
      date: '2025-03-02',
      venue: 'Fennick Vale lower field',
      conditions: { airTemperatureK: 283.15, airPressurePa: 101_000, altitudeM: null, relativeHumidityPct: 70, windSpeedMps: 3, windDirectionDeg: 180 },
      clipCount: 0,
      flightCount: 0,
    });
    await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-05-20', venue: 'Highmoor ground', conditions: { altitudeM: 1600 } });
    const list = await fx.coach.get(clubPath(fx, '/sessions'));
    expect(list.status).toBe(200);
    const dates = (list.body.data as { date: string }[]).map((s) => s.date);
    expect(dates).toEqual([...dates].sort().reverse());
    expect(list.body.meta.total).toBe(dates.length);
  });

  it('filters by date range and venue when asked', async () => {
    const res = await fx.admin.get(clubPath(fx, '/sessions?from=2025-05-01&to=2025-05-31&venue=Highmoor'));
    expect(res.status).toBe(200);
    expect((res.body.data as { venue: string }[]).map((s) => s.venue)).toEqual(['Highmoor ground']);
  });

  it('refuses a session without venue or with an impossible date, naming the fields', async () => {
    const res = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-02-30', venue: '' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields.date).toMatch(/real calendar day/);
    expect(res.body.error.fields.venue).toMatch(/Venue is required/);
  });

  it('refuses a temperature given in Celsius by mistake when it is below 200 K', async () => {
    const res = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-02-01', venue: 'Pitch', conditions: { airTemperatureK: 15 } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields['conditions.airTemperatureK']).toMatch(/at least 200/);
  });

  it('edits the venue and conditions when a coach patches them', async () => {
    const created = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-06-01', venue: 'Old venue' });
    const id = created.body.data.id as number;
    const res = await fx.coach.patch(clubPath(fx, `/sessions/${id}`), { venue: 'New venue', conditions: { windSpeedMps: 5, windDirectionDeg: 0 } });
    expect(res.status).toBe(200);
    expect(res.body.data.venue).toBe('New venue');
    expect(res.body.data.conditions).toMatchObject({ windSpeedMps: 5, windDirectionDeg: 0, airTemperatureK: null });
  });

  it('deletes an empty session without confirmation', async () => {
    const created = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-06-02', venue: 'Empty day' });
    const id = created.body.data.id as number;
    expect((await fx.coach.delete(clubPath(fx, `/sessions/${id}`))).status).toBe(204);
    expect(await Session.findByPk(id)).toBeNull();
  });

  it('answers 409 with the number of flights and keeps everything when a session with flights is deleted unconfirmed', async () => {
    const created = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-06-03', venue: 'Busy day' });
    const id = created.body.data.id as number;
    const { clipId, flightId } = await seedFlight(id, fx.otherAthleteProfileId);
    await store.storage.put(`clubs/${fx.clubId}/clips/${clipId}/source/video.mp4`, (await import('node:stream')).Readable.from(['x']));
    const res = await fx.coach.delete(clubPath(fx, `/sessions/${id}`));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CONFLICT');
    expect(res.body.error.message).toMatch(/holds 1 flight in 1 clip/);
    expect(await Flight.findByPk(flightId)).not.toBeNull();
    expect(await store.storage.list(`clubs/${fx.clubId}/clips/${clipId}`)).toHaveLength(1);
  });

  it('deletes the session, its clips, flights and files when the deletion is confirmed', async () => {
    const created = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-06-04', venue: 'Confirmed day' });
    const id = created.body.data.id as number;
    const { clipId, flightId } = await seedFlight(id, fx.otherAthleteProfileId);
    await store.storage.put(`clubs/${fx.clubId}/clips/${clipId}/source/video.mp4`, (await import('node:stream')).Readable.from(['x']));
    const res = await fx.coach.delete(clubPath(fx, `/sessions/${id}?confirm=true`));
    expect(res.status).toBe(204);
    expect(await Session.findByPk(id)).toBeNull();
    expect(await Clip.findByPk(clipId)).toBeNull();
    expect(await Flight.findByPk(flightId)).toBeNull();
    expect(await store.storage.list(`clubs/${fx.clubId}/clips/${clipId}`)).toEqual([]);
  });

  it('shows an athlete only the sessions holding their own flights, with their own counts', async () => {
    const mine = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-07-01', venue: 'Athlete day' });
    const notMine = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2025-07-02', venue: 'Others day' });
    await seedFlight(mine.body.data.id, fx.members.athlete.athleteProfileId!);
    await seedFlight(mine.body.data.id, fx.otherAthleteProfileId);
    await seedFlight(notMine.body.data.id, fx.otherAthleteProfileId);
    const list = await fx.athlete.get(clubPath(fx, '/sessions'));
    expect(list.status).toBe(200);
    expect((list.body.data as { id: number }[]).map((s) => s.id)).toEqual([mine.body.data.id]);
    expect(list.body.data[0]).toMatchObject({ clipCount: 1, flightCount: 1 });
    const coachView = await fx.coach.get(clubPath(fx, `/sessions/${mine.body.data.id}`));
    expect(coachView.body.data).toMatchObject({ clipCount: 2, flightCount: 2 });
    expect((await fx.athlete.get(clubPath(fx, `/sessions/${mine.body.data.id}`))).status).toBe(200);
    expect((await fx.athlete.get(clubPath(fx, `/sessions/${notMine.body.data.id}`))).status).toBe(404);
  });

  it('adds session, clip and flight counts to the club overview', async () => {
    const res = await fx.coach.get(clubPath(fx, '/overview'));
    expect(res.status).toBe(200);
    expect(res.body.data.counts.sessions).toBeGreaterThan(0);
    expect(res.body.data.counts.flights).toBeGreaterThan(0);
    const athlete = await fx.athlete.get(clubPath(fx, '/overview'));
    expect(athlete.body.data.counts).toMatchObject({ sessions: 1, clips: 1, flights: 1 });
  });
});
