/**
 * Athlete profiles of a club. Coaches and admins see all; an athlete sees only their own profile.
 */
import type { AthleteCreateBody, AthleteProfileSummary, AthleteUpdateBody } from '../../shared/schemas/club';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { AthleteProfile, Membership } from '../models';

export function toAthleteSummary(profile: AthleteProfile): AthleteProfileSummary {
  return {
    id: profile.id,
    displayName: profile.displayName,
    birthYear: profile.birthYear ?? null,
    dominantSide: profile.dominantSide ?? null,
    position: profile.position ?? null,
    releaseHeightM: profile.releaseHeightM ?? null,
    userId: profile.userId ?? null,
  };
}

/** Where clause that keeps an athlete to their own profile (id 0 matches nothing when they have none). */
function visible(club: ClubContext): { clubId: number; id?: number } {
  return club.role === 'athlete' ? { clubId: club.id, id: club.athleteProfileId ?? 0 } : { clubId: club.id };
}

export async function listAthletes(club: ClubContext): Promise<AthleteProfileSummary[]> {
  const profiles = await AthleteProfile.findAll({ where: visible(club), order: [['displayName', 'ASC'], ['id', 'ASC']] });
  return profiles.map(toAthleteSummary);
}

async function findVisible(club: ClubContext, athleteId: number): Promise<AthleteProfile> {
  if (club.role === 'athlete' && club.athleteProfileId !== athleteId) throw notFound('athlete');
  const profile = await AthleteProfile.findOne({ where: { clubId: club.id, id: athleteId } });
  if (!profile) throw notFound('athlete');
  return profile;
}

export async function getAthlete(club: ClubContext, athleteId: number): Promise<AthleteProfileSummary> {
  return toAthleteSummary(await findVisible(club, athleteId));
}

/** A linked user must be a member of the club and have no other profile there. */
async function checkLink(clubId: number, userId: number, exceptProfileId?: number): Promise<void> {
  const member = await Membership.findOne({ where: { clubId, userId }, attributes: ['id'] });
  if (!member) {
    throw new ApiError('VALIDATION_FAILED', 'Link the profile only to a member of this club.', {
      userId: 'This person is not a member of the club; invite them first or leave the link empty.',
    });
  }
  const other = await AthleteProfile.findOne({ where: { clubId, userId }, attributes: ['id'] });
  if (other && other.id !== exceptProfileId) {
    throw new ApiError('CONFLICT', 'This member already has an athlete profile in the club; edit that one instead.', {
      userId: 'This member already has an athlete profile.',
    });
  }
}

export async function createAthlete(club: ClubContext, body: AthleteCreateBody): Promise<AthleteProfileSummary> {
  if (body.userId) await checkLink(club.id, body.userId);
  const profile = await AthleteProfile.create({
    clubId: club.id,
    userId: body.userId ?? null,
    displayName: body.displayName,
    birthYear: body.birthYear ?? null,
    dominantSide: body.dominantSide ?? null,
    position: body.position ?? null,
    releaseHeightM: body.releaseHeightM ?? null,
  });
  return toAthleteSummary(profile);
}

export async function updateAthlete(club: ClubContext, athleteId: number, body: AthleteUpdateBody): Promise<AthleteProfileSummary> {
  const profile = await findVisible(club, athleteId);
  if (body.userId) await checkLink(club.id, body.userId, profile.id);
  if (body.displayName !== undefined) profile.displayName = body.displayName;
  if (body.birthYear !== undefined) profile.birthYear = body.birthYear;
  if (body.dominantSide !== undefined) profile.dominantSide = body.dominantSide;
  if (body.position !== undefined) profile.position = body.position === '' ? null : body.position;
  if (body.releaseHeightM !== undefined) profile.releaseHeightM = body.releaseHeightM;
  if (body.userId !== undefined) profile.userId = body.userId;
  await profile.save();
  return toAthleteSummary(profile);
}
