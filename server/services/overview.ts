/**
 * The staff's Overview: flights needing attention, clips still processing, the latest session's best and
 * most consistent reps, youths over a workload caution, recent personal bests, and the one primary action.
 * Each part is one aggregate query (the cautions three), run side by side; nothing is read per row.
 */
import { QueryTypes } from 'sequelize';
import type {
  OverviewAttentionItem,
  OverviewConsistency,
  OverviewLatestSession,
  OverviewPersonalBest,
  OverviewProcessingClip,
  OverviewRep,
  StaffOverview,
} from '../../shared/schemas/overview';
import { sequelize } from '../db';
import { clubCautions, clubCalendar } from './workload';

const ATTENTION_SHOWN = 8;
const BESTS_SHOWN = 8;
/** Fewer fitted reps than this say nothing about consistency. */
const MIN_CONSISTENCY_REPS = 3;

/** The newest flights needing attention, picked first by the index and joined after (not joined, then sorted). */
async function attention(clubId: number): Promise<StaffOverview['attention']> {
  const rows = await sequelize.query<OverviewAttentionItem & { total: number | string; updatedAt: Date }>(
    `SELECT f.id AS flightId, f.clip_id AS clipId, c.session_id AS sessionId, a.display_name AS athleteName, f.action,
            COALESCE(f.attention_reason, '') AS reason, f.updated_at AS updatedAt,
            (SELECT COUNT(*) FROM flights n WHERE n.club_id = :clubId AND n.status = 'needs_attention') AS total
       FROM (SELECT p.id FROM flights p WHERE p.club_id = :clubId AND p.status = 'needs_attention' ORDER BY p.updated_at DESC, p.id DESC LIMIT ${ATTENTION_SHOWN}) shown
       JOIN flights f ON f.id = shown.id JOIN clips c ON c.id = f.clip_id JOIN athlete_profiles a ON a.id = f.athlete_profile_id
      ORDER BY f.updated_at DESC, f.id DESC`,
    { type: QueryTypes.SELECT, replacements: { clubId } },
  );
  return {
    total: Number(rows[0]?.total ?? 0),
    items: rows.map((r) => ({
      flightId: Number(r.flightId),
      clipId: Number(r.clipId),
      sessionId: Number(r.sessionId),
      athleteName: r.athleteName,
      action: r.action,
      reason: r.reason || 'The fit asked for a look at this flight.',
      updatedAt: new Date(r.updatedAt).toISOString(),
    })),
  };
}

async function processing(clubId: number): Promise<OverviewProcessingClip[]> {
  const rows = await sequelize.query<{ clipId: number; sessionId: number; label: string; progress: number | null; jobStatus: string | null }>(
    `SELECT c.id AS clipId, c.session_id AS sessionId, c.label, j.progress, j.status AS jobStatus
       FROM clips c
       LEFT JOIN jobs j ON j.id = (SELECT MAX(lj.id) FROM jobs lj WHERE lj.clip_id = c.id AND lj.type = 'clip.process')
      WHERE c.club_id = :clubId AND c.status = 'processing'
      ORDER BY c.id ASC LIMIT 20`,
    { type: QueryTypes.SELECT, replacements: { clubId } },
  );
  return rows.map((r) => ({
    clipId: Number(r.clipId),
    sessionId: Number(r.sessionId),
    label: r.label,
    progress: r.jobStatus === 'running' || r.jobStatus === 'succeeded' ? Math.min(100, Math.max(0, Number(r.progress ?? 0))) : null,
  }));
}

function mean(xs: number[]): number {
  return xs.reduce((a, b) => a + b, 0) / xs.length;
}

/** Sample standard deviation (n − 1). */
function sd(xs: number[]): number {
  const m = mean(xs);
  return Math.sqrt(xs.reduce((a, x) => a + (x - m) ** 2, 0) / (xs.length - 1));
}

/** The group (athlete and action) whose launch speed varied least, relative to its mean. */
function mostConsistent(reps: (OverviewRep & { athleteId: number })[]): OverviewConsistency | null {
  const groups = new Map<string, (OverviewRep & { athleteId: number })[]>();
  for (const r of reps) {
    if (r.launchSpeedMps === null || r.launchAngleDeg === null) continue;
    const key = `${r.athleteId}|${r.action}`;
    groups.set(key, [...(groups.get(key) ?? []), r]);
  }
  let best: (OverviewConsistency & { cv: number }) | null = null;
  for (const group of groups.values()) {
    if (group.length < MIN_CONSISTENCY_REPS) continue;
    const speeds = group.map((r) => r.launchSpeedMps as number);
    const angles = group.map((r) => r.launchAngleDeg as number);
    const m = mean(speeds);
    const s = sd(speeds);
    const cv = s / m;
    if (best === null || cv < best.cv) {
      best = { athleteName: group[0]!.athleteName, action: group[0]!.action, reps: group.length, launchSpeedMeanMps: m, launchSpeedSdMps: s, launchAngleSdDeg: sd(angles), cv };
    }
  }
  if (best === null) return null;
  const { cv: _cv, ...out } = best;
  return out;
}

async function latestSession(clubId: number, today: string): Promise<OverviewLatestSession | null> {
  const rows = await sequelize.query<{
    sessionId: number;
    date: string;
    venue: string;
    flightId: number | null;
    athleteId: number | null;
    athleteName: string | null;
    action: string | null;
    fitStatus: string | null;
    launchSpeedMps: number | null;
    launchAngleDeg: number | null;
    standardCarryM: number | null;
  }>(
    `SELECT s.id AS sessionId, DATE_FORMAT(s.date, '%Y-%m-%d') AS date, s.venue, f.id AS flightId, f.athlete_profile_id AS athleteId,
            a.display_name AS athleteName, f.action, ft.status AS fitStatus, ft.launch_speed_mps AS launchSpeedMps,
            ft.launch_angle_deg AS launchAngleDeg, ft.standard_carry_m AS standardCarryM
       FROM (SELECT id, date, venue FROM sessions WHERE club_id = :clubId AND date <= :today ORDER BY date DESC, id DESC LIMIT 1) s
       LEFT JOIN clips c ON c.session_id = s.id
       LEFT JOIN flights f ON f.clip_id = c.id
       LEFT JOIN athlete_profiles a ON a.id = f.athlete_profile_id
       LEFT JOIN fits ft ON ft.id = f.latest_fit_id`,
    { type: QueryTypes.SELECT, replacements: { clubId, today } },
  );
  const first = rows[0];
  if (!first) return null;
  const flights = rows.filter((r) => r.flightId !== null);
  const reps = flights
    .filter((r) => r.fitStatus === 'fitted')
    .map((r) => ({
      flightId: Number(r.flightId),
      athleteId: Number(r.athleteId),
      athleteName: r.athleteName ?? '',
      action: r.action ?? '',
      launchSpeedMps: r.launchSpeedMps === null ? null : Number(r.launchSpeedMps),
      launchAngleDeg: r.launchAngleDeg === null ? null : Number(r.launchAngleDeg),
      standardCarryM: r.standardCarryM === null ? null : Number(r.standardCarryM),
    }));
  const withCarry = reps.filter((r) => r.standardCarryM !== null).sort((a, b) => (b.standardCarryM as number) - (a.standardCarryM as number));
  const top = withCarry[0];
  return {
    id: Number(first.sessionId),
    date: first.date,
    venue: first.venue,
    flightCount: flights.length,
    fittedCount: reps.length,
    best: top ? { flightId: top.flightId, athleteName: top.athleteName, action: top.action, launchSpeedMps: top.launchSpeedMps, launchAngleDeg: top.launchAngleDeg, standardCarryM: top.standardCarryM } : null,
    mostConsistent: mostConsistent(reps),
  };
}

/** Each athlete's best standard-conditions carry per action among fitted flights, the most recently set first. */
export async function personalBests(clubId: number, athleteId: number | null, limit: number): Promise<OverviewPersonalBest[]> {
  const onlyAthlete = athleteId === null ? '' : 'AND f.athlete_profile_id = :athleteId';
  const rows = await sequelize.query<OverviewPersonalBest & { rn: number }>(
    `SELECT * FROM (
       SELECT f.athlete_profile_id AS athleteId, a.display_name AS athleteName, f.action, f.id AS flightId,
              ft.standard_carry_m AS standardCarryM, DATE_FORMAT(s.date, '%Y-%m-%d') AS day,
              ROW_NUMBER() OVER (PARTITION BY f.athlete_profile_id, f.action ORDER BY ft.standard_carry_m DESC, f.id ASC) AS rn
         FROM flights f
         JOIN fits ft ON ft.id = f.latest_fit_id
         JOIN clips c ON c.id = f.clip_id
         JOIN sessions s ON s.id = c.session_id
         JOIN athlete_profiles a ON a.id = f.athlete_profile_id
        WHERE f.club_id = :clubId AND ft.status = 'fitted' AND ft.standard_carry_m IS NOT NULL
          AND f.status IN ('fitted', 'reviewed') ${onlyAthlete}
     ) t WHERE t.rn = 1 ORDER BY t.day DESC, t.flightId DESC LIMIT ${Number(limit)}`,
    { type: QueryTypes.SELECT, replacements: { clubId, athleteId } },
  );
  return rows.map((r) => ({
    athleteId: Number(r.athleteId),
    athleteName: r.athleteName,
    action: r.action,
    flightId: Number(r.flightId),
    standardCarryM: Number(r.standardCarryM),
    day: r.day,
  }));
}

/**
 * The club's flights, fits, profiles and sessions as one change marker: any write that can move a personal
 * best (a new fit, a flight added, removed, retagged or reviewed, an athlete renamed, a session redated) changes it.
 */
async function bestsVersion(clubId: number, bests: OverviewPersonalBest[] | null): Promise<string> {
  // Every marker is one index step (no count over the club's flights): a flight added, retagged or reviewed
  // moves the newest updated_at, a new fit the newest fit id, and a deleted flight matters only when it held
  // one of the bests shown, which the count of those flights still present tells.
  const shown = (bests ?? []).map((b) => b.flightId);
  const [row] = await sequelize.query<Record<string, unknown>>(
    `SELECT (SELECT MAX(id) FROM fits WHERE club_id = :clubId) AS fitMax,
            (SELECT MAX(updated_at) FROM flights WHERE club_id = :clubId) AS flightsAt,
            (SELECT MAX(id) FROM flights WHERE club_id = :clubId) AS flightMax,
            ${shown.length > 0 ? '(SELECT COUNT(*) FROM flights WHERE id IN (:shown))' : '0'} AS shownLeft,
            (SELECT MAX(updated_at) FROM athlete_profiles WHERE club_id = :clubId) AS athletesAt,
            (SELECT MAX(updated_at) FROM sessions WHERE club_id = :clubId) AS sessionsAt`,
    { type: QueryTypes.SELECT, replacements: { clubId, shown } },
  );
  return JSON.stringify({ ...row, shown });
}

const BESTS_CACHE_CLUBS = 500;
const bestsCache = new Map<number, { version: string; bests: OverviewPersonalBest[] }>();

/**
 * The club's recent personal bests, recomputed only when the club's data changed since the last Overview.
 * Note: finding the best of every athlete and action reads the newest fit of every flight, tens of
 * milliseconds at 10,000 flights on a 2-core machine; the change marker costs a few index steps, and each app
 * process keeps its own copy, which is right because the marker is read from the shared database every time.
 */
async function clubPersonalBests(clubId: number): Promise<OverviewPersonalBest[]> {
  const hit = bestsCache.get(clubId);
  if (hit && hit.version === (await bestsVersion(clubId, hit.bests))) return hit.bests;
  const bests = await personalBests(clubId, null, BESTS_SHOWN);
  const version = await bestsVersion(clubId, bests);
  bestsCache.delete(clubId);
  bestsCache.set(clubId, { version, bests });
  if (bestsCache.size > BESTS_CACHE_CLUBS) bestsCache.delete(bestsCache.keys().next().value as number);
  return bests;
}

export async function getStaffOverview(clubId: number, now = new Date()): Promise<StaffOverview> {
  const cal = await clubCalendar(clubId, now);
  const [attentionPart, processingPart, latest, cautions, bests] = await Promise.all([
    attention(clubId),
    processing(clubId),
    latestSession(clubId, cal.today),
    clubCautions(clubId, now, cal),
    clubPersonalBests(clubId),
  ]);
  return {
    today: cal.today,
    attention: attentionPart,
    processing: processingPart,
    latestSession: latest,
    cautions,
    personalBests: bests,
    primaryAction: latest && latest.date === cal.today ? { kind: 'upload', sessionId: latest.id, venue: latest.venue } : { kind: 'new-session' },
  };
}
