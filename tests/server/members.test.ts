import { describe, expect, it } from 'vitest';
import { Flight, Session } from '../../server/models';
import { AthleteProfile, addMember, createClubFixture, Membership, signIn, testApp } from '../support/app';
import { insertClip } from './clips/helpers';

/** A flight of the athlete profile, written straight to the database (the clip pipeline is not under test). */
async function flightOf(clubId: number, athleteProfileId: number): Promise<number> {
  const session = await Session.create({ clubId, date: '2026-05-09', venue: 'Fennick Vale lower pitch', notes: null, airTemperatureK: 288.15, airPressurePa: 101325, altitudeM: 0, relativeHumidityPct: null, windSpeedMps: null, windDirectionDeg: null });
  const clip = await insertClip(clubId, session.id, 'removal check');
  const flight = await Flight.create({ clubId, clipId: clip.id, athleteProfileId, action: 'punt', ballId: 'football-5', frameStart: 0, frameEnd: 47, attentionReason: null, notes: null });
  return flight.id;
}

describe('members: removal', () => {
  it('keeps the athlete’s flights and profile and only unlinks the profile when an athlete is removed', async () => {
    const f = await createClubFixture(testApp());
    const profileId = f.members.athlete.athleteProfileId as number;
    const flightId = await flightOf(f.clubId, profileId);
    const res = await f.admin.delete(`/api/v1/clubs/${f.clubId}/members/${f.members.athlete.membershipId}`);
    expect(res.status).toBe(204);
    expect(await Membership.findByPk(f.members.athlete.membershipId)).toBeNull();
    const profile = await AthleteProfile.findByPk(profileId);
    expect(profile).toMatchObject({ clubId: f.clubId, userId: null, displayName: 'Fixture Athlete' });
    expect(await Flight.findByPk(flightId)).toMatchObject({ athleteProfileId: profileId });
    const flights = await f.coach.get(`/api/v1/clubs/${f.clubId}/flights`);
    expect(flights.body.data.map((fl: { id: number }) => fl.id)).toContain(flightId);
    // The removed athlete no longer reaches the club.
    expect((await f.athlete.get(`/api/v1/clubs/${f.clubId}/overview`)).status).toBe(404);
    const members = await f.admin.get(`/api/v1/clubs/${f.clubId}/members`);
    expect(members.body.data.map((m: { id: number }) => m.id)).not.toContain(f.members.athlete.membershipId);
  });

  it('refuses to remove the club’s only admin', async () => {
    const f = await createClubFixture(testApp());
    const res = await f.admin.delete(`/api/v1/clubs/${f.clubId}/members/${f.members.admin.membershipId}`);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe('This member is the club’s only admin. Make another member admin first, then remove this one.');
    expect(await Membership.findByPk(f.members.admin.membershipId)).not.toBeNull();
  });

  it('refuses to demote the club’s only admin', async () => {
    const f = await createClubFixture(testApp());
    const res = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${f.members.admin.membershipId}`, { role: 'coach' });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe('This member is the club’s only admin. Make another member admin first, then change this role.');
  });

  it('lets an admin leave when another admin remains', async () => {
    const f = await createClubFixture(testApp());
    const second = await addMember(f.clubId, 'admin', 'Second Admin');
    const res = await f.admin.delete(`/api/v1/clubs/${f.clubId}/members/${f.members.admin.membershipId}`);
    expect(res.status).toBe(204);
    const client = await signIn(f.app, second.email);
    const members = await client.get(`/api/v1/clubs/${f.clubId}/members`);
    expect(members.body.data.filter((m: { role: string }) => m.role === 'admin')).toHaveLength(1);
  });

  it('answers 404 when an admin removes another club’s member through their own club', async () => {
    const app = testApp();
    const f = await createClubFixture(app);
    const g = await createClubFixture(app);
    const res = await f.admin.delete(`/api/v1/clubs/${f.clubId}/members/${g.members.coach.membershipId}`);
    expect(res.status).toBe(404);
    expect(await Membership.findByPk(g.members.coach.membershipId)).not.toBeNull();
  });
});

describe('members: a changed role counts on the next request', () => {
  it('lets a coach made athlete no longer write, and a coach made admin see the billing, at once', async () => {
    const f = await createClubFixture(testApp());
    const before = await f.coach.post(`/api/v1/clubs/${f.clubId}/sessions`, { date: '2026-05-09', venue: 'Fennick Vale lower pitch' });
    expect(before.status).toBe(201);
    expect((await f.coach.get(`/api/v1/clubs/${f.clubId}/billing`)).status).toBe(403);
    const promoted = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${f.members.coach.membershipId}`, { role: 'admin' });
    expect(promoted.status).toBe(200);
    expect((await f.coach.get(`/api/v1/clubs/${f.clubId}/billing`)).status).toBe(200);
    const demoted = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${f.members.coach.membershipId}`, { role: 'athlete' });
    expect(demoted.status).toBe(200);
    const after = await f.coach.post(`/api/v1/clubs/${f.clubId}/sessions`, { date: '2026-05-10', venue: 'Fennick Vale lower pitch' });
    expect(after.status).toBe(403);
    expect(after.body.error.message).toMatch(/you are an? athlete/);
  });
});
