import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { createOAuthFake, fakeSubject } from '../../server/fakes/oauth';

const options = { clientId: 'client-a', clientSecret: 'secret-a', defaultEmail: 'wren@fake.example', defaultName: 'Wren Ashdown' };
const authorize = '/authorize?response_type=code&client_id=client-a&redirect_uri=http%3A%2F%2F127.0.0.1%3A1%2Fcb&state=s1';

async function codeFor(app: ReturnType<typeof createOAuthFake>, hint = 'pat@fake.example'): Promise<string> {
  const res = await request(app).get(`${authorize}&login_hint=${encodeURIComponent(hint)}&name=Pat%20Quarry`);
  expect(res.status).toBe(302);
  const location = new URL(res.headers.location as string);
  expect(location.origin + location.pathname).toBe('http://127.0.0.1:1/cb');
  expect(location.searchParams.get('state')).toBe('s1');
  return location.searchParams.get('code') as string;
}

function exchange(app: ReturnType<typeof createOAuthFake>, code: string, secret = 'secret-a') {
  return request(app)
    .post('/token')
    .type('form')
    .send({ grant_type: 'authorization_code', code, client_id: 'client-a', client_secret: secret, redirect_uri: 'http://127.0.0.1:1/cb' });
}

describe('OAuth fake', () => {
  it('shows a page with the pre-filled invented user when no login hint is given', async () => {
    const res = await request(createOAuthFake(options)).get(authorize);
    expect(res.status).toBe(200);
    expect(res.text).toContain('value="wren@fake.example"');
    expect(res.text).toContain('action="/authorize/approve"');
    expect(res.text).toContain('name="state" value="s1"');
  });

  it('issues a code, a token and the user info when the flow is followed', async () => {
    const app = createOAuthFake(options);
    const code = await codeFor(app);
    const token = await exchange(app, code);
    expect(token.status).toBe(200);
    expect(token.body.token_type).toBe('Bearer');
    const info = await request(app).get(`/userinfo?access_token=${token.body.access_token as string}`);
    expect(info.status).toBe(200);
    expect(info.body).toEqual({
      sub: fakeSubject('pat@fake.example'),
      email: 'pat@fake.example',
      email_verified: true,
      name: 'Pat Quarry',
      given_name: 'Pat',
      family_name: 'Quarry',
    });
    const bearer = await request(app).get('/userinfo').set('Authorization', `Bearer ${token.body.access_token as string}`);
    expect(bearer.body.email).toBe('pat@fake.example');
  });

  it('refuses a code used twice and a wrong client secret', async () => {
    const app = createOAuthFake(options);
    const code = await codeFor(app);
    expect((await exchange(app, code, 'wrong')).status).toBe(401);
    const again = await codeFor(app);
    expect((await exchange(app, again)).status).toBe(200);
    const reused = await exchange(app, again);
    expect(reused.status).toBe(400);
    expect(reused.body.error).toBe('invalid_grant');
  });

  it('refuses an unknown client id and an unknown access token', async () => {
    const app = createOAuthFake(options);
    const res = await request(app).get(authorize.replace('client-a', 'client-b'));
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/GOOGLE_CLIENT_ID/);
    expect((await request(app).get('/userinfo?access_token=nope')).status).toBe(401);
  });

  it('gives the same subject to the same e-mail whatever its case', () => {
    expect(fakeSubject('A@B.example')).toBe(fakeSubject('a@b.example'));
    expect(fakeSubject('a@b.example')).not.toBe(fakeSubject('c@b.example'));
    expect(fakeSubject('a@b.example')).toMatch(/^\d{21}$/);
  });
});
