import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PasswordReset } from '../../server/models';
import { PASSWORD_RESET_REQUESTED } from '../../shared/schemas/password-reset';
import { ApiClient, signIn, signUp, testApp, uniqueEmail, User } from '../support/app';
import { linkToken, useTestMailbox, type TestMailbox } from '../support/mail';

const NEW_PASSWORD = 'Tolliver-shot 1600';

let mail: TestMailbox;
const app = testApp();

beforeAll(async () => {
  mail = await useTestMailbox();
});

afterAll(async () => {
  await mail.close();
});

async function requestLink(email: string): Promise<string> {
  const since = mail.lastId();
  const res = await new ApiClient(app).post('/api/v1/auth/password-reset', { email });
  expect(res.status).toBe(202);
  return linkToken(await mail.waitFor(email, since), '/reset-password/');
}

describe('password reset', () => {
  it('answers the same for an unknown address as for a known one, and mails only the known one', async () => {
    const known = await signUp(app);
    const unknown = uniqueEmail('nobody');
    const since = mail.lastId();
    const a = await new ApiClient(app).post('/api/v1/auth/password-reset', { email: known.email });
    const b = await new ApiClient(app).post('/api/v1/auth/password-reset', { email: unknown });
    expect(a.status).toBe(202);
    expect(b.status).toBe(a.status);
    expect(b.body).toEqual(a.body);
    expect(a.body.data.message).toBe(PASSWORD_RESET_REQUESTED);
    const message = await mail.waitFor(known.email, since);
    expect(message.subject).toBe('Choose a new Arcwright password');
    expect(message.html).not.toMatch(/<img|<script|<link|url\(/i);
    // Give a mail to the unknown address every chance to arrive: none may.
    await new Promise((r) => setTimeout(r, 300));
    expect(mail.to(unknown)).toHaveLength(0);
  });

  it('refuses a malformed address in the request with the sign-in form’s words', async () => {
    const res = await new ApiClient(app).post('/api/v1/auth/password-reset', { email: 'not-an-address' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.email).toBe('Enter an e-mail address such as name@club.example.');
  });

  it('sets the new password and ends every other session of the user when the link is used', async () => {
    const account = await signUp(app);
    const otherBrowser = await signIn(app, account.email);
    expect((await otherBrowser.get('/api/v1/auth/me')).status).toBe(200);
    const token = await requestLink(account.email);
    const check = await new ApiClient(app).get(`/api/v1/auth/password-reset/${token}`);
    expect(check.status).toBe(200);
    expect(check.body.data.email).toBe(account.email);

    const res = await new ApiClient(app).post(`/api/v1/auth/password-reset/${token}`, { password: NEW_PASSWORD });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect((await account.client.get('/api/v1/auth/me')).status).toBe(401);
    expect((await otherBrowser.get('/api/v1/auth/me')).status).toBe(401);
    await signIn(app, account.email, NEW_PASSWORD);
    const old = await new ApiClient(app).post('/api/v1/auth/signin', { email: account.email, password: account.password });
    expect(old.status).toBe(401);
  });

  it('keeps the session of the browser that resets while signed in', async () => {
    const account = await signUp(app);
    const token = await requestLink(account.email);
    const res = await account.client.post(`/api/v1/auth/password-reset/${token}`, { password: NEW_PASSWORD });
    expect(res.status).toBe(200);
    expect((await account.client.get('/api/v1/auth/me')).status).toBe(200);
  });

  it('refuses a link that was already used', async () => {
    const account = await signUp(app);
    const token = await requestLink(account.email);
    expect((await new ApiClient(app).post(`/api/v1/auth/password-reset/${token}`, { password: NEW_PASSWORD })).status).toBe(200);
    const again = await new ApiClient(app).post(`/api/v1/auth/password-reset/${token}`, { password: 'Another-pass 99' });
    expect(again.status).toBe(410);
    expect(again.body.error).toMatchObject({
      code: 'RESET_LINK_USED',
      message: 'This password-reset link has already been used. Sign in with the new password, or ask for a new link on the sign-in page.',
    });
    await signIn(app, account.email, NEW_PASSWORD);
  });

  it('refuses an expired link and leaves the password as it was', async () => {
    const account = await signUp(app);
    const token = await requestLink(account.email);
    await PasswordReset.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: account.userId } });
    const res = await new ApiClient(app).post(`/api/v1/auth/password-reset/${token}`, { password: NEW_PASSWORD });
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe('RESET_LINK_EXPIRED');
    expect(res.body.error.message).toMatch(/^This password-reset link expired on .+\. Ask for a new link on the sign-in page\.$/);
    await signIn(app, account.email, account.password);
  });

  it('refuses an earlier link once a newer one was asked for', async () => {
    const account = await signUp(app);
    const first = await requestLink(account.email);
    const second = await requestLink(account.email);
    const res = await new ApiClient(app).post(`/api/v1/auth/password-reset/${first}`, { password: NEW_PASSWORD });
    expect(res.status).toBe(404);
    expect(res.body.error).toMatchObject({
      code: 'RESET_LINK_INVALID',
      message: 'This password-reset link is not valid: it may have been cut short when it was copied, or replaced by a newer request. Ask for a new link on the sign-in page.',
    });
    expect((await new ApiClient(app).post(`/api/v1/auth/password-reset/${second}`, { password: NEW_PASSWORD })).status).toBe(200);
  });

  it('refuses a weak new password and keeps the link usable', async () => {
    const account = await signUp(app);
    const token = await requestLink(account.email);
    const weak = await new ApiClient(app).post(`/api/v1/auth/password-reset/${token}`, { password: 'alllowercaseletters' });
    expect(weak.status).toBe(400);
    expect(weak.body.error.fields.password).toBe('Mix at least two kinds of character (letters and digits, or add a space or a symbol).');
    const same = await new ApiClient(app).post(`/api/v1/auth/password-reset/${token}`, { password: account.email });
    expect(same.status).toBe(400);
    expect(same.body.error.fields.password).toBe('Do not use your e-mail address as the password; choose something others cannot guess.');
    expect((await new ApiClient(app).get(`/api/v1/auth/password-reset/${token}`)).status).toBe(200);
  });

  it('stores only the hash of the token', async () => {
    const account = await signUp(app);
    const token = await requestLink(account.email);
    const rows = await PasswordReset.findAll({ where: { userId: account.userId } });
    expect(rows).toHaveLength(1);
    expect(rows[0].tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(rows[0].tokenHash).not.toBe(token);
    expect((await User.findByPk(account.userId))?.passwordHash).not.toContain(token);
  });

  it('limits requests per address like sign-in does', async () => {
    const limited = testApp({ resetLimit: { max: 2 } });
    const email = uniqueEmail('flood');
    const client = new ApiClient(limited);
    expect((await client.post('/api/v1/auth/password-reset', { email })).status).toBe(202);
    expect((await client.post('/api/v1/auth/password-reset', { email })).status).toBe(202);
    const third = await client.post('/api/v1/auth/password-reset', { email });
    expect(third.status).toBe(429);
    expect(third.body.error.message).toBe('Too many password-reset requests for this e-mail. Wait 15 minutes, then check the inbox before asking again.');
  });
});
