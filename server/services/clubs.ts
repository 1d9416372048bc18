/**
 * Club profile, Overview counts (members and profiles here, the other resources from their services),
 * members and their roles.
 */
import { fn, col, type Transaction } from 'sequelize';
import type { ClubOverview, ClubProfile, ClubUpdateBody, MemberSummary } from '../../shared/schemas/club';
import type { Role } from '../../shared/types/api';
import { withTransaction } from '../db';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { AthleteProfile, Club, Membership, User } from '../models';
import { countClips, countProcessingClips } from './clips';
import { countFlights } from './flights';
import { getStaffOverview } from './overview';
import { countPendingAthleteInvitations } from './invitations';
import { assertAthleteSeatFree } from './seats';
import { countSessions } from './sessions';
import { getSubscriptionSummary } from './subscriptions';

export function toClubProfile(club: Club): ClubProfile {
  return {
    id: club.id,
    name: club.name,
    sportFocus: club.sportFocus,
    units: club.units,
    timeZone: club.timeZone,
    defaultConditions: club.defaultConditions ?? null,
  };
}

async function findClub(clubId: number): Promise<Club> {
  const club = await Club.findByPk(clubId);
  if (!club) throw notFound('club');
  return club;
}

/** The club profile with the subscription summary every member needs for the banner. */
export async function getClub(clubId: number): Promise<ClubProfile> {
  const profile = toClubProfile(await findClub(clubId));
  return { ...profile, subscription: await getSubscriptionSummary(clubId) };
}

export async function updateClub(clubId: number, body: ClubUpdateBody): Promise<ClubProfile> {
  const club = await findClub(clubId);
  if (body.name !== undefined) club.name = body.name;
  if (body.sportFocus !== undefined) club.sportFocus = body.sportFocus;
  if (body.units !== undefined) club.units = body.units;
  if (body.timeZone !== undefined) club.timeZone = body.timeZone;
  await club.save();
  return toClubProfile(club);
}

export async function getOverview(clubCtx: ClubContext): Promise<ClubOverview> {
  const club = await findClub(clubCtx.id);
  const byRole = (await Membership.findAll({
    where: { clubId: club.id },
    attributes: ['role', [fn('COUNT', col('id')), 'n']],
    group: ['role'],
    raw: true,
  })) as unknown as { role: Role; n: number | string }[];
  const roleCount = (role: Role) => Number(byRole.find((r) => r.role === role)?.n ?? 0);
  const athleteProfiles =
    clubCtx.role === 'athlete'
      ? clubCtx.athleteProfileId === null
        ? 0
        : 1
      : await AthleteProfile.count({ where: { clubId: club.id } });
  // The resource counts and the staff's start of the day are independent reads: run them side by side.
  const [sessions, clips, flights, flightsNeedingAttention, clipsProcessing, staff] = await Promise.all([
    countSessions(clubCtx),
    countClips(clubCtx),
    countFlights(clubCtx),
    countFlights(clubCtx, 'needs_attention'),
    countProcessingClips(clubCtx),
    clubCtx.role === 'athlete' ? null : getStaffOverview(club.id),
  ]);
  const counts: ClubOverview['counts'] = {
    members: roleCount('admin') + roleCount('coach') + roleCount('athlete'),
    admins: roleCount('admin'),
    coaches: roleCount('coach'),
    athletes: roleCount('athlete'),
    athleteProfiles,
    // Each resource counts what the caller may see of it (an athlete: their own).
    sessions,
    clips,
    flights,
    flightsNeedingAttention,
    clipsProcessing,
  };
  return {
    club: { id: club.id, name: club.name, sportFocus: club.sportFocus, units: club.units },
    role: clubCtx.role,
    counts,
    staff,
  };
}

async function memberSummaries(clubId: number, where: { id?: number } = {}): Promise<MemberSummary[]> {
  const memberships = await Membership.findAll({
    where: { clubId, ...where },
    include: [{ model: User, as: 'user', attributes: ['id', 'email', 'displayName'] }],
    order: [['id', 'ASC']],
  });
  const profiles = await AthleteProfile.findAll({ where: { clubId }, attributes: ['id', 'userId'] });
  const profileByUser = new Map(profiles.filter((p) => p.userId !== null).map((p) => [p.userId as number, p.id]));
  return memberships.map((m) => ({
    id: m.id,
    userId: m.userId,
    displayName: m.user?.displayName ?? '',
    email: m.user?.email ?? '',
    role: m.role,
    athleteProfileId: profileByUser.get(m.userId) ?? null,
  }));
}

export async function listMembers(clubId: number): Promise<MemberSummary[]> {
  const members = await memberSummaries(clubId);
  return members.sort((a, b) => a.displayName.localeCompare(b.displayName) || a.id - b.id);
}

/** Refuses to demote or remove the club's only admin (the club would have nobody to run it). */
async function assertNotLastAdmin(membership: Membership, action: string, transaction: Transaction): Promise<void> {
  if (membership.role !== 'admin') return;
  const admins = await Membership.findAll({ where: { clubId: membership.clubId, role: 'admin' }, transaction, lock: transaction.LOCK.UPDATE });
  if (admins.length <= 1) {
    throw new ApiError('CONFLICT', `This member is the club’s only admin. Make another member admin first, then ${action}.`);
  }
}

/**
 * Changes a member's role. The last admin cannot be demoted; an athlete needs a free athlete seat.
 * A member made athlete gets an athlete profile when they have none, so their flights can be tagged.
 */
export async function changeMemberRole(clubId: number, memberId: number, role: Role): Promise<MemberSummary> {
  await withTransaction(async (transaction) => {
    const membership = await Membership.findOne({
      where: { id: memberId, clubId },
      include: [{ model: User, as: 'user', attributes: ['id', 'displayName'] }],
      transaction,
      lock: transaction.LOCK.UPDATE,
    });
    if (!membership) throw notFound('member');
    if (membership.role === role) return;
    await assertNotLastAdmin(membership, 'change this role', transaction);
    if (role === 'athlete') await assertAthleteSeatFree(clubId, await countPendingAthleteInvitations(clubId, transaction), transaction);
    membership.role = role;
    await membership.save({ transaction });
    if (role === 'athlete') {
      const profile = await AthleteProfile.findOne({ where: { clubId, userId: membership.userId }, transaction });
      if (!profile) {
        await AthleteProfile.create(
          { clubId, userId: membership.userId, displayName: membership.user?.displayName ?? 'Athlete', birthYear: null, dominantSide: null, position: null },
          { transaction },
        );
      }
    }
  });
  const [summary] = await memberSummaries(clubId, { id: memberId });
  return summary;
}

/**
 * Takes a member out of the club. Their flights and athlete profile stay with the club: the profile is only
 * unlinked from the account, so coaches keep the history. The last admin cannot be removed.
 */
export async function removeMember(clubId: number, memberId: number): Promise<void> {
  await withTransaction(async (transaction) => {
    const membership = await Membership.findOne({ where: { id: memberId, clubId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!membership) throw notFound('member');
    await assertNotLastAdmin(membership, 'remove this one', transaction);
    await AthleteProfile.update({ userId: null }, { where: { clubId, userId: membership.userId }, transaction });
    await membership.destroy({ transaction });
  });
}
