/**
 * Accounts: sign-up (user + club + admin membership), password check, Google accounts, and the `Me` view.
 */
import type { SignUpBody } from '../../shared/schemas/auth';
import { QueryTypes } from 'sequelize';
import type { Me, Role } from '../../shared/types/api';
import { decoyHash, hashPassword, needsRehash, verifyPassword } from '../auth/passwords';
import { sequelize, withTransaction } from '../db';
import { ApiError } from '../http/errors';
import { errorFields, log } from '../logger';
import { Club, Membership, User } from '../models';
import { startTrial } from './subscriptions';

export type SessionUser = Express.User;

export function toSessionUser(user: User): SessionUser {
  return { id: user.id, email: user.email, displayName: user.displayName };
}

/** Creates the user, their club (on its free trial) and their admin membership in one transaction. */
export async function signUp(body: SignUpBody): Promise<SessionUser> {
  const existing = await User.findOne({ where: { email: body.email }, attributes: ['id'] });
  if (existing) {
    throw new ApiError('EMAIL_TAKEN', 'An account with this e-mail already exists. Sign in instead, or use another address.', {
      email: 'An account with this e-mail already exists.',
    });
  }
  const passwordHash = await hashPassword(body.password);
  return withTransaction(async (transaction) => {
    const user = await User.create({ email: body.email, passwordHash, googleSub: null, displayName: body.displayName }, { transaction });
    const club = await Club.create(
      { name: body.clubName, sportFocus: body.sportFocus ?? 'multi-sport', units: 'metric', defaultConditions: null },
      { transaction },
    );
    await Membership.create({ userId: user.id, clubId: club.id, role: 'admin' }, { transaction });
    await startTrial(club.id, transaction);
    return toSessionUser(user);
  }).catch((err: unknown) => {
    // Two sign-ups with one address at the same moment: the unique index decides, the loser hears why.
    if (err instanceof Error && err.name === 'SequelizeUniqueConstraintError') {
      throw new ApiError('EMAIL_TAKEN', 'An account with this e-mail already exists. Sign in instead, or use another address.', {
        email: 'An account with this e-mail already exists.',
      });
    }
    throw err;
  });
}

/** The user for an e-mail and password, or null. Unknown e-mails cost the same time as wrong passwords. */
export async function checkPassword(email: string, password: string): Promise<SessionUser | null> {
  const user = await User.findOne({ where: { email: email.trim().toLowerCase() } });
  if (!user || !user.passwordHash) {
    await verifyPassword(password, await decoyHash());
    return null;
  }
  if (!(await verifyPassword(password, user.passwordHash))) return null;
  if (needsRehash(user.passwordHash)) await upgradeHash(user, password);
  return toSessionUser(user);
}

/**
 * Stores a hash of the current cost for a password that just verified against an older one. Only when the
 * stored hash is still the one verified (a reset at the same moment wins); a failure never stops the sign-in.
 */
async function upgradeHash(user: User, password: string): Promise<void> {
  try {
    const fresh = await hashPassword(password);
    await User.update({ passwordHash: fresh }, { where: { id: user.id, passwordHash: user.passwordHash } });
  } catch (err) {
    log.warn('Upgrading a password hash failed; it is retried at the next sign-in', { userId: user.id, ...errorFields(err) });
  }
}

export interface GoogleIdentity {
  sub: string;
  email: string | null;
  emailVerified: boolean;
  displayName: string;
}

/**
 * The user for a Google identity: by Google subject, else by verified e-mail (linking the accounts),
 * else a new Google-only user. A user with no membership gets a personal club where they are admin.
 */
export async function findOrCreateGoogleUser(identity: GoogleIdentity): Promise<SessionUser> {
  return withTransaction(async (transaction) => {
    let user = await User.findOne({ where: { googleSub: identity.sub }, transaction });
    const email = identity.email?.trim().toLowerCase() ?? null;
    if (!user && email) {
      const byEmail = await User.findOne({ where: { email }, transaction });
      if (byEmail) {
        // Note: linking by e-mail is safe only when the provider vouches for the address.
        if (!identity.emailVerified) {
          throw new ApiError('CONFLICT', 'An account with this e-mail exists; sign in with its password.');
        }
        byEmail.googleSub = identity.sub;
        await byEmail.save({ transaction });
        user = byEmail;
      }
    }
    if (!user) {
      if (!email) throw new ApiError('BAD_REQUEST', 'Google did not share an e-mail address; allow it and try again.');
      const displayName = (identity.displayName || email.split('@')[0]).slice(0, 80);
      user = await User.create({ email, passwordHash: null, googleSub: identity.sub, displayName }, { transaction });
    }
    const memberships = await Membership.count({ where: { userId: user.id }, transaction });
    if (memberships === 0) {
      const club = await Club.create(
        { name: `${user.displayName}'s club`.slice(0, 120), sportFocus: 'multi-sport', units: 'metric', defaultConditions: null },
        { transaction },
      );
      await Membership.create({ userId: user.id, clubId: club.id, role: 'admin' }, { transaction });
      await startTrial(club.id, transaction);
    }
    return toSessionUser(user);
  });
}

/**
 * The user of a session (passport's deserializeUser runs it on every signed-in request): one plain
 * SELECT by primary key, no model instance.
 */
export async function findSessionUser(userId: number): Promise<SessionUser | null> {
  const [row] = await sequelize.query<SessionUser>('SELECT id, email, display_name AS displayName, units_preference AS unitsPreference FROM users WHERE id = ?', {
    type: QueryTypes.SELECT,
    replacements: [userId],
  });
  return row ? { id: Number(row.id), email: row.email, displayName: row.displayName, unitsPreference: row.unitsPreference } : null;
}

/**
 * The signed-in user with every club membership (sorted by club name) and athlete profile, in one query
 * for the memberships; `known` is the user as the session already loaded them (saves a read).
 */
export async function loadMe(userId: number, known?: SessionUser): Promise<Me | null> {
  const user = known ?? (await findSessionUser(userId));
  if (!user) return null;
  const rows = await sequelize.query<{ clubId: number; clubName: string; role: Role; athleteProfileId: number | null }>(
    `SELECT m.club_id AS clubId, c.name AS clubName, m.role AS role, p.id AS athleteProfileId
       FROM memberships m
       JOIN clubs c ON c.id = m.club_id
       LEFT JOIN athlete_profiles p ON p.club_id = m.club_id AND p.user_id = m.user_id
      WHERE m.user_id = ?`,
    { type: QueryTypes.SELECT, replacements: [userId] },
  );
  return {
    user: { id: user.id, email: user.email, displayName: user.displayName, unitsPreference: user.unitsPreference ?? 'club' },
    memberships: rows
      .map((r) => ({
        clubId: Number(r.clubId),
        clubName: r.clubName ?? '',
        role: r.role,
        athleteProfileId: r.athleteProfileId === null ? null : Number(r.athleteProfileId),
      }))
      .sort((a, b) => a.clubName.localeCompare(b.clubName) || a.clubId - b.clubId),
  };
}
