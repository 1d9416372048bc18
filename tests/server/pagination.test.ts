import { beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_PAGE_SIZE, MAX_PAGE_SIZE } from '../../shared/schemas/pagination';
import { Fit, Flight, Session } from '../../server/models';
import { addAthleteProfile, createClubFixture, type ClubFixture } from '../support/app';
import { clubPath, insertClip } from './clips/helpers';

let fx: ClubFixture;
let ownFlightIds: number[];
/** Flights of the fixture: 7 of the athlete (session A), 5 of another profile (session B). */
const OWN = 7;
const OTHER = 5;

async function addFlight(clipId: number, athleteProfileId: number, carryM: number | null, action = 'punt'): Promise<number> {
  const flight = await Flight.create({
    clubId: fx.clubId,
    clipId,
    athleteProfileId,
    action,
    ballId: action === 'punt' ? 'football-5' : 'volleyball',
    frameStart: 0,
    frameEnd: 20,
    status: carryM === null ? 'traced' : 'fitted',
    attentionReason: null,
    notes: null,
  });
  if (carryM !== null) {
    // Two fits: the list must sort by the newest one, not the older.
    for (const carry of [carryM - 30, carryM]) {
      await Fit.create({
        clubId: fx.clubId, flightId: flight.id, jobId: null, calibrationId: null, model: 'drag', engineVersion: 'test',
        status: 'fitted', launchSpeedMps: 20 + carry / 10, launchAngleDeg: 40, carryM: carry, warnings: [],
        params: {}, result: { standardCarry: carry + 1 },
      });
    }
  }
  return flight.id;
}

beforeAll(async () => {
  fx = await createClubFixture();
  const athleteProfileId = fx.members.athlete.athleteProfileId!;
  const sessionA = await Session.create({ clubId: fx.clubId, date: '2026-11-02', venue: 'Lower field', notes: null });
  const sessionB = await Session.create({ clubId: fx.clubId, date: '2026-11-09', venue: 'Upper field', notes: null });
  const clipA = await insertClip(fx.clubId, sessionA.id, 'a');
  const clipB = await insertClip(fx.clubId, sessionB.id, 'b');
  ownFlightIds = [];
  for (let i = 0; i < OWN; i += 1) ownFlightIds.push(await addFlight(clipA.id, athleteProfileId, i === 3 ? null : 40 + i * 3));
  const other = await addAthleteProfile(fx.clubId, 'Aster Pennywhistle');
  for (let i = 0; i < OTHER; i += 1) await addFlight(clipB.id, other, 50 + i, 'serve');
});

describe('flights list paging', () => {
  it('answers one page with page, pageSize and the total when a page is asked for', async () => {
    const first = await fx.coach.get(clubPath(fx, '/flights?page=1&pageSize=5'));
    expect(first.status).toBe(200);
    expect(first.body.meta).toEqual({ page: 1, pageSize: 5, total: OWN + OTHER });
    expect(first.body.data).toHaveLength(5);
    const third = await fx.coach.get(clubPath(fx, '/flights?page=3&pageSize=5'));
    expect(third.body.data).toHaveLength(OWN + OTHER - 10);
    const pages = [first, await fx.coach.get(clubPath(fx, '/flights?page=2&pageSize=5')), third];
    const ids = pages.flatMap((p) => (p.body.data as { id: number }[]).map((f) => f.id));
    expect(new Set(ids).size).toBe(OWN + OTHER);
  });

  it('uses the default page size when none is given', async () => {
    const res = await fx.coach.get(clubPath(fx, '/flights'));
    expect(res.body.meta).toEqual({ page: 1, pageSize: DEFAULT_PAGE_SIZE, total: OWN + OTHER });
  });

  it('answers an empty page with the total when the page lies past the last', async () => {
    const res = await fx.coach.get(clubPath(fx, '/flights?page=9&pageSize=5'));
    expect(res.status).toBe(200);
    expect(res.body.data).toEqual([]);
    expect(res.body.meta.total).toBe(OWN + OTHER);
  });

  it('refuses a page size over the maximum with a message that names the limit', async () => {
    const res = await fx.coach.get(clubPath(fx, `/flights?pageSize=${MAX_PAGE_SIZE + 1}`));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields.pageSize).toBe(`pageSize can be at most ${MAX_PAGE_SIZE}; ask for the following pages instead.`);
    expect(res.body.error.message).toContain(`at most ${MAX_PAGE_SIZE}`);
  });

  it('accepts the maximum page size itself', async () => {
    const res = await fx.coach.get(clubPath(fx, `/flights?pageSize=${MAX_PAGE_SIZE}`));
    expect(res.status).toBe(200);
    expect(res.body.meta.pageSize).toBe(MAX_PAGE_SIZE);
  });

  it.each([
    ['page=0', 'page', 'page must be 1 or more (the first page is 1).'],
    ['page=-2', 'page', 'page must be a whole number.'],
    ['page=two', 'page', 'page must be a whole number.'],
    ['page=1.5', 'page', 'page must be a whole number.'],
    ['pageSize=0', 'pageSize', 'pageSize must be 1 or more.'],
    ['pageSize=ten', 'pageSize', `pageSize must be a whole number from 1 to ${MAX_PAGE_SIZE}.`],
    ['page=1&page=2', 'page', 'page must be one whole number.'],
  ])('refuses %s with a clear message', async (query, field, message) => {
    const res = await fx.coach.get(clubPath(fx, `/flights?${query}`));
    expect(res.status).toBe(400);
    expect(res.body.error.fields[field]).toBe(message);
  });

  it('refuses an unknown sort column and names the ones it knows', async () => {
    const res = await fx.coach.get(clubPath(fx, '/flights?sort=colour'));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.sort).toMatch(/^sort must be one of recent, date, athlete, .*standardCarry\.$/);
  });

  it('sorts by the latest fit on the server, with unfitted flights last in either direction', async () => {
    const desc = await fx.coach.get(clubPath(fx, '/flights?sort=carry&order=desc&pageSize=20'));
    const carries = (desc.body.data as { latestFit: { carryM: number } | null }[]).map((f) => f.latestFit?.carryM ?? null);
    expect(carries).toEqual([58, 55, 54, 53, 52, 52, 51, 50, 46, 43, 40, null]);
    const asc = await fx.coach.get(clubPath(fx, '/flights?sort=standardCarry&order=asc&pageSize=3'));
    expect((asc.body.data as { latestFit: { standardCarryM: number } }[]).map((f) => f.latestFit.standardCarryM)).toEqual([41, 44, 47]);
  });

  it('sorts by session date and by athlete name', async () => {
    const byDate = await fx.coach.get(clubPath(fx, '/flights?sort=date&order=desc&pageSize=1'));
    expect(byDate.body.data[0].athleteName).toBe('Aster Pennywhistle');
    const byName = await fx.coach.get(clubPath(fx, '/flights?sort=athlete&order=asc&pageSize=1'));
    expect(byName.body.data[0].athleteName).toBe('Aster Pennywhistle');
    const byNameDesc = await fx.coach.get(clubPath(fx, '/flights?sort=athlete&order=desc&pageSize=1'));
    expect(byNameDesc.body.data[0].athleteName).toBe('Fixture Athlete');
  });

  it('filters by action, ball and status on the server and counts only what passes', async () => {
    const serve = await fx.coach.get(clubPath(fx, '/flights?action=serve&pageSize=2'));
    expect(serve.body.meta.total).toBe(OTHER);
    expect((serve.body.data as { action: string }[]).every((f) => f.action === 'serve')).toBe(true);
    const ball = await fx.coach.get(clubPath(fx, '/flights?ballId=football-5'));
    expect(ball.body.meta.total).toBe(OWN);
    const traced = await fx.coach.get(clubPath(fx, '/flights?status=traced'));
    expect(traced.body.meta.total).toBe(1);
  });

  it('keeps an athlete to their own flights in the total and the page', async () => {
    const res = await fx.athlete.get(clubPath(fx, '/flights?pageSize=3&sort=date&order=asc'));
    expect(res.body.meta.total).toBe(OWN);
    expect((res.body.data as { id: number }[]).map((f) => f.id)).toEqual(ownFlightIds.slice(0, 3));
    const teammate = await fx.athlete.get(clubPath(fx, '/flights?action=serve'));
    expect(teammate.body).toEqual({ data: [], meta: { page: 1, pageSize: DEFAULT_PAGE_SIZE, total: 0 } });
  });

  it('answers 404 to a non-member and 401 to someone signed out, before looking at the paging', async () => {
    expect((await fx.outsider.get(clubPath(fx, '/flights?pageSize=9999'))).status).toBe(404);
    expect((await fx.anonymous.get(clubPath(fx, '/flights?pageSize=9999'))).status).toBe(401);
  });
});

describe('sessions, clips and members paging', () => {
  it('pages sessions newest first with the total', async () => {
    const res = await fx.coach.get(clubPath(fx, '/sessions?pageSize=1'));
    expect(res.status).toBe(200);
    expect(res.body.meta).toEqual({ page: 1, pageSize: 1, total: 2 });
    expect(res.body.data[0].date).toBe('2026-11-09');
    const second = await fx.coach.get(clubPath(fx, '/sessions?pageSize=1&page=2'));
    expect(second.body.data[0].date).toBe('2026-11-02');
  });

  it('counts for an athlete only the sessions and clips holding their flights', async () => {
    expect((await fx.athlete.get(clubPath(fx, '/sessions'))).body.meta.total).toBe(1);
    expect((await fx.athlete.get(clubPath(fx, '/clips'))).body.meta.total).toBe(1);
  });

  it('pages clips with the total', async () => {
    const res = await fx.coach.get(clubPath(fx, '/clips?pageSize=1&page=2'));
    expect(res.status).toBe(200);
    expect(res.body.meta).toEqual({ page: 2, pageSize: 1, total: 2 });
    expect(res.body.data).toHaveLength(1);
  });

  it('pages members by name with the total', async () => {
    const res = await fx.admin.get(clubPath(fx, '/members?pageSize=2'));
    expect(res.status).toBe(200);
    expect(res.body.meta).toEqual({ page: 1, pageSize: 2, total: 3 });
    expect((res.body.data as { displayName: string }[]).map((m) => m.displayName)).toEqual(['Fixture Admin', 'Fixture Athlete']);
  });

  it.each(['/sessions', '/clips', '/members'])('refuses a page size over the maximum on %s', async (path) => {
    const res = await fx.admin.get(clubPath(fx, `${path}?pageSize=${MAX_PAGE_SIZE + 1}`));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.pageSize).toContain(`at most ${MAX_PAGE_SIZE}`);
  });
});

describe('flights list default order', () => {
  it('lists the newest recorded flights first when no sort is given', async () => {
    const res = await fx.coach.get(clubPath(fx, '/flights?pageSize=3'));
    const ids = (res.body.data as { id: number }[]).map((f) => f.id);
    expect(ids).toEqual([...ids].sort((a, b) => b - a));
    expect(ids[0]).toBeGreaterThan(ownFlightIds[OWN - 1]!);
  });

  it('pages across the flights without a fit when sorting upwards by a fit figure', async () => {
    const pages = await Promise.all([1, 2, 3, 4].map((page) => fx.coach.get(clubPath(fx, `/flights?sort=launchSpeed&order=asc&pageSize=3&page=${page}`))));
    const speeds = pages.flatMap((p) => (p.body.data as { latestFit: { launchSpeedMps: number } | null }[]).map((f) => f.latestFit?.launchSpeedMps ?? null));
    expect(speeds).toHaveLength(OWN + OTHER);
    expect(speeds.at(-1)).toBeNull();
    const valued = speeds.slice(0, -1) as number[];
    expect(valued).toEqual([...valued].sort((a, b) => a - b));
  });
});
