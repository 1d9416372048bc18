/**
 * Club profile, Overview counts (members and profiles here, the other resources from their services),
 * members and their roles.
 */
import { fn, col, Op, QueryTypes, type Transaction } from 'sequelize';
import { pageOffset, type PageMeta, type PaginationQuery } from '../../shared/schemas/pagination';
import type { ClubOverview, ClubProfile, ClubUpdateBody, MemberSummary } from '../../shared/schemas/club';
import type { Role } from '../../shared/types/api';
import { sequelize, withTransaction } from '../db';
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

/** The Overview of a coach or admin, who see all of the club: the club and every count in one query. */
async function staffOverview(clubCtx: ClubContext): Promise<ClubOverview> {
  const count = (table: string, extra = '') => `(SELECT COUNT(*) FROM ${table} WHERE club_id = c.id${extra})`;
  // The counts and the staff's start of the day are independent reads: run them side by side.
  const [staff, [row]] = await Promise.all([
    getStaffOverview(clubCtx.id),
    sequelize.query<Record<string, number | string | null>>(
    `SELECT c.id, c.name, c.sport_focus AS sportFocus, c.units,
            ${count('memberships', " AND role = 'admin'")} AS admins, ${count('memberships', " AND role = 'coach'")} AS coaches,
            ${count('memberships', " AND role = 'athlete'")} AS athletes, ${count('athlete_profiles')} AS athleteProfiles,
            ${count('sessions')} AS sessions, ${count('clips')} AS clips, ${count('clips', " AND status = 'processing'")} AS clipsProcessing,
            ${count('flights')} AS flights, ${count('flights', " AND status = 'needs_attention'")} AS flightsNeedingAttention
       FROM clubs c WHERE c.id = ?`,
    { type: QueryTypes.SELECT, replacements: [clubCtx.id] },
    ),
  ]);
  if (!row) throw notFound('club');
  const n = (key: string) => Number(row[key] ?? 0);
  return {
    club: { id: n('id'), name: String(row.name), sportFocus: row.sportFocus as ClubProfile['sportFocus'], units: row.units as ClubProfile['units'] },
    role: clubCtx.role,
    counts: {
      members: n('admins') + n('coaches') + n('athletes'),
      admins: n('admins'),
      coaches: n('coaches'),
      athletes: n('athletes'),
      athleteProfiles: n('athleteProfiles'),
      sessions: n('sessions'),
      clips: n('clips'),
      flights: n('flights'),
      flightsNeedingAttention: n('flightsNeedingAttention'),
      clipsProcessing: n('clipsProcessing'),
    },
    staff,
  };
}

export async function getOverview(clubCtx: ClubContext): Promise<ClubOverview> {
  if (clubCtx.role !== 'athlete') return staffOverview(clubCtx);
  // An athlete's counts are of what they may see (their own): each resource's service counts them.
  const [club, byRole, athleteProfiles, sessions, clips, flights, flightsNeedingAttention, clipsProcessing] = await Promise.all([
    findClub(clubCtx.id),
    Membership.findAll({
      where: { clubId: clubCtx.id },
      attributes: ['role', [fn('COUNT', col('id')), 'n']],
      group: ['role'],
      raw: true,
    }) as unknown as Promise<{ role: Role; n: number | string }[]>,
    // An athlete sees one profile: their own.
    Promise.resolve(clubCtx.athleteProfileId === null ? 0 : 1),
    // Each resource counts what the caller may see of it (an athlete: their own).
    countSessions(clubCtx),
    countClips(clubCtx),
    countFlights(clubCtx),
    countFlights(clubCtx, 'needs_attention'),
    countProcessingClips(clubCtx),
  ]);
  const roleCount = (role: Role) => Number(byRole.find((r) => r.role === role)?.n ?? 0);
  const counts: ClubOverview['counts'] = {
    members: roleCount('admin') + roleCount('coach') + roleCount('athlete'),
    admins: roleCount('admin'),
    coaches: roleCount('coach'),
    athletes: roleCount('athlete'),
    athleteProfiles,
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
    staff: null,
  };
}

async function memberSummaries(clubId: number, where: { id?: number } = {}, page?: PaginationQuery): Promise<MemberSummary[]> {
  const memberships = await Membership.findAll({
    where: { clubId, ...where },
    include: [{ model: User, as: 'user', attributes: ['id', 'email', 'displayName'] }],
    order: page ? [[{ model: User, as: 'user' }, 'displayName', 'ASC'], ['id', 'ASC']] : [['id', 'ASC']],
    ...(page ? { limit: page.pageSize, offset: pageOffset(page) } : {}),
  });
  const userIds = memberships.map((m) => m.userId);
  const profiles = userIds.length === 0 ? [] : await AthleteProfile.findAll({ where: { clubId, userId: { [Op.in]: userIds } }, attributes: ['id', 'userId'] });
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

/** One page of the club's members by name, and how many there are in all. */
export async function listMembers(clubId: number, page: PaginationQuery): Promise<{ data: MemberSummary[]; meta: PageMeta }> {
  const [total, data] = await Promise.all([Membership.count({ where: { clubId } }), memberSummaries(clubId, {}, page)]);
  return { data, meta: { page: page.page, pageSize: page.pageSize, total } };
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
