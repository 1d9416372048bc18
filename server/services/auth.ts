/**
 * Accounts: sign-up (user + club + admin membership), password check, Google accounts, and the `Me` view.
 */
import type { SignUpBody } from '../../shared/schemas/auth';
import type { Me } from '../../shared/types/api';
import { decoyHash, hashPassword, verifyPassword } from '../auth/passwords';
import { withTransaction } from '../db';
import { ApiError } from '../http/errors';
import { AthleteProfile, Club, Membership, User } from '../models';
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
  return (await verifyPassword(password, user.passwordHash)) ? toSessionUser(user) : null;
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

/** The signed-in user with every club membership (sorted by club name) and athlete profile. */
export async function loadMe(userId: number): Promise<Me | null> {
  const user = await User.findByPk(userId);
  if (!user) return null;
  const memberships = await Membership.findAll({
    where: { userId },
    include: [{ model: Club, as: 'club', attributes: ['id', 'name'] }],
  });
  const profiles = await AthleteProfile.findAll({ where: { userId }, attributes: ['id', 'clubId'] });
  const profileByClub = new Map(profiles.map((p) => [p.clubId, p.id]));
  return {
    user: { id: user.id, email: user.email, displayName: user.displayName, unitsPreference: user.unitsPreference },
    memberships: memberships
      .map((m) => ({
        clubId: m.clubId,
        clubName: m.club?.name ?? '',
        role: m.role,
        athleteProfileId: profileByClub.get(m.clubId) ?? null,
      }))
      .sort((a, b) => a.clubName.localeCompare(b.clubName) || a.clubId - b.clubId),
  };
}
