/**
 * Youth workload cautions: age bands, which athletes count as youths, how a count compares with the
 * club's thresholds, and the one wording of the caution every screen shows.
 * The thresholds are the club's own; Arcwright ships none, because no number here is a medical limit.
 */

/** Age reached in the current calendar year; a youth is 18 or younger by that count. */
export const YOUTH_MAX_AGE = 18;

/** Youth age bands a club may set thresholds for (age reached this calendar year). */
export const AGE_BANDS = [
  { key: 'u11', label: '10 and under', minAge: 0, maxAge: 10 },
  { key: '11-12', label: '11–12', minAge: 11, maxAge: 12 },
  { key: '13-14', label: '13–14', minAge: 13, maxAge: 14 },
  { key: '15-16', label: '15–16', minAge: 15, maxAge: 16 },
  { key: '17-18', label: '17–18', minAge: 17, maxAge: 18 },
] as const;
export type AgeBand = (typeof AGE_BANDS)[number]['key'];
export const AGE_BAND_KEYS = AGE_BANDS.map((b) => b.key) as [AgeBand, ...AgeBand[]];

/** The age an athlete born in `birthYear` reaches in `year`. */
export function ageInYear(birthYear: number, year: number): number {
  return year - birthYear;
}

/** The youth band of an athlete, or null for an adult or an unknown birth year. */
export function ageBandOf(birthYear: number | null, year: number): AgeBand | null {
  if (birthYear === null) return null;
  const age = ageInYear(birthYear, year);
  if (age > YOUTH_MAX_AGE) return null;
  return AGE_BANDS.find((b) => age >= b.minAge && age <= b.maxAge)?.key ?? null;
}

export function ageBandLabel(band: AgeBand): string {
  return AGE_BANDS.find((b) => b.key === band)?.label ?? band;
}

export type CautionPeriod = 'day' | 'week';

/** One threshold a youth went over. */
export interface WorkloadCaution {
  athleteId: number;
  action: string;
  period: CautionPeriod;
  /** The day (`YYYY-MM-DD`) or the ISO week (`YYYY-Www`) that went over. */
  when: string;
  count: number;
  limit: number;
}

/** Heading of the caution panel wherever it appears. */
export const CAUTION_TITLE = 'Workload caution';

/**
 * The caution shown beside every workload count over a threshold. Worded as the usual caution about
 * overuse injuries in young throwers; it defers to the governing body, local guidance and licensed
 * medical practice, and says plainly that the thresholds are the club's own and not medical advice.
 */
export const YOUTH_CAUTION_TEXT =
  'Young throwers and kickers who repeat the same action many times, day after day, are at risk of overuse ' +
  'injuries. This count is over a threshold your club set. Follow the workload and rest guidance of the ' +
  'athlete’s governing body and local rules, and ask a licensed medical professional about pain, soreness ' +
  'or any doubt. The club’s thresholds are a reminder, not medical advice.';

/**
 * One line naming what went over, e.g. "Punt: 34 this week (club threshold 30 a week)". Cautions are only
 * ever raised for today and this week, so the line says so in those words.
 */
export function cautionLine(c: WorkloadCaution, actionLabel: string): string {
  const period = c.period === 'day' ? 'today' : 'this week';
  return `${actionLabel}: ${c.count} ${period} (club threshold ${c.limit} a ${c.period})`;
}
