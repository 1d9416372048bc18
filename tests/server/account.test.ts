import { beforeAll, describe, expect, it } from 'vitest';
import { createClubFixture, User, type ClubFixture } from '../support/app';

/** A member's own display units: stored on the user, shown by /auth/me, and used by the exports. */
describe('account: display units', () => {
  let f: ClubFixture;
  beforeAll(async () => {
    f = await createClubFixture();
  });

  it('follows the club by default when the user never chose', async () => {
    const me = await f.coach.get('/api/v1/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.data.user.unitsPreference).toBe('club');
  });

  it('stores imperial for this user only and answers with the signed-in user when they choose it', async () => {
    const res = await f.coach.patch('/api/v1/account', { unitsPreference: 'imperial' });
    expect(res.status).toBe(200);
    expect(res.body.data.user).toMatchObject({ email: f.members.coach.email, unitsPreference: 'imperial' });
    expect(res.body.data.memberships.map((m: { clubId: number }) => m.clubId)).toContain(f.clubId);
    expect((await f.coach.get('/api/v1/auth/me')).body.data.user.unitsPreference).toBe('imperial');
    expect((await f.athlete.get('/api/v1/auth/me')).body.data.user.unitsPreference).toBe('club');
    expect((await User.findByPk(f.members.coach.userId))!.unitsPreference).toBe('imperial');
    // The club's own setting is untouched.
    expect((await f.coach.get(`/api/v1/clubs/${f.clubId}`)).body.data.units).toBe('metric');
  });

  it('goes back to following the club when the user picks club', async () => {
    await f.athlete.patch('/api/v1/account', { unitsPreference: 'metric' });
    const res = await f.athlete.patch('/api/v1/account', { unitsPreference: 'club' });
    expect(res.status).toBe(200);
    expect(res.body.data.user.unitsPreference).toBe('club');
  });

  it('refuses an unknown choice with a message that lists the choices', async () => {
    const res = await f.coach.patch('/api/v1/account', { unitsPreference: 'furlongs' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields.unitsPreference).toBe('Pick the units you want to see: club (follow the club), metric or imperial.');
  });

  it('refuses a missing choice and fields this endpoint does not change', async () => {
    const empty = await f.coach.patch('/api/v1/account', {});
    expect(empty.status).toBe(400);
    expect(empty.body.error.fields.unitsPreference).toMatch(/Pick the units you want to see/);
    const extra = await f.coach.patch('/api/v1/account', { unitsPreference: 'metric', email: 'x@example.com' });
    expect(extra.status).toBe(400);
    expect(extra.body.error.fields._).toBe('Remove the unknown field(s): email.');
  });

  it('answers 401 to someone not signed in and changes nothing', async () => {
    const res = await f.anonymous.patch('/api/v1/account', { unitsPreference: 'imperial' });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('UNAUTHENTICATED');
  });

  it('refuses the change without the CSRF token', async () => {
    const res = await f.admin.agent.patch('/api/v1/account').send({ unitsPreference: 'imperial' });
    expect(res.status).toBe(403);
    expect((await User.findByPk(f.members.admin.userId))!.unitsPreference).toBe('club');
  });
});
