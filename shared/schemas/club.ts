/**
 * Request bodies about clubs, members and athlete profiles, shared by client forms and server routes.
 */
import { z } from 'zod';
import { ROLES } from '../types/api';
import { isValidTimeZone } from '../workload/calendar';
import type { SubscriptionSummary } from './billing';
import type { StaffOverview } from './overview';

/** Sport focus of a club; the label is what the client shows. */
export const SPORT_FOCUSES = [
  'multi-sport',
  'rugby',
  'american-football',
  'australian-football',
  'gaelic-games',
  'soccer',
  'baseball-softball',
  'cricket',
  'athletics-throws',
  'volleyball',
  'other',
] as const;
export type SportFocus = (typeof SPORT_FOCUSES)[number];
export const SPORT_FOCUS_LABELS: Record<SportFocus, string> = {
  'multi-sport': 'Multi-sport',
  rugby: 'Rugby',
  'american-football': 'American football',
  'australian-football': 'Australian football',
  'gaelic-games': 'Gaelic games',
  soccer: 'Soccer',
  'baseball-softball': 'Baseball and softball',
  cricket: 'Cricket',
  'athletics-throws': 'Athletics throws',
  volleyball: 'Volleyball',
  other: 'Other',
};

export const UNITS = ['metric', 'imperial'] as const;
export type Units = (typeof UNITS)[number];

export const DOMINANT_SIDES = ['left', 'right', 'both'] as const;
export type DominantSide = (typeof DOMINANT_SIDES)[number];

export const sportFocusSchema = z.enum(SPORT_FOCUSES, {
  error: `Pick a sport focus from the list (${SPORT_FOCUSES.join(', ')}).`,
});
export const unitsSchema = z.enum(UNITS, { error: 'Pick metric or imperial units.' });
export const roleSchema = z.enum(ROLES, { error: 'Pick a role: admin, coach or athlete.' });

export const clubUpdateSchema = z
  .object({
    name: z
      .string({ error: 'Enter the club name.' })
      .trim()
      .min(2, { error: 'Enter the club name (at least 2 characters).' })
      .max(120, { error: 'Keep the club name to 120 characters or fewer.' })
      .optional(),
    sportFocus: sportFocusSchema.optional(),
    units: unitsSchema.optional(),
    timeZone: z
      .string({ error: 'Enter the time zone as a name such as Europe/Berlin or America/Chicago.' })
      .trim()
      .refine(isValidTimeZone, { error: 'That time zone is not known. Pick one from the list, such as Europe/Berlin, Asia/Tokyo or UTC.' })
      .optional(),
  })
  .strict()
  .refine((body) => Object.keys(body).length > 0, { error: 'Change at least one of name, sport focus, units or time zone.' });
export type ClubUpdateBody = z.infer<typeof clubUpdateSchema>;

export const memberRoleSchema = z.object({ role: roleSchema }).strict();
export type MemberRoleBody = z.infer<typeof memberRoleSchema>;

const thisYear = new Date().getFullYear();

const athleteFields = {
  displayName: z
    .string({ error: 'Enter the athlete’s name.' })
    .trim()
    .min(1, { error: 'Enter the athlete’s name.' })
    .max(80, { error: 'Keep the name to 80 characters or fewer.' }),
  birthYear: z
    .number({ error: 'Enter the birth year as a number, such as 2009.' })
    .int({ error: 'Enter the birth year as a whole number, such as 2009.' })
    .min(1900, { error: 'Enter a birth year from 1900 on.' })
    .max(thisYear, { error: `Enter a birth year no later than ${thisYear}.` })
    .nullable(),
  dominantSide: z.enum(DOMINANT_SIDES, { error: 'Pick the dominant side: left, right or both.' }).nullable(),
  position: z
    .string({ error: 'Enter the position or event as text.' })
    .trim()
    .max(80, { error: 'Keep the position or event to 80 characters or fewer.' })
    .nullable(),
  releaseHeightM: z
    .number({ error: 'Enter the release height as a number of metres, such as 2.1.' })
    .min(0, { error: 'The release height cannot be below the ground: enter 0 or more metres.' })
    .max(5, { error: 'The release height must be at most 5 m: enter it in metres (a 2.1 m release is 2.1).' })
    .nullable(),
  userId: z
    .number({ error: 'Pick the member to link, or leave it empty.' })
    .int({ error: 'Pick the member to link, or leave it empty.' })
    .positive({ error: 'Pick the member to link, or leave it empty.' })
    .nullable(),
};

export const athleteCreateSchema = z
  .object({
    displayName: athleteFields.displayName,
    birthYear: athleteFields.birthYear.optional(),
    dominantSide: athleteFields.dominantSide.optional(),
    position: athleteFields.position.optional(),
    releaseHeightM: athleteFields.releaseHeightM.optional(),
    userId: athleteFields.userId.optional(),
  })
  .strict();
export type AthleteCreateBody = z.infer<typeof athleteCreateSchema>;

export const athleteUpdateSchema = z
  .object({
    displayName: athleteFields.displayName.optional(),
    birthYear: athleteFields.birthYear.optional(),
    dominantSide: athleteFields.dominantSide.optional(),
    position: athleteFields.position.optional(),
    releaseHeightM: athleteFields.releaseHeightM.optional(),
    userId: athleteFields.userId.optional(),
  })
  .strict()
  .refine((body) => Object.keys(body).length > 0, { error: 'Change at least one field of the athlete profile.' });
export type AthleteUpdateBody = z.infer<typeof athleteUpdateSchema>;

// Response shapes of the club endpoints (the request shapes are the schemas above).

export interface ClubProfile {
  id: number;
  name: string;
  sportFocus: SportFocus;
  units: Units;
  /** IANA time zone that decides the club's days and weeks (workload counts). */
  timeZone: string;
  /** Conditions used when a session gives none (SI units); null until the club sets them. */
  defaultConditions: Record<string, number> | null;
  /** The subscription state every member sees (banner, recording allowed); sent by `GET /clubs/:clubId`. */
  subscription?: SubscriptionSummary;
}

export interface MemberSummary {
  /** The membership id, used in `/members/:memberId`. */
  id: number;
  userId: number;
  displayName: string;
  email: string;
  role: (typeof ROLES)[number];
  athleteProfileId: number | null;
}

export interface AthleteProfileSummary {
  id: number;
  displayName: string;
  birthYear: number | null;
  dominantSide: DominantSide | null;
  position: string | null;
  /** Usual release height of the athlete's throws (m), offered for their flights; null when not known. */
  releaseHeightM: number | null;
  userId: number | null;
}

export interface ClubOverview {
  club: { id: number; name: string; sportFocus: SportFocus; units: Units };
  role: (typeof ROLES)[number];
  /**
   * Counts shown on the Overview. `members`, `admins`, `coaches`, `athletes` count memberships;
   * `athleteProfiles` counts profiles (an athlete sees only their own); each further resource adds its own key.
   */
  counts: { members: number; admins: number; coaches: number; athletes: number; athleteProfiles: number } & Record<string, number>;
  /** The coach's start of the day; null for athletes (their landing page is My flights). */
  staff: StaffOverview | null;
}
