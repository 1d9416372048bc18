/**
 * The one authorization layer. Every API route states who may use it:
 * - `publicRoute` — anyone (health, CSRF token, sign-in/up);
 * - `requireUser` — any signed-in user;
 * - `clubAccess(...roles)` — routes under `/api/v1/clubs/:clubId/...`: a member of that club with one of the roles.
 * A user who is not a member of `:clubId` gets 404 (another club's existence is never revealed);
 * a member whose role is not listed gets 403.
 * Athletes reach only their own records: add `scopeAthlete(req)` to WHERE clauses of athlete data.
 */
import type { Request, RequestHandler } from 'express';
import { ROLES, type Role } from '../../shared/types/api';
import { ApiError, notFound, parseId } from '../http/errors';
import { clubRoleOf } from '../http/club-roles';
import type { ClubContext } from '../http/types';
import { QueryTypes } from 'sequelize';
import { sequelize } from '../db';

/** Every role; for club routes any member may use. */
export const ANY_ROLE: readonly Role[] = ROLES;

/** Marks a route that needs no sign-in, so the route table still says so explicitly. */
export const publicRoute: RequestHandler = (_req, _res, next) => next();

export const requireUser: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new ApiError('UNAUTHENTICATED', 'Sign in to continue; your session may have ended.');
  next();
};

const ROLE_WORDS: Record<Role, string> = { admin: 'club admin', coach: 'coach', athlete: 'athlete' };

/** Loads the member's role and athlete profile in a club, or null when the user is no member. */
export async function loadClubContext(userId: number, clubId: number): Promise<ClubContext | null> {
  // One plain query per club request (it runs in front of every club route).
  const [row] = await sequelize.query<{ role: Role; profileId: number | null }>(
    `SELECT m.role AS role, p.id AS profileId FROM memberships m
       LEFT JOIN athlete_profiles p ON p.club_id = m.club_id AND p.user_id = m.user_id
      WHERE m.user_id = ? AND m.club_id = ? LIMIT 1`,
    { type: QueryTypes.SELECT, replacements: [userId, clubId] },
  );
  if (!row) return null;
  return { id: clubId, role: row.role, athleteProfileId: row.profileId === null ? null : Number(row.profileId) };
}

export function clubAccess(...roles: Role[]): RequestHandler {
  if (roles.length === 0) throw new Error('clubAccess() needs at least one role: say who may use the route.');
  return async (req, _res, next) => {
    if (!req.user) throw new ApiError('UNAUTHENTICATED', 'Sign in to continue; your session may have ended.');
    const clubId = parseId(req.params.clubId, 'club');
    // The clubs read with this request's session, else one query.
    const known = clubRoleOf(req.user, clubId);
    const club = known === undefined ? await loadClubContext(req.user.id, clubId) : known;
    if (!club) throw notFound('club');
    if (!roles.includes(club.role)) {
      const allowed = roles.map((r) => ROLE_WORDS[r]).join(' or ');
      throw new ApiError('FORBIDDEN', `Only a ${allowed} of this club can do this; you are a ${ROLE_WORDS[club.role]}. Ask a club admin if you need it.`);
    }
    req.club = club;
    next();
  };
}

/** The club context set by `clubAccess()`; throws if a route forgot it (a programming error, answered 500). */
export function clubOf(req: Request): ClubContext {
  if (!req.club) throw new Error('Route uses req.club without clubAccess() in front of it.');
  return req.club;
}

/**
 * WHERE-clause addition that keeps an athlete to their own records: `{ athleteProfileId }` for athletes
 * (0 — matching nothing — when they have no profile), `{}` for coaches and admins.
 */
export function scopeAthlete(req: Request): { athleteProfileId?: number } {
  const club = clubOf(req);
  if (club.role !== 'athlete') return {};
  return { athleteProfileId: club.athleteProfileId ?? 0 };
}
