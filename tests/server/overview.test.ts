import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import type { MyFlights } from '../../shared/schemas/my-flights';
import type { StaffOverview } from '../../shared/schemas/overview';
import { Job } from '../../server/models';
import { AthleteProfile, createClubFixture, testApp, type ClubFixture } from '../support/app';
import { recordFlights, recordSession, times } from '../support/records';
import { insertClip } from './clips/helpers';

afterEach(() => {
  vi.useRealTimers();
});

function at(iso: string): void {
  vi.useFakeTimers({ toFake: ['Date'] });
  vi.setSystemTime(new Date(iso));
}

describe('overview: the staff’s start of the day', () => {
  let f: ClubFixture;
  let athleteId: number;
  let otherId: number;
  const ids = { attention: 0, best: 0, sessionBest: 0, oldBest: 0, processingClip: 0, latestSession: 0 };

  beforeAll(async () => {
    f = await createClubFixture(testApp());
    athleteId = f.members.athlete.athleteProfileId!;
    otherId = f.otherAthleteProfileId;
    const early = await recordSession(f.clubId, '2026-05-01', 'Cliff field');
    [ids.oldBest] = await recordFlights(f.clubId, early.clipId, [{ athleteId: otherId, fit: { launchSpeedMps: 25, launchAngleDeg: 40, standardCarryM: 52 } }]);
    const late = await recordSession(f.clubId, '2026-05-08', 'Harbour pitch');
    ids.latestSession = late.sessionId;
    const flights = await recordFlights(f.clubId, late.clipId, [
      // Steady: 24.0, 24.2, 23.8 m/s. Spread: 20, 26, 23 m/s.
      { athleteId, fit: { launchSpeedMps: 24.0, launchAngleDeg: 42, standardCarryM: 48 } },
      { athleteId, fit: { launchSpeedMps: 24.2, launchAngleDeg: 43, standardCarryM: 49 } },
      { athleteId, fit: { launchSpeedMps: 23.8, launchAngleDeg: 41, standardCarryM: 47 } },
      { athleteId: otherId, fit: { launchSpeedMps: 20, launchAngleDeg: 35, standardCarryM: 40 } },
      { athleteId: otherId, fit: { launchSpeedMps: 26, launchAngleDeg: 38, standardCarryM: 51 } },
      { athleteId: otherId, fit: { launchSpeedMps: 23, launchAngleDeg: 36, standardCarryM: 45 } },
      { athleteId, status: 'needs_attention', attentionReason: 'The scale disagrees with the fitted gravity by 9 %.' },
    ]);
    ids.best = flights[1]!;
    ids.sessionBest = flights[4]!;
    ids.attention = flights[6]!;
    const clip = await insertClip(f.clubId, late.sessionId, 'Still cutting');
    await clip.update({ status: 'processing' });
    ids.processingClip = clip.id;
    await Job.create({ clubId: f.clubId, type: 'clip.process', payload: { clipId: clip.id }, status: 'running', progress: 40, clipId: clip.id, flightId: null, leaseUntil: null, workerId: null, error: null, result: null, startedAt: new Date(), finishedAt: null });
  });

  async function staffOverview(client = f.coach): Promise<StaffOverview> {
    const res = await client.get(`/api/v1/clubs/${f.clubId}/overview`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    return res.body.data.staff as StaffOverview;
  }

  it('lists the flights needing attention with their reason and the clip to fix them in', async () => {
    at('2026-05-09T09:00:00Z');
    const o = await staffOverview();
    expect(o.attention.total).toBe(1);
    expect(o.attention.items).toEqual([
      expect.objectContaining({ flightId: ids.attention, athleteName: 'Fixture Athlete', reason: 'The scale disagrees with the fitted gravity by 9 %.', sessionId: ids.latestSession }),
    ]);
    expect(o.attention.items[0]!.clipId).toBeGreaterThan(0);
  });

  it('shows clips still processing with the progress of their job', async () => {
    at('2026-05-09T09:00:00Z');
    expect((await staffOverview()).processing).toEqual([{ clipId: ids.processingClip, sessionId: ids.latestSession, label: 'Still cutting', progress: 40 }]);
  });

  it('gives the latest session’s best rep by standard-conditions carry and its most consistent athlete and action', async () => {
    at('2026-05-09T09:00:00Z');
    const s = (await staffOverview()).latestSession!;
    expect(s).toMatchObject({ id: ids.latestSession, date: '2026-05-08', venue: 'Harbour pitch', flightCount: 7, fittedCount: 6 });
    expect(s.best).toMatchObject({ flightId: ids.sessionBest, athleteName: 'Unlinked Athlete', standardCarryM: 51 });
    expect(s.mostConsistent).toMatchObject({ athleteName: 'Fixture Athlete', action: 'punt', reps: 3 });
    // Sample SD of 24.0, 24.2, 23.8 is 0.2 m/s exactly (closed form).
    expect(s.mostConsistent!.launchSpeedSdMps).toBeCloseTo(0.2, 9);
    expect(s.mostConsistent!.launchSpeedMeanMps).toBeCloseTo(24, 9);
  });

  it('lists each athlete’s personal best per action, newest first, and keeps an older best that was not beaten', async () => {
    at('2026-05-09T09:00:00Z');
    const bests = (await staffOverview()).personalBests;
    expect(bests.map((b) => [b.athleteId, b.action, b.standardCarryM, b.day])).toEqual([
      [athleteId, 'punt', 49, '2026-05-08'],
      [otherId, 'punt', 52, '2026-05-01'],
    ]);
    expect(bests[0]!.flightId).toBe(ids.best);
  });

  it('offers a new session when none is today, and an upload into today’s session when there is one', async () => {
    at('2026-05-09T09:00:00Z');
    expect((await staffOverview()).primaryAction).toEqual({ kind: 'new-session' });
    at('2026-05-08T18:00:00Z');
    expect((await staffOverview()).primaryAction).toEqual({ kind: 'upload', sessionId: ids.latestSession, venue: 'Harbour pitch' });
  });

  it('gives an athlete the counts only, and another club’s admin a 404', async () => {
    const res = await f.athlete.get(`/api/v1/clubs/${f.clubId}/overview`);
    expect(res.status).toBe(200);
    expect(res.body.data.staff).toBeNull();
    expect(JSON.stringify(res.body)).not.toContain('Unlinked Athlete');
    const outsider = await f.outsider.get(`/api/v1/clubs/${f.clubId}/overview`);
    expect(outsider.status).toBe(404);
  });

  it('gives an athlete My flights with only their own flights, bests and progress, and never a teammate’s name', async () => {
    at('2026-05-09T09:00:00Z');
    await AthleteProfile.update({ birthYear: 2013 }, { where: { id: athleteId } });
    const res = await f.athlete.get(`/api/v1/clubs/${f.clubId}/my-flights`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const data = res.body.data as MyFlights;
    expect(data.athlete).toEqual({ id: athleteId, displayName: 'Fixture Athlete' });
    expect(data.recentFlights).toHaveLength(4);
    expect(data.recentFlights.every((fl) => fl.athleteId === athleteId)).toBe(true);
    expect(data.recentFlights.map((fl) => fl.day)).toEqual(['2026-05-08', '2026-05-08', '2026-05-08', '2026-05-08']);
    expect(data.personalBests.map((b) => b.standardCarryM)).toEqual([49]);
    expect(data.progress.punt!.map((p) => p.standardCarryM)).toEqual([48, 49, 47]);
    expect(data.workload.athleteId).toBe(athleteId);
    expect(data.workload.ageBand).toBe('13-14');
    const text = JSON.stringify(res.body);
    expect(text).not.toContain('Unlinked Athlete');
  });

  it('shows a new personal best at once when a later fit beats the old one', async () => {
    at('2026-05-09T09:00:00Z');
    expect((await staffOverview()).personalBests.find((b) => b.athleteId === otherId)?.standardCarryM).toBe(52);
    const s = await recordSession(f.clubId, '2026-05-09', 'Harbour pitch');
    const [beaten] = await recordFlights(f.clubId, s.clipId, [{ athleteId: otherId, fit: { launchSpeedMps: 27, launchAngleDeg: 40, standardCarryM: 55 } }]);
    const bests = (await staffOverview()).personalBests;
    expect(bests[0]).toMatchObject({ athleteId: otherId, flightId: beaten, standardCarryM: 55, day: '2026-05-09' });
    expect(bests).toHaveLength(2);
    // The flight holding the best is deleted: the older best is back at once (the cached bests are not kept).
    // On the real clock: a request under the test's clock would move the session's expiry into that past.
    vi.useRealTimers();
    expect((await f.coach.delete(`/api/v1/clubs/${f.clubId}/flights/${beaten}`)).status).toBe(204);
    const after = (await staffOverview()).personalBests;
    expect(after.find((b) => b.athleteId === otherId)).toMatchObject({ flightId: ids.oldBest, standardCarryM: 52 });
    expect(after.some((b) => b.flightId === beaten)).toBe(false);
  });

  it('answers 403 to staff asking for My flights (their start is the Overview)', async () => {
    const res = await f.coach.get(`/api/v1/clubs/${f.clubId}/my-flights`);
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('FORBIDDEN');
  });
});

describe('overview: every youth over a caution in a club with several', () => {
  it('names every youth over a threshold and no adult', async () => {
    const f = await createClubFixture(testApp());
    at('2026-06-03T12:00:00Z');
    const youth = f.members.athlete.athleteProfileId!;
    await AthleteProfile.update({ birthYear: 2011 }, { where: { id: youth } }); // 15: band 15–16
    await AthleteProfile.update({ birthYear: 1990 }, { where: { id: f.otherAthleteProfileId } });
    await f.admin.put(`/api/v1/clubs/${f.clubId}/workload-thresholds`, {
      thresholds: [
        { action: 'punt', ageBand: '15-16', dailyMax: null, weeklyMax: 3 },
        { action: 'punt', ageBand: '17-18', dailyMax: null, weeklyMax: 3 },
      ],
    });
    const s = await recordSession(f.clubId, '2026-06-01');
    await recordFlights(f.clubId, s.clipId, [...times(4, { athleteId: youth }), ...times(9, { athleteId: f.otherAthleteProfileId })]);
    const res = await f.coach.get(`/api/v1/clubs/${f.clubId}/overview`);
    expect((res.body.data.staff as StaffOverview).cautions).toEqual([
      { athleteId: youth, athleteName: 'Fixture Athlete', cautions: [{ athleteId: youth, action: 'punt', period: 'week', when: '2026-W23', count: 4, limit: 3 }] },
    ]);
  });
});
