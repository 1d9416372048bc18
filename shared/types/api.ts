/** Types of the API's responses that both sides use. Request bodies are typed by shared/schemas. */
import type { UnitsPreference } from '../units';

export const ROLES = ['admin', 'coach', 'athlete'] as const;
export type Role = (typeof ROLES)[number];

export interface MembershipSummary {
  clubId: number;
  clubName: string;
  role: Role;
  /** The member's athlete profile in this club, if any. */
  athleteProfileId: number | null;
}

export interface Me {
  /** `unitsPreference`: the user's own display units, or `club` to follow each club's setting. */
  user: { id: number; email: string; displayName: string; unitsPreference: UnitsPreference };
  memberships: MembershipSummary[];
}

export interface DataResponse<T> {
  data: T;
}
export interface ListResponse<T, M = { total: number }> {
  data: T[];
  meta: M;
}
