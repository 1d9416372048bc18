import request from 'supertest';
import { describe, expect, it } from 'vitest';
import type { Me } from '../../shared/types/api';
import { ApiClient, TEST_PASSWORD, signIn, signUp, testApp, uniqueEmail, Membership, Club } from '../support/app';

const app = testApp();

function sessionCookie(res: request.Response): string | undefined {
  const cookies = res.headers['set-cookie'] as unknown as string[] | undefined;
  return cookies?.find((c) => c.startsWith('arcwright.sid='))?.split(';')[0];
}

describe('auth: sign-up', () => {
  it('creates the user, their club and an admin membership and signs them in when the body is valid', async () => {
    const email = uniqueEmail('signup');
    const client = new ApiClient(app);
    const res = await client.post('/api/v1/auth/signup', {
      email: `  ${email.toUpperCase()} `,
      password: TEST_PASSWORD,
      displayName: 'Hester Vane',
      clubName: 'Lowmarsh Rovers',
      sportFocus: 'rugby',
    });
    expect(res.status).toBe(201);
    const me = (res.body as { data: Me }).data;
    expect(me.user.email).toBe(email);
    expect(me.user.displayName).toBe('Hester Vane');
    expect(me.memberships).toHaveLength(1);
    expect(me.memberships[0]).toMatchObject({ clubName: 'Lowmarsh Rovers', role: 'admin', athleteProfileId: null });
    const club = await Club.findByPk(me.memberships[0].clubId);
    expect(club?.sportFocus).toBe('rugby');
    expect(club?.units).toBe('metric');
    const who = await client.get('/api/v1/auth/me');
    expect(who.status).toBe(200);
    expect((who.body as { data: Me }).data.user.id).toBe(me.user.id);
  });

  it('refuses with EMAIL_TAKEN when the e-mail already has an account', async () => {
    const first = await signUp(app);
    const res = await new ApiClient(app).post('/api/v1/auth/signup', {
      email: first.email,
      password: TEST_PASSWORD,
      displayName: 'Someone Else',
      clubName: 'Another Club',
    });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('EMAIL_TAKEN');
    expect(res.body.error.fields.email).toMatch(/already exists/);
    expect(res.body.error.message).toMatch(/Sign in instead/);
  });

  it.each([
    ['shorter than 10 characters', 'Ab1-short', /at least 10 characters/],
    ['all one kind of character', 'onlylowercaseletters', /two kinds of character/],
    ['the e-mail address itself', null, /e-mail address as the password/],
  ])('refuses a weak password when it is %s', async (_what, password, message) => {
    const email = uniqueEmail('weak');
    const res = await new ApiClient(app).post('/api/v1/auth/signup', {
      email,
      password: password ?? email,
      displayName: 'Weak Password',
      clubName: 'Weak Club',
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields.password).toMatch(message);
  });

  it('lists every invalid field when several are wrong', async () => {
    const res = await new ApiClient(app).post('/api/v1/auth/signup', { email: 'not-an-email', password: TEST_PASSWORD, displayName: '', clubName: 'x' });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['clubName', 'displayName', 'email']);
    expect(res.body.error.fields.email).toMatch(/name@club\.example/);
  });
});

describe('auth: sign-in and sign-out', () => {
  it('signs in and returns the memberships when e-mail and password match', async () => {
    const user = await signUp(app);
    const client = new ApiClient(app);
    const res = await client.post('/api/v1/auth/signin', { email: user.email.toUpperCase(), password: TEST_PASSWORD });
    expect(res.status).toBe(200);
    expect((res.body as { data: Me }).data.memberships[0].clubId).toBe(user.clubId);
    expect((await client.get('/api/v1/auth/me')).status).toBe(200);
  });

  it('answers 401 INVALID_CREDENTIALS when the password is wrong', async () => {
    const user = await signUp(app);
    const res = await new ApiClient(app).post('/api/v1/auth/signin', { email: user.email, password: 'Wrong-password-1' });
    expect(res.status).toBe(401);
    expect(res.body.error).toEqual({
      code: 'INVALID_CREDENTIALS',
      message: 'That e-mail and password do not match an account. Check both and try again.',
    });
  });

  it('answers the same 401 when the e-mail has no account', async () => {
    const res = await new ApiClient(app).post('/api/v1/auth/signin', { email: uniqueEmail('nobody'), password: TEST_PASSWORD });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('INVALID_CREDENTIALS');
  });

  it('asks for the missing fields when the sign-in body is empty', async () => {
    const res = await new ApiClient(app).post('/api/v1/auth/signin', {});
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ email: 'Enter your e-mail address.', password: 'Enter your password.' });
  });

  it('answers 401 UNAUTHENTICATED on /me when nobody is signed in', async () => {
    const res = await request(app).get('/api/v1/auth/me');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('UNAUTHENTICATED');
  });

  it('ends the session when the user signs out', async () => {
    const user = await signUp(app);
    expect((await user.client.get('/api/v1/auth/me')).status).toBe(200);
    const out = await user.client.post('/api/v1/auth/signout');
    expect(out.status).toBe(204);
    expect((await user.client.get('/api/v1/auth/me')).status).toBe(401);
  });

  it('regenerates the session id and the CSRF token when the user signs in', async () => {
    const user = await signUp(app);
    const agent = request.agent(app);
    const csrf = await agent.get('/api/v1/auth/csrf');
    const before = sessionCookie(csrf);
    const oldToken = csrf.body.data.csrfToken as string;
    expect(before).toBeDefined();
    const signin = await agent.post('/api/v1/auth/signin').set('X-CSRF-Token', oldToken).send({ email: user.email, password: TEST_PASSWORD });
    expect(signin.status).toBe(200);
    const after = sessionCookie(signin);
    expect(after).toBeDefined();
    expect(after).not.toBe(before);
    // The token belonged to the old session: the client must fetch a new one.
    const stale = await agent.post('/api/v1/auth/signout').set('X-CSRF-Token', oldToken);
    expect(stale.status).toBe(403);
    const fresh = (await agent.get('/api/v1/auth/csrf')).body.data.csrfToken as string;
    expect(fresh).not.toBe(oldToken);
    expect((await agent.post('/api/v1/auth/signout').set('X-CSRF-Token', fresh)).status).toBe(204);
  });

  it('sets an httpOnly SameSite=Lax session cookie without Secure when COOKIE_SECURE is off', async () => {
    const res = await request(app).get('/api/v1/auth/csrf');
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('arcwright.sid='));
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i);
  });

  it('stores the session in the auth_sessions table when a user signs in', async () => {
    const user = await signUp(app);
    const [rows] = await Membership.sequelize!.query('SELECT data FROM auth_sessions WHERE data LIKE ?', {
      replacements: [`%"user":${user.userId}}%`],
    });
    expect((rows as unknown[]).length).toBeGreaterThan(0);
  });
});

describe('auth: CSRF', () => {
  it('refuses a state-changing request without the X-CSRF-Token header', async () => {
    const agent = request.agent(app);
    await agent.get('/api/v1/auth/csrf');
    const res = await agent.post('/api/v1/auth/signin').send({ email: uniqueEmail(), password: TEST_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('CSRF_INVALID');
    expect(res.body.error.message).toMatch(/Reload the page/);
  });

  it('refuses a request whose token does not belong to the session', async () => {
    const other = (await request(app).get('/api/v1/auth/csrf')).body.data.csrfToken as string;
    const agent = request.agent(app);
    await agent.get('/api/v1/auth/csrf');
    const res = await agent.post('/api/v1/auth/signup').set('X-CSRF-Token', other).send({});
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('CSRF_INVALID');
  });

  it('refuses PATCH on a club route when the token is missing, even for a signed-in admin', async () => {
    const user = await signUp(app);
    const res = await user.client.agent.patch(`/api/v1/clubs/${user.clubId}`).send({ name: 'Renamed' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('CSRF_INVALID');
  });

  it('returns the same token while the session lasts', async () => {
    const agent = request.agent(app);
    const a = (await agent.get('/api/v1/auth/csrf')).body.data.csrfToken as string;
    const b = (await agent.get('/api/v1/auth/csrf')).body.data.csrfToken as string;
    expect(a).toBe(b);
    expect(a.length).toBeGreaterThanOrEqual(32);
  });
});

describe('auth: rate limit', () => {
  it('answers 429 RATE_LIMITED after too many failed sign-ins for one e-mail, even with the right password', async () => {
    const limited = testApp({ signinLimit: { max: 3, windowMs: 60_000 } });
    const user = await signUp(limited);
    const client = new ApiClient(limited);
    for (let i = 0; i < 3; i += 1) {
      expect((await client.post('/api/v1/auth/signin', { email: user.email, password: 'Wrong-password-1' })).status).toBe(401);
    }
    const blocked = await client.post('/api/v1/auth/signin', { email: user.email, password: TEST_PASSWORD });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('RATE_LIMITED');
    expect(blocked.body.error.message).toMatch(/Wait 1 minute/);
    // Another e-mail from the same address is not affected.
    const other = await signUp(limited);
    expect((await signIn(limited, other.email)).csrfToken).toBeNull();
  });

  it('does not count successful sign-ins toward the limit', async () => {
    const limited = testApp({ signinLimit: { max: 2, windowMs: 60_000 } });
    const user = await signUp(limited);
    for (let i = 0; i < 4; i += 1) await signIn(limited, user.email);
  });

  it('limits sign-ups per address when the sign-up limit is reached', async () => {
    const limited = testApp({ signupLimit: { max: 1, windowMs: 60_000 } });
    await signUp(limited);
    const res = await new ApiClient(limited).post('/api/v1/auth/signup', {
      email: uniqueEmail(),
      password: TEST_PASSWORD,
      displayName: 'Second',
      clubName: 'Second Club',
    });
    expect(res.status).toBe(429);
    expect(res.body.error.code).toBe('RATE_LIMITED');
  });
});
