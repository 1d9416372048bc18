import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import type { AthleteWorkload } from '../../shared/schemas/workload';
import { isoWeek, localDay } from '../../shared/workload/calendar';
import { YOUTH_CAUTION_TEXT } from '../../shared/workload/cautions';
import { AthleteProfile, Club, createClubFixture, testApp, type ClubFixture } from '../support/app';
import { recordFlights, recordSession, times } from '../support/records';

/** Fakes only the clock (not the timers the database driver needs). */
function at(iso: string): void {
  vi.useFakeTimers({ toFake: ['Date'] });
  vi.setSystemTime(new Date(iso));
}

afterEach(() => {
  vi.useRealTimers();
});

async function workloadOf(f: ClubFixture, athleteId: number, weeks = 2): Promise<AthleteWorkload> {
  const res = await f.coach.get(`/api/v1/clubs/${f.clubId}/athletes/${athleteId}/workload?weeks=${weeks}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body.data as AthleteWorkload;
}

describe('calendar of a club time zone', () => {
  it('numbers ISO weeks across a year end when the Thursday decides the year', () => {
    // ISO 8601: the week with the year's first Thursday is week 1 (common practice, checked against a printed calendar).
    expect(isoWeek('2026-01-01')).toBe('2026-W01');
    expect(isoWeek('2027-01-03')).toBe('2026-W53');
    expect(isoWeek('2027-01-04')).toBe('2027-W01');
    expect(isoWeek('2024-12-30')).toBe('2025-W01');
  });

  it('puts one instant on different days when the zones differ', () => {
    const instant = new Date('2026-03-01T20:30:00Z');
    expect(localDay(instant, 'UTC')).toBe('2026-03-01');
    expect(localDay(instant, 'Asia/Tokyo')).toBe('2026-03-02');
    expect(localDay(instant, 'America/Los_Angeles')).toBe('2026-03-01');
  });
});

describe('workload: counts per day and ISO week in the club’s time zone', () => {
  let f: ClubFixture;
  let athleteId: number;
  beforeAll(async () => {
    f = await createClubFixture(testApp());
    athleteId = f.members.athlete.athleteProfileId!;
    // Sunday 1 March and Monday 2 March 2026: the two sides of an ISO week boundary.
    const sunday = await recordSession(f.clubId, '2026-03-01');
    await recordFlights(f.clubId, sunday.clipId, times(3, { athleteId, action: 'punt' }));
    const monday = await recordSession(f.clubId, '2026-03-02');
    await recordFlights(f.clubId, monday.clipId, [...times(2, { athleteId, action: 'punt' }), { athleteId, action: 'drop_kick' }]);
    await recordFlights(f.clubId, monday.clipId, times(4, { athleteId: f.otherAthleteProfileId, action: 'punt' }));
  });

  it('lets the admin set an IANA time zone and refuses one Intl does not know', async () => {
    const ok = await f.admin.patch(`/api/v1/clubs/${f.clubId}`, { timeZone: 'Asia/Tokyo' });
    expect(ok.status).toBe(200);
    expect(ok.body.data.timeZone).toBe('Asia/Tokyo');
    const bad = await f.admin.patch(`/api/v1/clubs/${f.clubId}`, { timeZone: 'Mars/Olympus' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.timeZone).toMatch(/not known.*Europe\/Berlin/);
    const coach = await f.coach.patch(`/api/v1/clubs/${f.clubId}`, { timeZone: 'UTC' });
    expect(coach.status).toBe(403);
  });

  it('counts flights by their session day and sums each ISO week by action', async () => {
    at('2026-03-03T12:00:00Z');
    await Club.update({ timeZone: 'UTC' }, { where: { id: f.clubId } });
    const w = await workloadOf(f, athleteId);
    expect(w.today).toBe('2026-03-03');
    expect(w.week).toBe('2026-W10');
    expect(w.days.find((d) => d.key === '2026-03-01')?.byAction.punt).toEqual({ flights: 3, entered: 0, total: 3 });
    expect(w.days.find((d) => d.key === '2026-03-02')?.total).toBe(3);
    expect(w.weeks.map((x) => [x.key, x.total])).toEqual([
      ['2026-W09', 3],
      ['2026-W10', 3],
    ]);
    expect(w.weeks[1]!.byAction).toEqual({ punt: { flights: 2, entered: 0, total: 2 }, drop_kick: { flights: 1, entered: 0, total: 1 } });
  });

  it('starts the new week on the club’s Monday in a zone without daylight saving (Asia/Tokyo) while UTC is still on Sunday', async () => {
    at('2026-03-01T20:30:00Z'); // Monday 2 March, 05:30 in Tokyo (UTC+9 all year)
    await Club.update({ timeZone: 'Asia/Tokyo' }, { where: { id: f.clubId } });
    const tokyo = await workloadOf(f, athleteId, 1);
    expect(tokyo.timeZone).toBe('Asia/Tokyo');
    expect(tokyo.today).toBe('2026-03-02');
    expect(tokyo.week).toBe('2026-W10');
    expect(tokyo.days[0]!.key).toBe('2026-03-02');
    expect(tokyo.weeks).toEqual([expect.objectContaining({ key: '2026-W10', total: 3 })]);

    await Club.update({ timeZone: 'UTC' }, { where: { id: f.clubId } });
    const utc = await workloadOf(f, athleteId, 1);
    expect(utc.today).toBe('2026-03-01');
    expect(utc.weeks).toEqual([expect.objectContaining({ key: '2026-W09', total: 3 })]);
  });

  it('keeps Sunday evening in the old week in a zone behind UTC on its daylight-saving day (America/Los_Angeles)', async () => {
    // 8 March 2026 is the first day of daylight saving time in Los Angeles (UTC−7 from 02:00 local).
    at('2026-03-09T06:30:00Z'); // Sunday 8 March, 23:30 local; already Monday in UTC
    await Club.update({ timeZone: 'America/Los_Angeles' }, { where: { id: f.clubId } });
    const la = await workloadOf(f, athleteId, 1);
    expect(la.today).toBe('2026-03-08');
    expect(la.week).toBe('2026-W10');
    expect(la.weeks[0]!.total).toBe(3);
  });

  it('adds entered reps to the day the coach gives, and to today in the club’s zone when none is given', async () => {
    at('2026-03-01T20:30:00Z');
    await Club.update({ timeZone: 'Asia/Tokyo' }, { where: { id: f.clubId } });
    const entry = await f.coach.post(`/api/v1/clubs/${f.clubId}/workload-entries`, { athleteId, action: 'punt', count: 12, note: 'Field session, not filmed' });
    expect(entry.status, JSON.stringify(entry.body)).toBe(201);
    expect(entry.body.data).toMatchObject({ athleteId, action: 'punt', day: '2026-03-02', count: 12 });
    const w = await workloadOf(f, athleteId, 1);
    expect(w.days.find((d) => d.key === '2026-03-02')?.byAction.punt).toEqual({ flights: 2, entered: 12, total: 14 });
    expect(w.entries.map((e) => e.id)).toContain(entry.body.data.id);

    const removed = await f.coach.delete(`/api/v1/clubs/${f.clubId}/workload-entries/${entry.body.data.id}`);
    expect(removed.status).toBe(204);
    expect((await workloadOf(f, athleteId, 1)).days.find((d) => d.key === '2026-03-02')?.byAction.punt?.entered).toBe(0);
  });

  it('refuses an entry for a day after today, an unknown action, a teammate of another club and a count of 0', async () => {
    at('2026-03-01T20:30:00Z');
    await Club.update({ timeZone: 'UTC' }, { where: { id: f.clubId } });
    const future = await f.coach.post(`/api/v1/clubs/${f.clubId}/workload-entries`, { athleteId, action: 'punt', count: 5, day: '2026-03-02' });
    expect(future.status).toBe(400);
    expect(future.body.error.message).toMatch(/after today \(2026-03-01 in the club’s time zone\)/);
    const action = await f.coach.post(`/api/v1/clubs/${f.clubId}/workload-entries`, { athleteId, action: 'javelin_spin', count: 5 });
    expect(action.status).toBe(400);
    expect(action.body.error.fields.action).toBe('Pick an action from the list.');
    const other = await createClubFixture(f.app);
    const foreign = await f.coach.post(`/api/v1/clubs/${f.clubId}/workload-entries`, { athleteId: other.otherAthleteProfileId, action: 'punt', count: 5 });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.fields.athleteId).toBe('Pick an athlete from the squad.');
    const zero = await f.coach.post(`/api/v1/clubs/${f.clubId}/workload-entries`, { athleteId, action: 'punt', count: 0 });
    expect(zero.status).toBe(400);
    expect(zero.body.error.fields.count).toBe('Enter at least 1 rep.');
    const weeks = await f.coach.get(`/api/v1/clubs/${f.clubId}/athletes/${athleteId}/workload?weeks=40`);
    expect(weeks.status).toBe(400);
    expect(weeks.body.error.fields.weeks).toBe('weeks must be a whole number from 1 to 26.');
  });

  it('shows an athlete their own workload and answers 404 for a teammate’s', async () => {
    const own = await f.athlete.get(`/api/v1/clubs/${f.clubId}/athletes/${athleteId}/workload`);
    expect(own.status).toBe(200);
    const teammate = await f.athlete.get(`/api/v1/clubs/${f.clubId}/athletes/${f.otherAthleteProfileId}/workload`);
    expect(teammate.status).toBe(404);
  });
});

describe('workload: club thresholds and youth cautions', () => {
  let f: ClubFixture;
  let youthId: number;
  let adultId: number;
  beforeAll(async () => {
    f = await createClubFixture(testApp());
    youthId = f.members.athlete.athleteProfileId!;
    adultId = f.otherAthleteProfileId;
    await AthleteProfile.update({ birthYear: 2012 }, { where: { id: youthId } }); // 14 in 2026: band 13–14
    await AthleteProfile.update({ birthYear: 1998 }, { where: { id: adultId } });
    const s = await recordSession(f.clubId, '2026-03-04');
    await recordFlights(f.clubId, s.clipId, [...times(6, { athleteId: youthId, action: 'punt' }), ...times(9, { athleteId: adultId, action: 'punt' })]);
  });

  it('ships no thresholds: a new club has none and gives no caution', async () => {
    at('2026-03-04T12:00:00Z');
    expect((await f.coach.get(`/api/v1/clubs/${f.clubId}/workload-thresholds`)).body.data).toEqual([]);
    expect((await workloadOf(f, youthId)).cautions).toEqual([]);
  });

  it('replaces the threshold table when the admin saves it and refuses bad rows with field messages', async () => {
    const bad = await f.admin.put(`/api/v1/clubs/${f.clubId}/workload-thresholds`, {
      thresholds: [{ action: 'punt', ageBand: '13-14', dailyMax: null, weeklyMax: null }],
    });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields['thresholds.0']).toBe('Give a daily or a weekly threshold (or both), or remove the row.');
    const dup = await f.admin.put(`/api/v1/clubs/${f.clubId}/workload-thresholds`, {
      thresholds: [
        { action: 'punt', ageBand: '13-14', dailyMax: 5, weeklyMax: null },
        { action: 'punt', ageBand: '13-14', dailyMax: 6, weeklyMax: null },
      ],
    });
    expect(dup.status).toBe(400);
    expect(dup.body.error.fields.thresholds).toBe('Each action and age band may appear once; merge the duplicate rows.');
    const unknown = await f.admin.put(`/api/v1/clubs/${f.clubId}/workload-thresholds`, { thresholds: [{ action: 'nope', ageBand: '13-14', dailyMax: 5, weeklyMax: null }] });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.fields['thresholds.0.action']).toBe('Pick an action from the list.');
    const coach = await f.coach.put(`/api/v1/clubs/${f.clubId}/workload-thresholds`, { thresholds: [] });
    expect(coach.status).toBe(403);

    const ok = await f.admin.put(`/api/v1/clubs/${f.clubId}/workload-thresholds`, {
      thresholds: [
        { action: 'punt', ageBand: '13-14', dailyMax: 5, weeklyMax: 20 },
        { action: 'punt', ageBand: '17-18', dailyMax: 2, weeklyMax: null },
      ],
    });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body.data).toHaveLength(2);
  });

  it('cautions a youth over the daily threshold and not at it', async () => {
    at('2026-03-04T12:00:00Z');
    const w = await workloadOf(f, youthId);
    expect(w.ageBand).toBe('13-14');
    expect(w.thresholds).toEqual([{ action: 'punt', ageBand: '13-14', dailyMax: 5, weeklyMax: 20 }]);
    expect(w.cautions).toEqual([{ athleteId: youthId, action: 'punt', period: 'day', when: '2026-03-04', count: 6, limit: 5 }]);

    await f.admin.put(`/api/v1/clubs/${f.clubId}/workload-thresholds`, { thresholds: [{ action: 'punt', ageBand: '13-14', dailyMax: 6, weeklyMax: 20 }] });
    expect((await workloadOf(f, youthId)).cautions).toEqual([]);
  });

  it('cautions a youth over the weekly threshold once entered reps push the week over', async () => {
    at('2026-03-05T12:00:00Z');
    await f.coach.post(`/api/v1/clubs/${f.clubId}/workload-entries`, { athleteId: youthId, action: 'punt', count: 15, day: '2026-03-03' });
    const w = await workloadOf(f, youthId);
    expect(w.cautions).toEqual([{ athleteId: youthId, action: 'punt', period: 'week', when: '2026-W10', count: 21, limit: 20 }]);
  });

  it('never cautions an adult, whatever the counts', async () => {
    at('2026-03-04T12:00:00Z');
    await f.admin.put(`/api/v1/clubs/${f.clubId}/workload-thresholds`, {
      thresholds: AGE_BANDS_ALL.map((ageBand) => ({ action: 'punt', ageBand, dailyMax: 1, weeklyMax: 1 })),
    });
    const adult = await workloadOf(f, adultId);
    expect(adult.ageBand).toBeNull();
    expect(adult.thresholds).toEqual([]);
    expect(adult.cautions).toEqual([]);
  });

  it('lists the youths over a caution for the staff, and the Overview carries them', async () => {
    at('2026-03-04T12:00:00Z');
    const res = await f.coach.get(`/api/v1/clubs/${f.clubId}/workload/cautions`);
    expect(res.status).toBe(200);
    expect(res.body.data).toEqual([
      {
        athleteId: youthId,
        athleteName: 'Fixture Athlete',
        cautions: [
          { athleteId: youthId, action: 'punt', period: 'day', when: '2026-03-04', count: 6, limit: 1 },
          { athleteId: youthId, action: 'punt', period: 'week', when: '2026-W10', count: 21, limit: 1 },
        ],
      },
    ]);
    const overview = await f.coach.get(`/api/v1/clubs/${f.clubId}/overview`);
    expect(overview.body.data.staff.cautions.map((c: { athleteId: number }) => c.athleteId)).toEqual([youthId]);
  });

  it('words the caution as a reminder that defers to the governing body, local guidance and licensed medical practice', () => {
    expect(YOUTH_CAUTION_TEXT).toMatch(/overuse injuries/);
    expect(YOUTH_CAUTION_TEXT).toMatch(/governing body/);
    expect(YOUTH_CAUTION_TEXT).toMatch(/local rules/);
    expect(YOUTH_CAUTION_TEXT).toMatch(/licensed medical professional/);
    expect(YOUTH_CAUTION_TEXT).toMatch(/not medical advice/);
  });
});

const AGE_BANDS_ALL = ['u11', '11-12', '13-14', '15-16', '17-18'] as const;
