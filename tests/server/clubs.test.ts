import { beforeAll, describe, expect, it } from 'vitest';
import type { AthleteProfileSummary, MemberSummary } from '../../shared/schemas/club';
import { AthleteProfile, addMember, createClubFixture, signIn, testApp, type ClubFixture } from '../support/app';

describe('clubs: profile and overview', () => {
  let f: ClubFixture;
  beforeAll(async () => {
    f = await createClubFixture(testApp());
  });

  it('returns the club profile with metric units by default', async () => {
    const res = await f.coach.get(`/api/v1/clubs/${f.clubId}`);
    expect(res.status).toBe(200);
    expect(res.body.data).toEqual({
      id: f.clubId,
      name: 'Fixture Club',
      sportFocus: 'multi-sport',
      units: 'metric',
      timeZone: 'UTC',
      defaultConditions: null,
      subscription: { status: 'trialing', recordingAllowed: true, reason: null, trialEndsAt: expect.any(String) },
    });
  });

  it('counts members by role and athlete profiles on the Overview', async () => {
    const res = await f.admin.get(`/api/v1/clubs/${f.clubId}/overview`);
    expect(res.status).toBe(200);
    expect(res.body.data.club).toEqual({ id: f.clubId, name: 'Fixture Club', sportFocus: 'multi-sport', units: 'metric' });
    expect(res.body.data.role).toBe('admin');
    expect(res.body.data.counts).toMatchObject({ members: 3, admins: 1, coaches: 1, athletes: 1, athleteProfiles: 2 });
  });

  it('updates name, sport focus and units when an admin sends them', async () => {
    const res = await f.admin.patch(`/api/v1/clubs/${f.clubId}`, { name: '  Fixture Club Renamed ', sportFocus: 'soccer', units: 'imperial' });
    expect(res.status).toBe(200);
    expect(res.body.data).toMatchObject({ name: 'Fixture Club Renamed', sportFocus: 'soccer', units: 'imperial' });
    expect((await f.coach.get(`/api/v1/clubs/${f.clubId}`)).body.data.units).toBe('imperial');
  });

  it('refuses an empty update and an unknown sport focus with field messages', async () => {
    const empty = await f.admin.patch(`/api/v1/clubs/${f.clubId}`, {});
    expect(empty.status).toBe(400);
    expect(empty.body.error.fields._).toMatch(/at least one/);
    const bad = await f.admin.patch(`/api/v1/clubs/${f.clubId}`, { sportFocus: 'quidditch' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.sportFocus).toMatch(/Pick a sport focus/);
  });
});

describe('clubs: members and roles', () => {
  let f: ClubFixture;
  beforeAll(async () => {
    f = await createClubFixture(testApp());
  });

  it('lists members with role, e-mail and athlete profile for a coach', async () => {
    const res = await f.coach.get(`/api/v1/clubs/${f.clubId}/members`);
    expect(res.status).toBe(200);
    const members = res.body.data as MemberSummary[];
    expect(res.body.meta).toEqual({ page: 1, pageSize: 25, total: 3 });
    const athlete = members.find((m) => m.role === 'athlete');
    expect(athlete).toEqual({
      id: f.members.athlete.membershipId,
      userId: f.members.athlete.userId,
      displayName: 'Fixture Athlete',
      email: f.members.athlete.email,
      role: 'athlete',
      athleteProfileId: f.members.athlete.athleteProfileId,
    });
  });

  it('refuses with 409 CONFLICT when the last admin would be demoted', async () => {
    const res = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${f.members.admin.membershipId}`, { role: 'coach' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CONFLICT');
    expect(res.body.error.message).toMatch(/only admin/);
  });

  it('lets an admin step down once another member is admin', async () => {
    const f = await createClubFixture(testApp());
    const promoted = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${f.members.coach.membershipId}`, { role: 'admin' });
    expect(promoted.status).toBe(200);
    expect(promoted.body.data.role).toBe('admin');
    const stepDown = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${f.members.admin.membershipId}`, { role: 'coach' });
    expect(stepDown.status).toBe(200);
    // After stepping down they hold the coach role, and changing roles is for admins only.
    const denied = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${f.members.coach.membershipId}`, { role: 'coach' });
    expect(denied.status).toBe(403);
  });

  it('creates an athlete profile when a member becomes an athlete', async () => {
    const g = await createClubFixture(testApp());
    const member = await addMember(g.clubId, 'coach', 'Becoming Athlete');
    const res = await g.admin.patch(`/api/v1/clubs/${g.clubId}/members/${member.membershipId}`, { role: 'athlete' });
    expect(res.status).toBe(200);
    expect(res.body.data.athleteProfileId).toEqual(expect.any(Number));
    const profile = await AthleteProfile.findByPk(res.body.data.athleteProfileId as number);
    expect(profile?.displayName).toBe('Becoming Athlete');
    const client = await signIn(g.app, member.email);
    const mine = await client.get(`/api/v1/clubs/${g.clubId}/athletes`);
    expect(mine.body.data).toHaveLength(1);
  });

  it('refuses an unknown role with a field message', async () => {
    const res = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${f.members.athlete.membershipId}`, { role: 'owner' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.role).toBe('Pick a role: admin, coach or athlete.');
  });
});

describe('clubs: athlete profiles', () => {
  let f: ClubFixture;
  beforeAll(async () => {
    f = await createClubFixture(testApp());
  });

  it('creates a profile without sign-in when a coach sends a name and details', async () => {
    const res = await f.coach.post(`/api/v1/clubs/${f.clubId}/athletes`, {
      displayName: 'Perrin Ashgrove',
      birthYear: 2011,
      dominantSide: 'left',
      position: 'drop kicker',
    });
    expect(res.status).toBe(201);
    const created = res.body.data as AthleteProfileSummary;
    expect(created).toEqual({ id: expect.any(Number), displayName: 'Perrin Ashgrove', birthYear: 2011, dominantSide: 'left', position: 'drop kicker', releaseHeightM: null, userId: null });
    const read = await f.admin.get(`/api/v1/clubs/${f.clubId}/athletes/${created.id}`);
    expect(read.body.data).toEqual(created);
  });

  it('updates and clears fields when a coach edits a profile', async () => {
    const res = await f.coach.patch(`/api/v1/clubs/${f.clubId}/athletes/${f.otherAthleteProfileId}`, { birthYear: null, position: 'shot put' });
    expect(res.status).toBe(200);
    expect(res.body.data).toMatchObject({ birthYear: null, position: 'shot put' });
  });

  it('refuses a birth year in the future and a wrong side with field messages', async () => {
    const res = await f.coach.post(`/api/v1/clubs/${f.clubId}/athletes`, { displayName: 'Future', birthYear: 3000, dominantSide: 'up' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.birthYear).toMatch(/no later than/);
    expect(res.body.error.fields.dominantSide).toBe('Pick the dominant side: left, right or both.');
  });

  it('links a profile to a member only when the user belongs to the club', async () => {
    const outsiderMe = await f.outsider.get('/api/v1/auth/me');
    const foreign = await f.coach.post(`/api/v1/clubs/${f.clubId}/athletes`, { displayName: 'Linked', userId: outsiderMe.body.data.user.id });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.fields.userId).toMatch(/not a member/);
    const twice = await f.coach.post(`/api/v1/clubs/${f.clubId}/athletes`, { displayName: 'Linked', userId: f.members.athlete.userId });
    expect(twice.status).toBe(409);
    const coachLink = await f.coach.post(`/api/v1/clubs/${f.clubId}/athletes`, { displayName: 'Coach Too', userId: f.members.coach.userId });
    expect(coachLink.status).toBe(201);
    expect(coachLink.body.data.userId).toBe(f.members.coach.userId);
  });

  it('answers 404 when the athlete id does not exist in the club', async () => {
    const res = await f.coach.get(`/api/v1/clubs/${f.clubId}/athletes/987654321`);
    expect(res.status).toBe(404);
  });
});
