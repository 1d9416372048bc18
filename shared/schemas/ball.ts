/**
 * A club's own balls (PRODUCT.md: "clubs may add their own"), beside the catalogue of
 * `shared/physics/balls.ts`. A flight names a club ball by `club:<id>`, a catalogue ball by its id.
 */
import { z } from 'zod';

/** Prefix of a club ball's id in a flight's `ballId` (catalogue ids never contain ":"). */
export const CLUB_BALL_PREFIX = 'club:';

/** The `ballId` a flight stores for club ball `id`. */
export function clubBallId(id: number): string {
  return `${CLUB_BALL_PREFIX}${id}`;
}

/** The club ball's row id named by a flight's `ballId`, or null for a catalogue id. */
export function parseClubBallId(ballId: string): number | null {
  if (!ballId.startsWith(CLUB_BALL_PREFIX)) return null;
  const n = Number(ballId.slice(CLUB_BALL_PREFIX.length));
  return Number.isInteger(n) && n > 0 ? n : null;
}

const positive = (what: string, unit: string, max: number, example: string) =>
  z
    .number({ error: `${what} must be a number of ${unit}.` })
    .refine(Number.isFinite, { error: `${what} must be a finite number of ${unit}.` })
    .positive({ error: `${what} must be more than 0 ${unit === 'kilograms' ? 'kg' : 'm'}: ${example}.` })
    .max(max, { error: `${what} must be at most ${max} ${unit === 'kilograms' ? 'kg' : 'm'}: ${example}.` });

const cd = (what: string) =>
  z
    .number({ error: `${what} must be a number.` })
    .min(0, { error: `${what} must be 0 or more.` })
    .max(2, { error: `${what} must be at most 2 (balls in play lie between about 0.1 and 0.6).` })
    .nullable()
    .optional();

const fields = {
  name: z.string({ error: 'Name is required.' }).trim().min(1, { error: 'Name is required.' }).max(60, { error: 'Name must be at most 60 characters.' }),
  massKg: positive('Mass', 'kilograms', 20, 'give it in kilograms (a 430 g ball is 0.43)'),
  diameterM: positive('Diameter', 'metres', 1, 'give it in metres (a 40 cm ball is 0.40)'),
  cdMin: cd('Lowest C_d'),
  cdMax: cd('Highest C_d'),
};

/** Both ends of the C_d range or neither, and the lower one first. */
function cdRangeIssue(v: { cdMin?: number | null; cdMax?: number | null }): string | null {
  const lo = v.cdMin ?? null, hi = v.cdMax ?? null;
  if ((lo === null) !== (hi === null)) return 'Give both ends of the C_d range, or neither.';
  if (lo !== null && hi !== null && !(hi > lo)) return 'The highest C_d must be above the lowest.';
  return null;
}

export const clubBallInputSchema = z.object(fields).superRefine((v, ctx) => {
  const issue = cdRangeIssue(v);
  if (issue) ctx.addIssue({ code: 'custom', path: ['cdMax'], message: issue });
});
export type ClubBallInput = z.infer<typeof clubBallInputSchema>;

/** A patch; the C_d range is checked against the stored ends by the server. */
export const clubBallPatchSchema = z.object(fields).partial();
export type ClubBallPatch = z.infer<typeof clubBallPatchSchema>;
export { cdRangeIssue as clubBallCdRangeIssue };

export interface ClubBall {
  id: number;
  /** What a flight stores in `ballId`. */
  ballId: string;
  name: string;
  massKg: number;
  diameterM: number;
  cdMin: number | null;
  cdMax: number | null;
  /** Flights tagged with this ball. */
  flightCount: number;
  createdAt: string;
  updatedAt: string;
}
