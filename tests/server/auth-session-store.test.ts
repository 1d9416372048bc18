import { describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import type { Me } from '../../shared/types/api';
import { signUp, testApp, sequelize, User } from '../support/app';

const app = testApp();

async function sessionRowsOf(userId: number): Promise<{ sid: string; expires: Date }[]> {
  return sequelize.query<{ sid: string; expires: Date }>("SELECT sid, expires FROM auth_sessions WHERE JSON_VALUE(data, '$.passport.user') = ?", {
    type: QueryTypes.SELECT,
    replacements: [userId],
  });
}

describe('session store on the signed-in path', () => {
  it('does not write the session row again on every signed-in request', async () => {
    const user = await signUp(app);
    await user.client.get('/api/v1/auth/me');
    const [before] = await sessionRowsOf(user.userId);
    await new Promise((r) => setTimeout(r, 1100));
    for (let i = 0; i < 3; i += 1) expect((await user.client.get('/api/v1/auth/me')).status).toBe(200);
    const [after] = await sessionRowsOf(user.userId);
    expect(new Date(after!.expires).getTime()).toBe(new Date(before!.expires).getTime());
  });

  it('writes the expiry when the session row runs out sooner than the slack allows', async () => {
    const user = await signUp(app);
    await user.client.get('/api/v1/auth/me');
    const [row] = await sessionRowsOf(user.userId);
    // As if another process had written an expiry a day early: the next read learns it, and the touch renews it.
    const earlier = new Date(new Date(row!.expires).getTime() - 24 * 3600 * 1000);
    await sequelize.query('UPDATE auth_sessions SET expires = ? WHERE sid = ?', { replacements: [earlier, row!.sid] });
    expect((await user.client.get('/api/v1/auth/me')).status).toBe(200);
    const [renewed] = await sessionRowsOf(user.userId);
    expect(new Date(renewed!.expires).getTime()).toBeGreaterThan(earlier.getTime() + 23 * 3600 * 1000);
  });

  it('signs the request out at once when its session row is gone or expired', async () => {
    const user = await signUp(app);
    expect((await user.client.get('/api/v1/auth/me')).status).toBe(200);
    const [row] = await sessionRowsOf(user.userId);
    await sequelize.query('UPDATE auth_sessions SET expires = ? WHERE sid = ?', { replacements: [new Date(Date.now() - 1000), row!.sid] });
    expect((await user.client.get('/api/v1/auth/me')).status).toBe(401);

    const other = await signUp(app);
    expect((await other.client.get('/api/v1/auth/me')).status).toBe(200);
    await sequelize.query("DELETE FROM auth_sessions WHERE JSON_VALUE(data, '$.passport.user') = ?", { replacements: [other.userId] });
    expect((await other.client.get('/api/v1/auth/me')).status).toBe(401);
  });

  it('shows a changed name on the next request and refuses a deleted user', async () => {
    const user = await signUp(app);
    expect((await user.client.get('/api/v1/auth/me')).status).toBe(200);
    await User.update({ displayName: 'Odile Renamed' }, { where: { id: user.userId } });
    const me = await user.client.get('/api/v1/auth/me');
    expect((me.body as { data: Me }).data.user.displayName).toBe('Odile Renamed');
    await sequelize.query('DELETE FROM memberships WHERE user_id = ?', { replacements: [user.userId] });
    await User.destroy({ where: { id: user.userId } });
    expect((await user.client.get('/api/v1/auth/me')).status).toBe(401);
  });
});
