/**
 * Google sign-in through passport-google-oauth20 against the local OAuth fake, redirects driven by hand:
 * app → fake /authorize → app callback → signed in.
 */
import type { Server } from 'node:http';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

// The strategy reads its URLs from the configuration at start-up: point them at a fake on a port of our own.
const fakePort = vi.hoisted(() => {
  const port = 20000 + Math.floor(Math.random() * 30000);
  const base = `http://127.0.0.1:${port}`;
  Object.assign(process.env, {
    GOOGLE_SIGNIN: '1',
    GOOGLE_CLIENT_ID: 'test-client',
    GOOGLE_CLIENT_SECRET: 'test-secret',
    GOOGLE_AUTH_URL: `${base}/authorize`,
    GOOGLE_TOKEN_URL: `${base}/token`,
    GOOGLE_USERINFO_URL: `${base}/userinfo`,
    GOOGLE_CALLBACK_URL: 'http://127.0.0.1:4780/api/v1/auth/google/callback',
  });
  return port;
});

import { startOAuthFake } from '../../server/fakes/oauth';
import { ClubSubscription } from '../../server/models';
import { ApiClient, Membership, TEST_PASSWORD, signUp, testApp, uniqueEmail } from '../support/app';

const app = testApp();
let fake: Server;

beforeAll(async () => {
  fake = await startOAuthFake({ clientId: 'test-client', clientSecret: 'test-secret', defaultEmail: 'x@fake.example', defaultName: 'X' }, fakePort);
});

afterAll(async () => {
  fake.closeAllConnections();
  await new Promise((resolve) => fake.close(resolve));
});

/** Follows the whole flow for `email`; returns the client and the app's final redirect. */
async function googleSignIn(email: string, name = 'Rook Ellery'): Promise<{ client: ApiClient; finalLocation: string }> {
  const client = new ApiClient(app);
  const start = await client.agent.get('/api/v1/auth/google');
  expect(start.status).toBe(302);
  const authorizeUrl = new URL(start.headers.location as string);
  expect(authorizeUrl.origin).toBe(`http://127.0.0.1:${fakePort}`);
  expect(authorizeUrl.searchParams.get('state')).toBeTruthy();
  authorizeUrl.searchParams.set('login_hint', email);
  authorizeUrl.searchParams.set('name', name);
  const approved = await fetch(authorizeUrl, { redirect: 'manual' });
  expect(approved.status).toBe(302);
  const callback = new URL(approved.headers.get('location') as string);
  expect(callback.pathname).toBe('/api/v1/auth/google/callback');
  const done = await client.agent.get(callback.pathname + callback.search);
  expect(done.status).toBe(302);
  return { client, finalLocation: done.headers.location as string };
}

describe('Google sign-in through the OAuth fake', () => {
  it('creates a user with a personal club and signs them in when the Google account is new', async () => {
    const email = uniqueEmail('google');
    const { client, finalLocation } = await googleSignIn(email, 'Rook Ellery');
    expect(finalLocation).toBe('/');
    const me = await client.get('/api/v1/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.data.user).toMatchObject({ email, displayName: 'Rook Ellery' });
    expect(me.body.data.memberships).toEqual([
      { clubId: expect.any(Number), clubName: "Rook Ellery's club", role: 'admin', athleteProfileId: null },
    ]);
  });

  it('starts the personal club of a new Google account on its free trial', async () => {
    const { client } = await googleSignIn(uniqueEmail('google'), 'Wynn Tarrow');
    const me = await client.get('/api/v1/auth/me');
    const clubId = me.body.data.memberships[0].clubId as number;
    // Created with the club, not on the first look at it.
    expect(await ClubSubscription.findOne({ where: { clubId } })).toMatchObject({ status: 'trialing', providerSubscriptionId: null });
    const club = await client.get(`/api/v1/clubs/${clubId}`);
    expect(club.body.data.subscription).toEqual({ status: 'trialing', recordingAllowed: true, reason: null, trialEndsAt: expect.any(String) });
  });

  it('finds the same user and creates no second club when they sign in with Google again', async () => {
    const email = uniqueEmail('google');
    const first = await googleSignIn(email);
    const second = await googleSignIn(email);
    const a = (await first.client.get('/api/v1/auth/me')).body.data;
    const b = (await second.client.get('/api/v1/auth/me')).body.data;
    expect(b.user.id).toBe(a.user.id);
    expect(await Membership.count({ where: { userId: a.user.id } })).toBe(1);
  });

  it('links Google to an existing password account when the e-mail matches', async () => {
    const user = await signUp(app);
    const { client } = await googleSignIn(user.email);
    const me = (await client.get('/api/v1/auth/me')).body.data;
    expect(me.user.id).toBe(user.userId);
    expect(me.memberships.map((m: { clubId: number }) => m.clubId)).toEqual([user.clubId]);
    // The password still works.
    const again = new ApiClient(app);
    expect((await again.post('/api/v1/auth/signin', { email: user.email, password: TEST_PASSWORD })).status).toBe(200);
  });

  it('refuses a password sign-in for a Google-only account', async () => {
    const email = uniqueEmail('google');
    await googleSignIn(email);
    const res = await new ApiClient(app).post('/api/v1/auth/signin', { email, password: TEST_PASSWORD });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('INVALID_CREDENTIALS');
  });

  it('sends the browser to /signin?error=google when the callback carries a bad code', async () => {
    const client = new ApiClient(app);
    const start = await client.agent.get('/api/v1/auth/google');
    const state = new URL(start.headers.location as string).searchParams.get('state') as string;
    const res = await client.agent.get(`/api/v1/auth/google/callback?code=forged&state=${encodeURIComponent(state)}`);
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe('/signin?error=google');
    expect((await client.get('/api/v1/auth/me')).status).toBe(401);
  });

  it('refuses a callback whose state does not match the session', async () => {
    const email = uniqueEmail('google');
    const victim = new ApiClient(app);
    const attacker = new ApiClient(app);
    const start = await attacker.agent.get('/api/v1/auth/google');
    const authorizeUrl = new URL(start.headers.location as string);
    authorizeUrl.searchParams.set('login_hint', email);
    const approved = await fetch(authorizeUrl, { redirect: 'manual' });
    const callback = new URL(approved.headers.get('location') as string);
    await victim.agent.get('/api/v1/auth/google');
    const res = await victim.agent.get(callback.pathname + callback.search);
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe('/signin?error=google');
    expect((await victim.get('/api/v1/auth/me')).status).toBe(401);
  });
});
