/**
 * Workload counts of throws and kicks per athlete, day and ISO week, by action: every flight recorded
 * (on its session's day) plus the reps a coach entered for what was not filmed. Days and weeks are the
 * club's own, in its IANA time zone. Youths over one of the club's thresholds get a caution.
 */
import { Op, QueryTypes } from 'sequelize';
import type {
  AthleteCaution,
  AthleteWorkload,
  WorkloadCount,
  WorkloadEntry as WorkloadEntryDto,
  WorkloadEntryInput,
  WorkloadThreshold as WorkloadThresholdDto,
  WorkloadThresholdInput,
} from '../../shared/schemas/workload';
import { addDays, daysBetween, isoWeek, localDay, weekStart } from '../../shared/workload/calendar';
import { ageBandOf, YOUTH_MAX_AGE, type AgeBand, type WorkloadCaution } from '../../shared/workload/cautions';
import { sequelize, withTransaction } from '../db';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { AthleteProfile, Club, FlightAction, WorkloadEntry, WorkloadThreshold } from '../models';
import { ensureDefaultActions } from './flights';

/** The club's time zone and what today and this week are there. */
export interface ClubCalendar {
  timeZone: string;
  today: string;
  weekStart: string;
  week: string;
  year: number;
}

export async function clubCalendar(clubId: number, now = new Date()): Promise<ClubCalendar> {
  const club = await Club.findByPk(clubId, { attributes: ['id', 'timeZone'] });
  if (!club) throw notFound('club');
  const today = localDay(now, club.timeZone);
  return { timeZone: club.timeZone, today, weekStart: weekStart(today), week: isoWeek(today), year: Number(today.slice(0, 4)) };
}

interface CountRow {
  athleteId: number;
  action: string;
  day: string;
  flights: number;
  entered: number;
}

/**
 * Counts per athlete, action and day from `from` to `to` (club-local days, both included), in one query:
 * flights by their session's day, and entered reps by their day.
 */
async function dailyCounts(clubId: number, from: string, to: string, athleteIds?: number[]): Promise<CountRow[]> {
  if (athleteIds && athleteIds.length === 0) return [];
  const onlyFlights = athleteIds ? 'AND f.athlete_profile_id IN (:athleteIds)' : '';
  const onlyEntries = athleteIds ? 'AND e.athlete_profile_id IN (:athleteIds)' : '';
  const rows = await sequelize.query<{ athleteId: number; action: string; day: string; flights: number | string; entered: number | string }>(
    `SELECT t.athlete_id AS athleteId, t.action, t.day, SUM(t.flights) AS flights, SUM(t.entered) AS entered FROM (
       SELECT f.athlete_profile_id AS athlete_id, f.action, DATE_FORMAT(s.date, '%Y-%m-%d') AS day, COUNT(*) AS flights, 0 AS entered
         FROM sessions s JOIN clips c ON c.session_id = s.id JOIN flights f ON f.clip_id = c.id
        WHERE s.club_id = :clubId AND s.date BETWEEN :from AND :to ${onlyFlights}
        GROUP BY f.athlete_profile_id, f.action, s.date
       UNION ALL
       SELECT e.athlete_profile_id, e.action, DATE_FORMAT(e.day, '%Y-%m-%d'), 0, SUM(e.count)
         FROM workload_entries e
        WHERE e.club_id = :clubId AND e.day BETWEEN :from AND :to ${onlyEntries}
        GROUP BY e.athlete_profile_id, e.action, e.day
     ) t GROUP BY t.athlete_id, t.action, t.day`,
    { type: QueryTypes.SELECT, replacements: { clubId, from, to, athleteIds: athleteIds ?? [] } },
  );
  return rows.map((r) => ({ athleteId: Number(r.athleteId), action: r.action, day: r.day, flights: Number(r.flights), entered: Number(r.entered) }));
}

/** Sums count rows into one count per key (a day or an ISO week). */
function sumBy(rows: CountRow[], keyOf: (row: CountRow) => string, keys: string[]): WorkloadCount[] {
  const byKey = new Map<string, WorkloadCount>(keys.map((key) => [key, { key, byAction: {}, total: 0 }]));
  for (const row of rows) {
    const count = byKey.get(keyOf(row));
    if (!count) continue;
    const cell = (count.byAction[row.action] ??= { flights: 0, entered: 0, total: 0 });
    cell.flights += row.flights;
    cell.entered += row.entered;
    cell.total += row.flights + row.entered;
    count.total += row.flights + row.entered;
  }
  return [...byKey.values()];
}

function toThresholdDto(t: WorkloadThreshold): WorkloadThresholdDto {
  return { action: t.action, ageBand: t.ageBand, dailyMax: t.dailyMax ?? null, weeklyMax: t.weeklyMax ?? null };
}

/**
 * The thresholds a youth's counts of today and this week go over. `rows` are the athlete's counts of
 * (at least) this week. Strictly over: a count equal to the threshold is not a caution.
 */
export function cautionsFor(athleteId: number, band: AgeBand | null, thresholds: WorkloadThresholdDto[], rows: CountRow[], cal: ClubCalendar): WorkloadCaution[] {
  if (band === null) return [];
  const out: WorkloadCaution[] = [];
  const weekEnd = addDays(cal.weekStart, 6);
  for (const t of thresholds) {
    if (t.ageBand !== band) continue;
    const mine = rows.filter((r) => r.athleteId === athleteId && r.action === t.action);
    const today = mine.filter((r) => r.day === cal.today).reduce((n, r) => n + r.flights + r.entered, 0);
    const week = mine.filter((r) => r.day >= cal.weekStart && r.day <= weekEnd).reduce((n, r) => n + r.flights + r.entered, 0);
    if (t.dailyMax !== null && today > t.dailyMax) out.push({ athleteId, action: t.action, period: 'day', when: cal.today, count: today, limit: t.dailyMax });
    if (t.weeklyMax !== null && week > t.weeklyMax) out.push({ athleteId, action: t.action, period: 'week', when: cal.week, count: week, limit: t.weeklyMax });
  }
  return out;
}

export async function listThresholds(clubId: number): Promise<WorkloadThresholdDto[]> {
  const rows = await WorkloadThreshold.findAll({ where: { clubId }, order: [['action', 'ASC'], ['ageBand', 'ASC']] });
  return rows.map(toThresholdDto);
}

/** Every youth of the club over a threshold today or this week, with their name (staff only). Three queries. */
export async function clubCautions(clubId: number, now = new Date(), calendar?: ClubCalendar): Promise<AthleteCaution[]> {
  const cal = calendar ?? (await clubCalendar(clubId, now));
  const thresholds = await listThresholds(clubId);
  if (thresholds.length === 0) return [];
  const youths = await AthleteProfile.findAll({
    where: { clubId, birthYear: { [Op.gte]: cal.year - YOUTH_MAX_AGE } },
    attributes: ['id', 'displayName', 'birthYear'],
    order: [['displayName', 'ASC']],
  });
  const rows = await dailyCounts(clubId, cal.weekStart, addDays(cal.weekStart, 6), youths.map((y) => y.id));
  return youths
    .map((y) => ({ athleteId: y.id, athleteName: y.displayName, cautions: cautionsFor(y.id, ageBandOf(y.birthYear, cal.year), thresholds, rows, cal) }))
    .filter((a) => a.cautions.length > 0);
}

/** The athlete's profile if the caller may see it (an athlete: only their own), else 404. */
async function visibleAthlete(club: ClubContext, athleteId: number): Promise<AthleteProfile> {
  if (club.role === 'athlete' && club.athleteProfileId !== athleteId) throw notFound('athlete');
  const profile = await AthleteProfile.findOne({ where: { id: athleteId, clubId: club.id } });
  if (!profile) throw notFound('athlete');
  return profile;
}

function toEntryDto(e: WorkloadEntry): WorkloadEntryDto {
  return { id: e.id, athleteId: e.athleteProfileId, action: e.action, day: e.day, count: e.count, note: e.note ?? null, createdAt: e.createdAt.toISOString() };
}

/** Daily and weekly counts of one athlete over the last `weeks` ISO weeks (this one included), with thresholds and cautions. */
export async function athleteWorkload(club: ClubContext, athleteId: number, weeks: number, now = new Date()): Promise<AthleteWorkload> {
  const profile = await visibleAthlete(club, athleteId);
  const cal = await clubCalendar(club.id, now);
  const from = addDays(cal.weekStart, -7 * (weeks - 1));
  const to = addDays(cal.weekStart, 6);
  const [rows, allThresholds, entries] = await Promise.all([
    dailyCounts(club.id, from, to, [profile.id]),
    listThresholds(club.id),
    WorkloadEntry.findAll({ where: { clubId: club.id, athleteProfileId: profile.id, day: { [Op.between]: [from, to] } }, order: [['day', 'DESC'], ['id', 'DESC']] }),
  ]);
  const band = ageBandOf(profile.birthYear, cal.year);
  const thresholds = band === null ? [] : allThresholds.filter((t) => t.ageBand === band);
  const days = daysBetween(from, to);
  const weekKeys = [...new Set(days.map(isoWeek))];
  return {
    athleteId: profile.id,
    timeZone: cal.timeZone,
    today: cal.today,
    week: cal.week,
    ageBand: band,
    days: sumBy(rows, (r) => r.day, days),
    weeks: sumBy(rows, (r) => isoWeek(r.day), weekKeys),
    thresholds,
    cautions: cautionsFor(profile.id, band, thresholds, rows, cal),
    entries: entries.map(toEntryDto),
  };
}

/** The club's action keys (archived ones too: old reps keep their tag). */
async function actionKeys(clubId: number): Promise<Set<string>> {
  await ensureDefaultActions(clubId);
  return new Set((await FlightAction.findAll({ where: { clubId }, attributes: ['key'] })).map((a) => a.key));
}

function unknownAction(key: string, field: string): ApiError {
  return new ApiError('VALIDATION_FAILED', `"${key}" is not an action of this club. Pick one from the club’s action list.`, { [field]: 'Pick an action from the list.' });
}

export async function createEntry(club: ClubContext, userId: number, input: WorkloadEntryInput, now = new Date()): Promise<WorkloadEntryDto> {
  const profile = await AthleteProfile.findOne({ where: { id: input.athleteId, clubId: club.id }, attributes: ['id'] });
  if (!profile) throw new ApiError('VALIDATION_FAILED', 'That athlete is not in this club. Pick an athlete from the squad.', { athleteId: 'Pick an athlete from the squad.' });
  if (!(await actionKeys(club.id)).has(input.action)) throw unknownAction(input.action, 'action');
  const cal = await clubCalendar(club.id, now);
  const day = input.day ?? cal.today;
  if (day > cal.today) {
    throw new ApiError('VALIDATION_FAILED', `The day ${day} is after today (${cal.today} in the club’s time zone). Enter reps once they are done.`, { day: 'Pick today or an earlier day.' });
  }
  const entry = await WorkloadEntry.create({ clubId: club.id, athleteProfileId: profile.id, action: input.action, day, count: input.count, note: input.note ?? null, createdByUserId: userId });
  return toEntryDto(entry);
}

export async function deleteEntry(club: ClubContext, entryId: number): Promise<void> {
  const entry = await WorkloadEntry.findOne({ where: { id: entryId, clubId: club.id } });
  if (!entry) throw notFound('workload entry');
  await entry.destroy();
}

/** Replaces the club's threshold table in one transaction. */
export async function replaceThresholds(club: ClubContext, thresholds: WorkloadThresholdInput[]): Promise<WorkloadThresholdDto[]> {
  const keys = await actionKeys(club.id);
  for (const [i, t] of thresholds.entries()) if (!keys.has(t.action)) throw unknownAction(t.action, `thresholds.${i}.action`);
  await withTransaction(async (transaction) => {
    await WorkloadThreshold.destroy({ where: { clubId: club.id }, transaction });
    if (thresholds.length > 0) {
      await WorkloadThreshold.bulkCreate(
        thresholds.map((t) => ({ clubId: club.id, action: t.action, ageBand: t.ageBand, dailyMax: t.dailyMax, weeklyMax: t.weeklyMax })),
        { transaction },
      );
    }
  });
  return listThresholds(club.id);
}
