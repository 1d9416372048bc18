/**
 * Calendar days and ISO 8601 weeks in a club's IANA time zone. A day is a `YYYY-MM-DD` string of the
 * club's local calendar; weeks run Monday to Sunday and are numbered as ISO 8601 does (the week holding
 * the year's first Thursday is week 1). Pure functions on the platform's `Intl`: no DOM, no Node APIs.
 */

/** The zone a club gets until its admin sets one. */
export const DEFAULT_TIME_ZONE = 'UTC';

/** True when `Intl` knows the zone name (e.g. `Europe/Berlin`, `Asia/Tokyo`, `UTC`). */
export function isValidTimeZone(zone: string): boolean {
  if (!zone || zone.length > 64) return false;
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

const formatters = new Map<string, Intl.DateTimeFormat>();

/** The calendar day (`YYYY-MM-DD`) that the instant falls on in the zone. */
export function localDay(instant: Date, zone: string): string {
  let f = formatters.get(zone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-CA', { timeZone: zone, year: 'numeric', month: '2-digit', day: '2-digit' });
    formatters.set(zone, f);
  }
  const parts = Object.fromEntries(f.formatToParts(instant).map((p) => [p.type, p.value]));
  return `${parts.year}-${parts.month}-${parts.day}`;
}

/** Days as UTC midnights, so day arithmetic never meets a daylight-saving shift. */
function toUtc(day: string): Date {
  const [y, m, d] = day.split('-').map(Number);
  return new Date(Date.UTC(y!, m! - 1, d!));
}

function fromUtc(date: Date): string {
  return date.toISOString().slice(0, 10);
}

/** The day `n` days after `day` (negative: before). */
export function addDays(day: string, n: number): string {
  const d = toUtc(day);
  d.setUTCDate(d.getUTCDate() + n);
  return fromUtc(d);
}

/** The Monday that starts the ISO week holding `day`. */
export function weekStart(day: string): string {
  const weekday = (toUtc(day).getUTCDay() + 6) % 7; // Monday 0 … Sunday 6
  return addDays(day, -weekday);
}

/** The ISO week of `day`, as `YYYY-Www` (e.g. `2026-W01`); the year is the ISO week-numbering year. */
export function isoWeek(day: string): string {
  const thursday = toUtc(addDays(weekStart(day), 3));
  const year = thursday.getUTCFullYear();
  const firstThursday = toUtc(addDays(weekStart(`${year}-01-04`), 3));
  const week = 1 + Math.round((thursday.getTime() - firstThursday.getTime()) / (7 * 86_400_000));
  return `${year}-W${String(week).padStart(2, '0')}`;
}

/** Every day from `from` to `to`, both included. */
export function daysBetween(from: string, to: string): string[] {
  const out: string[] = [];
  for (let d = from; d <= to; d = addDays(d, 1)) out.push(d);
  return out;
}
