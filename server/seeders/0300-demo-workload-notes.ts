/**
 * Demo workload and notes of "Fennick Vale Sporting Club": the club's time zone, its caution thresholds,
 * reps entered this week for the youngest athlete so that one youth is over a caution, and coach notes on
 * flights and on the latest session, some shared with the athlete.
 *
 * The athletes, flights and sessions are found by query (the youngest profile, the first flights of a
 * profile, the latest session), never by id, so the seeder works however large the demo club has grown.
 * Idempotent: each part is added only when it is missing.
 * The threshold numbers are the invented demo club's own settings, not a recommendation of any kind.
 */
import { Op, type Transaction } from 'sequelize';
import { addDays, localDay, weekStart } from '../../shared/workload/calendar';
import { ageBandOf, YOUTH_MAX_AGE, type AgeBand } from '../../shared/workload/cautions';
import { AthleteProfile, Clip, CoachNote, Flight, Session, User, WorkloadEntry, WorkloadThreshold } from '../models';
import { DEMO_USERS } from './0001-demo-club';
import { demoClub } from './0002-demo-flights';

const DEMO_TIME_ZONE = 'Europe/London';

/** The demo club's thresholds for the actions its youths throw and kick (invented for the demo). */
const DEMO_THRESHOLDS: { action: string; ageBand: AgeBand; dailyMax: number | null; weeklyMax: number | null }[] = [
  { action: 'punt', ageBand: '15-16', dailyMax: 30, weeklyMax: 90 },
  { action: 'punt', ageBand: '17-18', dailyMax: 40, weeklyMax: 120 },
  { action: 'long_throw', ageBand: '15-16', dailyMax: 25, weeklyMax: 75 },
  { action: 'long_throw', ageBand: '17-18', dailyMax: 35, weeklyMax: 100 },
  { action: 'drop_kick', ageBand: '15-16', dailyMax: 30, weeklyMax: 90 },
  { action: 'drop_kick', ageBand: '17-18', dailyMax: 40, weeklyMax: 120 },
];

/** Marks the seeded entry, so a later run finds it instead of adding another. */
const ENTRY_NOTE = 'Field practice, not filmed';

const FLIGHT_NOTES: { who: 'youngest' | 'signed-in'; body: string; visibility: 'staff' | 'shared' }[] = [
  { who: 'signed-in', body: 'Lovely high contact point on this one. Keep the plant foot this close next time.', visibility: 'shared' },
  { who: 'signed-in', body: 'Release drifts late when tired; watch the last reps of a set.', visibility: 'staff' },
  { who: 'youngest', body: 'Good rhythm. Take the rest day after a heavy week, as we agreed.', visibility: 'shared' },
];

const SESSION_NOTES: { body: string; visibility: 'staff' | 'shared' }[] = [
  { body: 'Wind freshened after the first half hour; later flights carried less into it.', visibility: 'shared' },
  { body: 'Camera two was knocked at the break: recheck its calibration before fitting.', visibility: 'staff' },
];

export async function seed(transaction: Transaction): Promise<string> {
  const club = await demoClub(transaction);
  if (!club) return 'no demo club, no workload or notes';
  const done: string[] = [];

  if (club.timeZone === 'UTC') {
    club.timeZone = DEMO_TIME_ZONE;
    await club.save({ transaction });
    done.push(`time zone ${DEMO_TIME_ZONE}`);
  }

  if ((await WorkloadThreshold.count({ where: { clubId: club.id }, transaction })) === 0) {
    await WorkloadThreshold.bulkCreate(
      DEMO_THRESHOLDS.map((t) => ({ clubId: club.id, ...t })),
      { transaction },
    );
    done.push(`${DEMO_THRESHOLDS.length} caution thresholds`);
  }

  const today = localDay(new Date(), club.timeZone);
  const year = Number(today.slice(0, 4));
  const youngest = await AthleteProfile.findOne({
    where: { clubId: club.id, birthYear: { [Op.gte]: year - YOUTH_MAX_AGE } },
    order: [['birthYear', 'DESC'], ['id', 'ASC']],
    transaction,
  });
  const band = youngest ? ageBandOf(youngest.birthYear, year) : null;
  const threshold = DEMO_THRESHOLDS.find((t) => t.ageBand === band && t.dailyMax !== null);
  if (youngest && threshold) {
    const thisWeek = await WorkloadEntry.count({
      where: { clubId: club.id, athleteProfileId: youngest.id, note: ENTRY_NOTE, day: { [Op.between]: [weekStart(today), addDays(weekStart(today), 6)] } },
      transaction,
    });
    if (thisWeek === 0) {
      await WorkloadEntry.create(
        { clubId: club.id, athleteProfileId: youngest.id, action: threshold.action, day: today, count: (threshold.dailyMax as number) + 6, note: ENTRY_NOTE, createdByUserId: null },
        { transaction },
      );
      done.push(`${youngest.displayName} over the ${threshold.action} caution today`);
    }
  } else {
    done.push('no youth with a threshold band, so no caution seeded');
  }

  const coach = await User.findOne({ where: { email: DEMO_USERS[1]!.email }, transaction });
  const signedIn = await User.findOne({ where: { email: DEMO_USERS[2]!.email }, transaction });
  const signedInProfile = signedIn ? await AthleteProfile.findOne({ where: { clubId: club.id, userId: signedIn.id }, transaction }) : null;
  let notes = 0;
  for (const n of FLIGHT_NOTES) {
    const profile = n.who === 'youngest' ? youngest : signedInProfile;
    if (!profile) continue;
    if (await CoachNote.findOne({ where: { clubId: club.id, body: n.body }, transaction })) continue;
    const flight = await Flight.findOne({ where: { clubId: club.id, athleteProfileId: profile.id }, order: [['id', 'ASC']], transaction });
    if (!flight) continue;
    await CoachNote.create({ clubId: club.id, flightId: flight.id, sessionId: null, authorUserId: coach?.id ?? null, body: n.body, visibility: n.visibility }, { transaction });
    notes += 1;
  }
  const latest = await Session.findOne({
    where: { clubId: club.id },
    include: [{ model: Clip, as: 'clips', required: true, attributes: ['id'] }],
    order: [['date', 'DESC'], ['id', 'DESC']],
    transaction,
  });
  for (const n of SESSION_NOTES) {
    if (!latest) break;
    if (await CoachNote.findOne({ where: { clubId: club.id, body: n.body }, transaction })) continue;
    await CoachNote.create({ clubId: club.id, flightId: null, sessionId: latest.id, authorUserId: coach?.id ?? null, body: n.body, visibility: n.visibility }, { transaction });
    notes += 1;
  }
  if (notes > 0) done.push(`${notes} coach notes`);

  return done.length > 0 ? done.join(', ') : 'workload and notes already present';
}
