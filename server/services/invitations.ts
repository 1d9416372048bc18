/**
 * Invitations to join a club by e-mail: create, list, resend (a new token; the old link stops working),
 * revoke, and the public side of the link (preview and accept). Links are single-use and expire; only the
 * token's hash is stored. The e-mail is sent inside the transaction, so a mail server that refuses it
 * leaves nothing half-written.
 */
import { Op, type Transaction } from 'sequelize';
import type {
  InvitationAcceptBody,
  InvitationAccepted,
  InvitationCreateBody,
  InvitationPreview,
  InvitationState,
  InvitationSummary,
} from '../../shared/schemas/invitation';
import { passwordProblem } from '../../shared/schemas/auth';
import type { Role } from '../../shared/types/api';
import { hashPassword } from '../auth/passwords';
import { hashToken, isTokenShaped, newToken } from '../auth/tokens';
import { withTransaction } from '../db';
import { ApiError, notFound } from '../http/errors';
import { AthleteProfile, Club, Invitation, Membership, User } from '../models';
import { toSessionUser, type SessionUser } from './auth';
import { appLink, formatMailDate, invitationMail, sendMail } from './mail';
import { assertAthleteSeatFree } from './seats';

/** How long an invitation link works. */
export const INVITATION_TTL_DAYS = 7;

const ROLE_WORDS: Record<Role, string> = { admin: 'a club admin', coach: 'a coach', athlete: 'an athlete' };

export function invitationState(invitation: Invitation, now = new Date()): InvitationState {
  if (invitation.status === 'pending' && invitation.expiresAt.getTime() <= now.getTime()) return 'expired';
  return invitation.status;
}

function expiry(from = new Date()): Date {
  return new Date(from.getTime() + INVITATION_TTL_DAYS * 24 * 3600 * 1000);
}

const INCLUDE = [
  { model: User, as: 'invitedBy', attributes: ['id', 'displayName'] },
  { model: AthleteProfile, as: 'athleteProfile', attributes: ['id', 'displayName'] },
];

function toSummary(invitation: Invitation): InvitationSummary {
  return {
    id: invitation.id,
    email: invitation.email,
    role: invitation.role,
    state: invitationState(invitation),
    athleteProfileId: invitation.athleteProfileId ?? null,
    athleteName: invitation.athleteProfile?.displayName ?? null,
    invitedByName: invitation.invitedBy?.displayName ?? null,
    createdAt: invitation.createdAt.toISOString(),
    sentAt: invitation.sentAt.toISOString(),
    expiresAt: invitation.expiresAt.toISOString(),
    acceptedAt: invitation.acceptedAt?.toISOString() ?? null,
    revokedAt: invitation.revokedAt?.toISOString() ?? null,
  };
}

async function summaryOf(id: number, transaction?: Transaction): Promise<InvitationSummary> {
  const invitation = await Invitation.findByPk(id, { include: INCLUDE, transaction });
  if (!invitation) throw notFound('invitation');
  return toSummary(invitation);
}

/** Every invitation of the club, newest first. */
export async function listInvitations(clubId: number): Promise<InvitationSummary[]> {
  const invitations = await Invitation.findAll({ where: { clubId }, include: INCLUDE, order: [['createdAt', 'DESC'], ['id', 'DESC']] });
  return invitations.map(toSummary);
}

/** Pending, unexpired athlete invitations of a club (they hold an athlete seat), leaving out `exceptId`. */
export async function countPendingAthleteInvitations(clubId: number, transaction?: Transaction, exceptId?: number): Promise<number> {
  return Invitation.count({
    where: {
      clubId,
      role: 'athlete',
      status: 'pending',
      expiresAt: { [Op.gt]: new Date() },
      ...(exceptId === undefined ? {} : { id: { [Op.ne]: exceptId } }),
    },
    transaction,
  });
}

async function assertNotMember(clubId: number, email: string, transaction: Transaction): Promise<void> {
  const user = await User.findOne({ where: { email }, attributes: ['id'], transaction });
  if (!user) return;
  const membership = await Membership.findOne({ where: { userId: user.id, clubId }, transaction });
  if (membership) {
    throw new ApiError('ALREADY_MEMBER', `${email} is already a member of this club, as ${ROLE_WORDS[membership.role]}. Change their role in the member list instead.`, {
      email: 'This address already belongs to a member of the club.',
    });
  }
}

/** The profile an athlete invitation is tied to: in this club and not yet signed in by someone. */
async function assertProfileFree(clubId: number, athleteProfileId: number, transaction: Transaction): Promise<AthleteProfile> {
  const profile = await AthleteProfile.findOne({ where: { id: athleteProfileId, clubId }, transaction });
  if (!profile) {
    throw new ApiError('VALIDATION_FAILED', 'Check this field: athleteProfileId. No such athlete profile in this club; pick one from the list.', {
      athleteProfileId: 'No such athlete profile in this club; pick one from the list.',
    });
  }
  if (profile.userId !== null) {
    throw new ApiError('VALIDATION_FAILED', `Check this field: athleteProfileId. ${profile.displayName} already signs in with an account of their own; pick another profile or leave it empty.`, {
      athleteProfileId: `${profile.displayName} already signs in with an account of their own; pick another profile or leave it empty.`,
    });
  }
  return profile;
}

async function send(invitation: Invitation, token: string, inviterName: string, transaction: Transaction): Promise<void> {
  const club = await Club.findByPk(invitation.clubId, { attributes: ['name'], transaction });
  const profile = invitation.athleteProfileId ? await AthleteProfile.findByPk(invitation.athleteProfileId, { attributes: ['displayName'], transaction }) : null;
  await sendMail(
    invitation.email,
    invitationMail({
      clubName: club?.name ?? 'your club',
      inviterName,
      role: invitation.role,
      athleteName: profile?.displayName ?? null,
      link: appLink(`/join/${token}`),
      expiresAt: invitation.expiresAt,
    }),
  );
}

/** Creates a pending invitation and e-mails its link. */
export async function createInvitation(clubId: number, inviter: SessionUser, body: InvitationCreateBody): Promise<InvitationSummary> {
  const id = await withTransaction(async (transaction) => {
    // The club row is the lock that keeps two admins from inviting the same address at once.
    await Club.findByPk(clubId, { transaction, lock: transaction.LOCK.UPDATE });
    await assertNotMember(clubId, body.email, transaction);
    const pending = await Invitation.findOne({
      where: { clubId, email: body.email, status: 'pending', expiresAt: { [Op.gt]: new Date() } },
      transaction,
    });
    if (pending) {
      throw new ApiError(
        'INVITATION_PENDING',
        `${body.email} already has a pending invitation, sent ${formatMailDate(pending.sentAt)}. Use Resend on it in the list, or revoke it first.`,
        { email: 'This address already has a pending invitation.' },
      );
    }
    const athleteProfileId = body.athleteProfileId ?? null;
    if (athleteProfileId !== null) await assertProfileFree(clubId, athleteProfileId, transaction);
    if (body.role === 'athlete') await assertAthleteSeatFree(clubId, await countPendingAthleteInvitations(clubId, transaction), transaction);
    const { token, hash } = newToken();
    const now = new Date();
    const invitation = await Invitation.create(
      { clubId, email: body.email, role: body.role, athleteProfileId, invitedByUserId: inviter.id, tokenHash: hash, expiresAt: expiry(now), sentAt: now },
      { transaction },
    );
    await send(invitation, token, inviter.displayName, transaction);
    return invitation.id;
  });
  return summaryOf(id);
}

async function findInClub(clubId: number, invitationId: number, transaction: Transaction): Promise<Invitation> {
  const invitation = await Invitation.findOne({ where: { id: invitationId, clubId }, transaction, lock: transaction.LOCK.UPDATE });
  if (!invitation) throw notFound('invitation');
  return invitation;
}

/** Sends a pending or expired invitation again with a new link and a new expiry; the old link stops working. */
export async function resendInvitation(clubId: number, invitationId: number, inviter: SessionUser): Promise<InvitationSummary> {
  await withTransaction(async (transaction) => {
    const invitation = await findInClub(clubId, invitationId, transaction);
    if (invitation.status === 'accepted') {
      throw new ApiError('CONFLICT', `${invitation.email} accepted this invitation on ${formatMailDate(invitation.acceptedAt ?? invitation.updatedAt)}; there is nothing to resend.`);
    }
    if (invitation.status === 'revoked') {
      throw new ApiError('CONFLICT', `This invitation was revoked. To invite ${invitation.email} again, send a new invitation.`);
    }
    await assertNotMember(invitation.clubId, invitation.email, transaction);
    if (invitation.athleteProfileId !== null) await assertProfileFree(clubId, invitation.athleteProfileId, transaction);
    if (invitation.role === 'athlete') {
      await assertAthleteSeatFree(clubId, await countPendingAthleteInvitations(clubId, transaction, invitation.id), transaction);
    }
    const { token, hash } = newToken();
    const now = new Date();
    invitation.tokenHash = hash;
    invitation.sentAt = now;
    invitation.expiresAt = expiry(now);
    await invitation.save({ transaction });
    await send(invitation, token, inviter.displayName, transaction);
  });
  return summaryOf(invitationId);
}

/** Withdraws a pending or expired invitation; its link stops working. Revoking twice changes nothing. */
export async function revokeInvitation(clubId: number, invitationId: number): Promise<InvitationSummary> {
  await withTransaction(async (transaction) => {
    const invitation = await findInClub(clubId, invitationId, transaction);
    if (invitation.status === 'revoked') return;
    if (invitation.status === 'accepted') {
      throw new ApiError('CONFLICT', `${invitation.email} has already accepted this invitation. To take them out of the club, remove them in the member list.`);
    }
    invitation.status = 'revoked';
    invitation.revokedAt = new Date();
    await invitation.save({ transaction });
  });
  return summaryOf(invitationId);
}

/** The invitation of a link when it can still be used; otherwise the reason, as the error the invitee reads. */
async function usableInvitation(token: string, transaction?: Transaction): Promise<Invitation> {
  const invalid = new ApiError(
    'INVITATION_INVALID',
    'This invitation link is not valid: it may have been cut short when it was copied, or replaced by a newer e-mail. Open the link in the latest invitation, or ask the club admin to send it again.',
  );
  if (!isTokenShaped(token)) throw invalid;
  const invitation = await Invitation.findOne({
    where: { tokenHash: hashToken(token) },
    include: [...INCLUDE, { model: Club, as: 'club', attributes: ['id', 'name'] }],
    transaction,
    lock: transaction ? transaction.LOCK.UPDATE : undefined,
  });
  if (!invitation) throw invalid;
  const state = invitationState(invitation);
  if (state === 'accepted') throw new ApiError('INVITATION_USED', 'This invitation has already been used. Sign in to reach the club.');
  if (state === 'revoked') throw new ApiError('INVITATION_REVOKED', 'The club withdrew this invitation. Ask the club admin if you should still join.');
  if (state === 'expired') {
    throw new ApiError('INVITATION_EXPIRED', `This invitation expired on ${formatMailDate(invitation.expiresAt)}. Ask the club admin to send it again; the new e-mail has a fresh link.`);
  }
  return invitation;
}

export async function previewInvitation(token: string, caller: SessionUser | undefined): Promise<InvitationPreview> {
  const invitation = await usableInvitation(token);
  const account = await User.findOne({ where: { email: invitation.email }, attributes: ['id'] });
  return {
    clubName: invitation.club?.name ?? '',
    role: invitation.role,
    email: invitation.email,
    invitedByName: invitation.invitedBy?.displayName ?? null,
    athleteName: invitation.athleteProfile?.displayName ?? null,
    expiresAt: invitation.expiresAt.toISOString(),
    hasAccount: account !== null,
    signedInAsInvitee: caller?.email === invitation.email,
  };
}

/** Gives the new member their athlete profile: the tied one when it is still free, else a new one (unless they have one). */
async function linkAthleteProfile(invitation: Invitation, user: User, transaction: Transaction): Promise<void> {
  const own = await AthleteProfile.findOne({ where: { clubId: invitation.clubId, userId: user.id }, transaction });
  if (own) return;
  if (invitation.athleteProfileId !== null) {
    const tied = await AthleteProfile.findOne({ where: { id: invitation.athleteProfileId, clubId: invitation.clubId }, transaction, lock: transaction.LOCK.UPDATE });
    if (tied && tied.userId === null) {
      tied.userId = user.id;
      await tied.save({ transaction });
      return;
    }
  }
  await AthleteProfile.create(
    { clubId: invitation.clubId, userId: user.id, displayName: user.displayName, birthYear: null, dominantSide: null, position: null },
    { transaction },
  );
}

export interface AcceptResult {
  accepted: Omit<InvitationAccepted, 'me'>;
  /** A new account the route signs in. */
  newUser: SessionUser | null;
}

/**
 * Accepts an invitation. A new invitee sends their name and password and gets an account; someone with an
 * account must be signed in with the invited address. The link is used up in the same transaction.
 */
export async function acceptInvitation(token: string, body: InvitationAcceptBody, caller: SessionUser | undefined): Promise<AcceptResult> {
  // Hashing takes a moment: done before the transaction, and only when a new account may be made.
  const passwordHash = !caller && body.password ? await hashPassword(body.password) : null;
  return withTransaction(async (transaction) => {
    const invitation = await usableInvitation(token, transaction);
    let user = await User.findOne({ where: { email: invitation.email }, transaction });
    let newUser: SessionUser | null = null;
    if (caller) {
      if (caller.email !== invitation.email || !user) {
        throw new ApiError(
          'INVITATION_EMAIL_MISMATCH',
          `This invitation is for ${invitation.email}, but you are signed in as ${caller.email}. Sign out, then open the link again.`,
        );
      }
    } else if (user) {
      throw new ApiError('EMAIL_TAKEN', `An account with ${invitation.email} already exists. Sign in with it, then open the link again to join.`);
    } else {
      const displayName = body.displayName;
      const problem = body.password ? passwordProblem(body.password, invitation.email) : 'Choose a password.';
      if (!displayName || problem || !passwordHash) {
        const fields: Record<string, string> = {};
        if (!displayName) fields.displayName = 'Enter your name as teammates know it.';
        if (problem) fields.password = problem;
        const names = Object.keys(fields);
        throw new ApiError('VALIDATION_FAILED', `Check ${names.length === 1 ? 'this field' : 'these fields'}: ${names.join(', ')}. ${fields[names[0]]}`, fields);
      }
      user = await User.create({ email: invitation.email, passwordHash, googleSub: null, displayName }, { transaction });
      newUser = toSessionUser(user);
    }
    const existing = await Membership.findOne({ where: { userId: user.id, clubId: invitation.clubId }, transaction });
    if (existing) {
      throw new ApiError('ALREADY_MEMBER', `You are already a member of ${invitation.club?.name ?? 'this club'}. Pick it in the club switcher.`);
    }
    if (invitation.role === 'athlete') await assertAthleteSeatFree(invitation.clubId, 0, transaction);
    await Membership.create({ userId: user.id, clubId: invitation.clubId, role: invitation.role }, { transaction });
    if (invitation.role === 'athlete') await linkAthleteProfile(invitation, user, transaction);
    invitation.status = 'accepted';
    invitation.acceptedAt = new Date();
    invitation.acceptedUserId = user.id;
    await invitation.save({ transaction });
    return { accepted: { clubId: invitation.clubId, clubName: invitation.club?.name ?? '', role: invitation.role }, newUser };
  });
}
