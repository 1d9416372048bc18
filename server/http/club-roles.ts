/**
 * The signed-in user's clubs (role and athlete profile in each), read with the session in the same query
 * (`server/http/session.ts`) and handed to `clubAccess()` of the same request, so that a club route costs
 * one round trip to the database less. Kept beside the user object of this request only (a WeakMap keyed by
 * it): never a cache across requests, so a membership changed a moment ago counts on the next request.
 */
import type { ClubContext } from './types';

const rolesByUser = new WeakMap<object, Map<number, ClubContext>>();

/** Parses the `[[clubId, role, profileId], …]` JSON the session query reads and keeps it with `user`. */
export function rememberClubRoles(user: object, json: unknown): void {
  let rows: unknown = json;
  if (typeof json === 'string') {
    try {
      rows = JSON.parse(json);
    } catch {
      return;
    }
  }
  const clubs = new Map<number, ClubContext>();
  if (Array.isArray(rows)) {
    for (const row of rows) {
      if (!Array.isArray(row)) return;
      const [clubId, role, profileId] = row as [unknown, unknown, unknown];
      if (typeof clubId !== 'number' || (role !== 'admin' && role !== 'coach' && role !== 'athlete')) return;
      clubs.set(clubId, { id: clubId, role, athleteProfileId: typeof profileId === 'number' ? profileId : null });
    }
  } else if (rows !== null) return;
  rolesByUser.set(user, clubs);
}

/**
 * The user's place in club `clubId` as read with this request's session: the context, null when they are not
 * a member, or undefined when the session read did not bring the clubs (the caller then asks the database).
 */
export function clubRoleOf(user: object, clubId: number): ClubContext | null | undefined {
  const clubs = rolesByUser.get(user);
  if (!clubs) return undefined;
  return clubs.get(clubId) ?? null;
}
