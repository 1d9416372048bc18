/**
 * Password reset by e-mail: a single-use link that works for RESET_TTL_MINUTES, stored as the hash of its
 * token. Setting the new password ends every other session of the user.
 */
import { Op } from 'sequelize';
import { passwordProblem } from '../../shared/schemas/auth';
import { hashPassword } from '../auth/passwords';
import { endOtherSessions } from '../auth/login';
import { hashToken, isTokenShaped, newToken } from '../auth/tokens';
import { withTransaction } from '../db';
import { ApiError } from '../http/errors';
import { log } from '../logger';
import { PasswordReset, User } from '../models';
import { appLink, formatMailDate, passwordResetMail, sendMail } from './mail';

export const RESET_TTL_MINUTES = 60;

/**
 * Issues a link for the address when it has an account (earlier unused links of that user stop working)
 * and e-mails it. Nothing is sent for an unknown address; the caller cannot tell the difference.
 */
export async function requestPasswordReset(email: string): Promise<void> {
  const user = await User.findOne({ where: { email }, attributes: ['id', 'email', 'displayName'] });
  if (!user) return;
  await withTransaction(async (transaction) => {
    await PasswordReset.destroy({ where: { userId: user.id, usedAt: null }, transaction });
    const { token, hash } = newToken();
    const expiresAt = new Date(Date.now() + RESET_TTL_MINUTES * 60 * 1000);
    await PasswordReset.create({ userId: user.id, tokenHash: hash, expiresAt }, { transaction });
    await sendMail(user.email, passwordResetMail({ displayName: user.displayName, link: appLink(`/reset-password/${token}`), expiresAt }));
  });
}

/**
 * Runs the request after the answer has gone out, so an existing address takes no longer to answer than an
 * unknown one and a mail failure reveals nothing; a failure is logged.
 */
export function requestPasswordResetInBackground(email: string, requestId: string): void {
  requestPasswordReset(email).catch((err: unknown) => {
    log.warn('password reset request failed', { requestId, reason: err instanceof Error ? err.message : String(err) });
  });
}

const INVALID_MESSAGE =
  'This password-reset link is not valid: it may have been cut short when it was copied, or replaced by a newer request. Ask for a new link on the sign-in page.';

async function usableReset(token: string): Promise<PasswordReset> {
  if (!isTokenShaped(token)) throw new ApiError('RESET_LINK_INVALID', INVALID_MESSAGE);
  const reset = await PasswordReset.findOne({ where: { tokenHash: hashToken(token) }, include: [{ model: User, as: 'user' }] });
  if (!reset || !reset.user) throw new ApiError('RESET_LINK_INVALID', INVALID_MESSAGE);
  if (reset.usedAt) {
    throw new ApiError('RESET_LINK_USED', 'This password-reset link has already been used. Sign in with the new password, or ask for a new link on the sign-in page.');
  }
  if (reset.expiresAt.getTime() <= Date.now()) {
    throw new ApiError('RESET_LINK_EXPIRED', `This password-reset link expired on ${formatMailDate(reset.expiresAt)}. Ask for a new link on the sign-in page.`);
  }
  return reset;
}

/** Whether a link can still be used, for the reset page to say so before the password is typed. */
export async function checkPasswordReset(token: string): Promise<{ email: string; expiresAt: string }> {
  const reset = await usableReset(token);
  return { email: reset.user?.email ?? '', expiresAt: reset.expiresAt.toISOString() };
}

/**
 * Sets the new password, uses the link up and ends every session of the user except `keepSid` (the
 * browser making the request), in one transaction.
 */
export async function resetPassword(token: string, password: string, keepSid: string | undefined): Promise<void> {
  const found = await usableReset(token);
  const user = found.user as User;
  const problem = passwordProblem(password, user.email);
  if (problem) throw new ApiError('VALIDATION_FAILED', `Check this field: password. ${problem}`, { password: problem });
  const passwordHash = await hashPassword(password);
  await withTransaction(async (transaction) => {
    // Claimed with a conditional update, so two submissions of one link cannot both succeed.
    const [claimed] = await PasswordReset.update(
      { usedAt: new Date() },
      { where: { id: found.id, usedAt: null, expiresAt: { [Op.gt]: new Date() } }, transaction },
    );
    if (claimed !== 1) {
      throw new ApiError('RESET_LINK_USED', 'This password-reset link has already been used. Sign in with the new password, or ask for a new link on the sign-in page.');
    }
    await User.update({ passwordHash }, { where: { id: user.id }, transaction });
    await endOtherSessions(user.id, keepSid, transaction);
  });
}
