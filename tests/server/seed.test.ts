import { describe, expect, it } from 'vitest';
import { runSeeders } from '../../server/seeders';
import { bornYearsAgo, DEMO_CLUB_NAME, DEMO_PASSWORD, DEMO_PROFILES, DEMO_USERS } from '../../server/seeders/0001-demo-club';
import { AthleteProfile, Club, Membership, signIn, testApp, User } from '../support/app';

describe('demo seed', () => {
  it('creates the demo club once and keeps it unchanged when run again', async () => {
    await runSeeders();
    const count = async () => ({
      clubs: await Club.count({ where: { name: DEMO_CLUB_NAME } }),
      users: await User.count({ where: { email: ['admin@fennickvale.example', 'coach@fennickvale.example', 'athlete@fennickvale.example'] } }),
      memberships: await Membership.count(),
      profiles: await AthleteProfile.count(),
    });
    const first = await count();
    await runSeeders();
    expect(await count()).toEqual(first);
    expect(first.clubs).toBe(1);
    expect(first.users).toBe(3);
  });

  it('gives each demo sign-in its role and the athlete her profile', async () => {
    await runSeeders();
    const app = testApp();
    const expected = { admin: 'admin', coach: 'coach', athlete: 'athlete' } as const;
    for (const [who, role] of Object.entries(expected)) {
      const client = await signIn(app, `${who}@fennickvale.example`, DEMO_PASSWORD);
      const me = (await client.get('/api/v1/auth/me')).body.data;
      const membership = me.memberships.find((m: { clubName: string }) => m.clubName === DEMO_CLUB_NAME);
      expect(membership.role).toBe(role);
      if (who === 'athlete') {
        const profile = await AthleteProfile.findByPk(membership.athleteProfileId as number);
        expect(profile).toMatchObject({ displayName: 'Isla Brackwater', birthYear: bornYearsAgo(16), dominantSide: 'right', position: 'punter' });
        const overview = await client.get(`/api/v1/clubs/${membership.clubId}/overview`);
        expect(overview.body.data.counts.athleteProfiles).toBe(1);
      } else {
        const athletes = await client.get(`/api/v1/clubs/${membership.clubId}/athletes`);
        expect(athletes.body.data).toHaveLength(DEMO_PROFILES.length + 1);
      }
    }
  });

  it('keeps 8 to 10 athletes of several ages, exactly two of them under 18 this year', () => {
    const athletes = [...DEMO_USERS.flatMap((u) => (u.athlete ? [u.athlete] : [])), ...DEMO_PROFILES];
    expect(athletes.length).toBeGreaterThanOrEqual(8);
    expect(athletes.length).toBeLessThanOrEqual(10);
    const year = new Date().getUTCFullYear();
    // Born in year - 17 or later: under 18 on every day of this year.
    const youths = athletes.filter((a) => year - a.birthYear <= 17);
    expect(youths.map((a) => a.displayName).sort()).toEqual(['Isla Brackwater', 'Saskia Fenwright']);
    const ages = athletes.map((a) => year - a.birthYear);
    expect(Math.max(...ages) - Math.min(...ages)).toBeGreaterThanOrEqual(25);
    expect(bornYearsAgo(16, new Date(Date.UTC(2031, 5, 1)))).toBe(2015);
  });
});
