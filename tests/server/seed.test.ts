import { describe, expect, it } from 'vitest';
import { runSeeders } from '../../server/seeders';
import { DEMO_CLUB_NAME, DEMO_PASSWORD, DEMO_PROFILES } from '../../server/seeders/0001-demo-club';
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
        expect(profile).toMatchObject({ displayName: 'Isla Brackwater', birthYear: 2009, dominantSide: 'right', position: 'punter' });
        const overview = await client.get(`/api/v1/clubs/${membership.clubId}/overview`);
        expect(overview.body.data.counts.athleteProfiles).toBe(1);
      } else {
        const athletes = await client.get(`/api/v1/clubs/${membership.clubId}/athletes`);
        expect(athletes.body.data).toHaveLength(DEMO_PROFILES.length + 1);
      }
    }
  });
});
