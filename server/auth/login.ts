/**
 * Starting and ending sign-in sessions. passport's req.login regenerates the session id, so the client
 * fetches a fresh CSRF token afterwards.
 */
import type { Request } from 'express';
import type { Transaction } from 'sequelize';
import { sequelize } from '../db';

export function logIn(req: Request, user: Express.User): Promise<void> {
  return new Promise((resolve, reject) => req.login(user, (err: unknown) => (err ? reject(err) : resolve())));
}

export function logOut(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.logout((err: unknown) => (err ? reject(err) : resolve())));
}

/**
 * Deletes every stored session of the user except `keepSid`. connect-session-sequelize keeps the whole
 * session as JSON text in `auth_sessions.data`; passport puts the user id at `$.passport.user`.
 */
export async function endOtherSessions(userId: number, keepSid: string | undefined, transaction?: Transaction): Promise<void> {
  await sequelize.query("DELETE FROM auth_sessions WHERE JSON_VALUE(data, '$.passport.user') = ? AND sid <> ?", {
    replacements: [String(userId), keepSid ?? ''],
    transaction,
  });
}
