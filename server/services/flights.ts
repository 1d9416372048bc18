/**
 * Flights inside clips, and each club's action list. Coaches and admins manage them; an athlete sees
 * only their own flights (`athleteProfileId`, as `scopeAthlete()` gives it).
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { z } from 'zod';
import {
  DEFAULT_FLIGHT_ACTIONS,
  type flightActionInputSchema,
  type flightActionPatchSchema,
  type Flight as FlightDto,
  type FlightAction as FlightActionDto,
  type FitSummary,
  type FitWarning,
  type FlightDetail,
  type FlightInput,
  type FlightListQuery,
  type FlightSort,
  type FlightPatch,
  type FlightStatus,
} from '../../shared/schemas/flight';
import { pageOffset, type PageMeta } from '../../shared/schemas/pagination';
import { sequelize, withTransaction } from '../db';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import type { JobSummary } from '../../shared/schemas/clip';
import { AthleteProfile, Clip, Flight, FlightAction } from '../models';
import { checkFlightBall } from './balls';
import { currentCalibration, toCalibrationDto } from './calibration';
import { releaseOf } from './fits';
import { enqueueRefits } from './refits';
import { pointsOf } from './tracks';
import { findVisibleClip, findVisibleFlight, findVisibleFlightWithClip, flightScope } from './visibility';

/** Gives a club the default action list the first time it is needed (idempotent; the unique key absorbs races). */
export async function ensureDefaultActions(clubId: number, transaction?: Transaction): Promise<void> {
  const count = await FlightAction.count({ where: { clubId }, transaction });
  if (count > 0) return;
  const now = new Date();
  await sequelize.query(
    `INSERT IGNORE INTO flight_actions (club_id, \`key\`, label, archived, sort_order, created_at, updated_at) VALUES ${DEFAULT_FLIGHT_ACTIONS.map(() => '(?, ?, ?, 0, ?, ?, ?)').join(', ')}`,
    {
      type: QueryTypes.INSERT,
      transaction,
      replacements: DEFAULT_FLIGHT_ACTIONS.flatMap((a, i) => [clubId, a.key, a.label, (i + 1) * 10, now, now]),
    },
  );
}

function toActionDto(a: FlightAction): FlightActionDto {
  return { id: a.id, key: a.key, label: a.label, archived: a.archived, sortOrder: a.sortOrder };
}

export async function listActions(club: ClubContext): Promise<FlightActionDto[]> {
  await ensureDefaultActions(club.id);
  const actions = await FlightAction.findAll({ where: { clubId: club.id }, order: [['sortOrder', 'ASC'], ['id', 'ASC']] });
  return actions.map(toActionDto);
}

/** Makes a key from a label: "Hammer throw" → "hammer_throw". */
function keyFromLabel(label: string): string {
  const key = label
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '')
    .slice(0, 40);
  return key || 'action';
}

export async function createAction(club: ClubContext, input: z.output<typeof flightActionInputSchema>): Promise<FlightActionDto> {
  await ensureDefaultActions(club.id);
  const key = input.key ?? keyFromLabel(input.label);
  const existing = await FlightAction.findOne({ where: { clubId: club.id, key } });
  if (existing) {
    throw new ApiError('CONFLICT', `The action "${existing.label}" already uses the key "${key}". Choose another name${existing.archived ? ', or bring the archived one back' : ''}.`, {
      key: `"${key}" is taken.`,
    });
  }
  const max = (await FlightAction.max<number, FlightAction>('sortOrder', { where: { clubId: club.id } })) ?? 0;
  const created = await FlightAction.create({ clubId: club.id, key, label: input.label, sortOrder: max + 10 });
  return toActionDto(created);
}

async function findAction(club: ClubContext, actionId: number): Promise<FlightAction> {
  const action = await FlightAction.findOne({ where: { id: actionId, clubId: club.id } });
  if (!action) throw notFound('action');
  return action;
}

export async function patchAction(club: ClubContext, actionId: number, patch: z.output<typeof flightActionPatchSchema>): Promise<FlightActionDto> {
  const action = await findAction(club, actionId);
  if (patch.label !== undefined) action.label = patch.label;
  if (patch.archived !== undefined) action.archived = patch.archived;
  await action.save();
  return toActionDto(action);
}

export async function deleteAction(club: ClubContext, actionId: number): Promise<void> {
  const action = await findAction(club, actionId);
  const used = await Flight.count({ where: { clubId: club.id, action: action.key } });
  if (used > 0) {
    throw new ApiError('CONFLICT', `${used} flight${used === 1 ? ' uses' : 's use'} the action "${action.label}". Archive it instead: it then leaves the pick list but keeps those flights tagged.`);
  }
  await action.destroy();
}

async function checkAction(clubId: number, key: string, transaction?: Transaction): Promise<void> {
  await ensureDefaultActions(clubId, transaction);
  // Note: a locking read sees the rows another transaction committed meanwhile (the default list inserted by a
  // concurrent first flight of the club), which the transaction's own snapshot would not.
  const action = await FlightAction.findOne({ where: { clubId, key }, transaction, ...(transaction ? { lock: transaction.LOCK.SHARE } : {}) });
  if (!action || action.archived) {
    throw new ApiError('VALIDATION_FAILED', `"${key}" is not an action of this club. Pick one from the list, or add it under the club's actions.`, {
      action: 'Pick an action from the list.',
    });
  }
}

async function checkAthlete(clubId: number, athleteId: number, transaction?: Transaction): Promise<AthleteProfile> {
  const profile = await AthleteProfile.findOne({ where: { id: athleteId, clubId }, transaction });
  if (!profile) {
    throw new ApiError('VALIDATION_FAILED', 'That athlete is not in this club. Pick an athlete from the squad.', { athleteId: 'Pick an athlete from the squad.' });
  }
  return profile;
}

interface FlightListRow {
  id: number;
  sessionId: number;
  athleteName: string | null;
  pointCount: number;
  fitId: number | null;
  fitModel: string | null;
  fitStatus: 'fitted' | 'needs_attention' | null;
  fitCreatedAt: Date | string | null;
  fitSpeed: number | null;
  fitAngle: number | null;
  fitCarry: number | null;
  fitCd: string | number | null;
  fitCdError: string | number | null;
  fitStandardCarry: string | number | null;
  fitWarnings: string | FitWarning[] | null;
  fitReleaseMode: string | null;
  fitReleaseBackFrames: string | number | null;
}

function finiteOrNull(value: unknown): number | null {
  const n = typeof value === 'string' ? Number(value) : value;
  return typeof n === 'number' && Number.isFinite(n) ? n : null;
}

function fitSummaryOf(row: FlightListRow): FitSummary | null {
  if (row.fitId === null) return null;
  const warnings = typeof row.fitWarnings === 'string' ? (JSON.parse(row.fitWarnings) as FitWarning[]) : (row.fitWarnings ?? []);
  return {
    id: Number(row.fitId),
    model: row.fitModel ?? '',
    status: row.fitStatus ?? 'fitted',
    createdAt: new Date(row.fitCreatedAt ?? 0).toISOString(),
    launchSpeedMps: finiteOrNull(row.fitSpeed),
    launchAngleDeg: finiteOrNull(row.fitAngle),
    carryM: finiteOrNull(row.fitCarry),
    cd: finiteOrNull(row.fitCd),
    cdError: finiteOrNull(row.fitCdError),
    standardCarryM: finiteOrNull(row.fitStandardCarry),
    release: releaseOf({ mode: row.fitReleaseMode, backFrames: finiteOrNull(row.fitReleaseBackFrames) }),
    warnings,
  };
}

/** A flight's own columns, as the model or the list's query gives them. */
type FlightCore = Pick<
  Flight,
  'id' | 'clubId' | 'clipId' | 'athleteProfileId' | 'action' | 'ballId' | 'frameStart' | 'frameEnd' | 'releaseFrame' | 'releaseHeightM' | 'status' | 'attentionReason' | 'notes'
> & { createdAt: Date | string; updatedAt: Date | string };

/**
 * The list view of flights by id, in the order of `ids`: one query for the flight with its athlete's name,
 * session, point count, latest follow or fit job and the latest fit's summary (through flights.latest_fit_id,
 * reading only the summary's fields of the fit's JSON). Lists of any length cost one round trip.
 */
export async function flightDtosByIds(ids: number[]): Promise<FlightDto[]> {
  if (ids.length === 0) return [];
  const rows = await sequelize.query<FlightRow>(`SELECT ${FLIGHT_ROW_COLUMNS} FROM flights f ${FLIGHT_ROW_JOINS} WHERE f.id IN (:ids)`, {
    type: QueryTypes.SELECT,
    replacements: { ids },
  });
  const byId = new Map(rows.map((r) => [Number(r.id), r]));
  return ids.flatMap((id) => {
    const row = byId.get(id);
    return row ? [dtoOfRow(row)] : [];
  });
}

/** A flight's list columns as FLIGHT_ROW_COLUMNS reads them. */
type FlightRow = FlightListRow & FlightCore & { job: string | JobSummary | null };

/**
 * The list view's columns of `flights f` (with FLIGHT_ROW_JOINS): the flight with its athlete's name, session,
 * point count, latest follow or fit job and the latest fit's summary (through flights.latest_fit_id, reading
 * only the summary's fields of the fit's JSON).
 */
const FLIGHT_ROW_COLUMNS = `f.id, f.club_id AS clubId, f.clip_id AS clipId, f.athlete_profile_id AS athleteProfileId, f.action, f.ball_id AS ballId,
              f.frame_start AS frameStart, f.frame_end AS frameEnd, f.release_frame AS releaseFrame, f.release_height_m AS releaseHeightM, f.status, f.attention_reason AS attentionReason, f.notes,
              f.created_at AS createdAt, f.updated_at AS updatedAt,
              c.session_id AS sessionId, a.display_name AS athleteName,
              (SELECT COUNT(*) FROM track_points t WHERE t.flight_id = f.id) AS pointCount,
              lf.id AS fitId, lf.model AS fitModel, lf.status AS fitStatus, lf.created_at AS fitCreatedAt,
              lf.launch_speed_mps AS fitSpeed, lf.launch_angle_deg AS fitAngle, lf.carry_m AS fitCarry,
              JSON_VALUE(lf.result, '$.cd') AS fitCd, JSON_VALUE(lf.result, '$.cdError') AS fitCdError,
              JSON_VALUE(lf.result, '$.standardCarry') AS fitStandardCarry, lf.warnings AS fitWarnings,
              JSON_VALUE(lf.result, '$.release.mode') AS fitReleaseMode, JSON_VALUE(lf.result, '$.release.backFrames') AS fitReleaseBackFrames,
              (SELECT JSON_OBJECT('id', j.id, 'type', j.type, 'status', j.status, 'progress', j.progress, 'error', j.error)
                 FROM jobs j WHERE j.flight_id = f.id AND j.type IN ('flight.follow', 'flight.fit') ORDER BY j.id DESC LIMIT 1) AS job`;
const FLIGHT_ROW_JOINS = `JOIN clips c ON c.id = f.clip_id
         LEFT JOIN athlete_profiles a ON a.id = f.athlete_profile_id
         LEFT JOIN fits lf ON lf.id = f.latest_fit_id`;

function dtoOfRow(row: FlightRow): FlightDto {
  const job = typeof row.job === 'string' ? (JSON.parse(row.job) as JobSummary) : row.job;
  return toDto({ ...row, id: Number(row.id), clubId: Number(row.clubId), clipId: Number(row.clipId), athleteProfileId: Number(row.athleteProfileId) }, row, job ?? undefined);
}

function toDto(f: FlightCore, row: FlightListRow | undefined, job: JobSummary | undefined): FlightDto {
  return {
    id: f.id,
    clubId: f.clubId,
    sessionId: row ? Number(row.sessionId) : 0,
    clipId: f.clipId,
    athleteId: f.athleteProfileId,
    athleteName: row?.athleteName ?? '',
    action: f.action,
    ballId: f.ballId,
    frameStart: Number(f.frameStart),
    frameEnd: Number(f.frameEnd),
    releaseFrame: f.releaseFrame === null || f.releaseFrame === undefined ? null : Number(f.releaseFrame),
    releaseHeightM: f.releaseHeightM === null || f.releaseHeightM === undefined ? null : Number(f.releaseHeightM),
    status: f.status,
    attentionReason: f.attentionReason ?? null,
    notes: f.notes ?? null,
    pointCount: row ? Number(row.pointCount) : 0,
    latestFit: row ? fitSummaryOf(row) : null,
    job: job ? { id: Number(job.id), type: job.type, status: job.status, progress: Number(job.progress), error: job.error ?? null } : null,
    createdAt: new Date(f.createdAt).toISOString(),
    updatedAt: new Date(f.updatedAt).toISOString(),
  };
}

/** The list view of flights the caller holds as models (their own columns as the models have them). */
export async function toFlightDtos(flights: Flight[]): Promise<FlightDto[]> {
  const read = await flightDtosByIds(flights.map((f) => f.id));
  const byId = new Map(read.map((d) => [d.id, d]));
  return flights.map((f) => {
    const d = byId.get(f.id);
    // The model's own columns win: the caller may hold changes this read does not see yet.
    return { ...toDto(f, undefined, undefined), ...(d ? { sessionId: d.sessionId, athleteName: d.athleteName, pointCount: d.pointCount, latestFit: d.latestFit, job: d.job } : {}) };
  });
}

/** Filters of the flights list (every one optional); the paged list adds page, size and order. */
export interface FlightQuery {
  sessionId?: number;
  clipId?: number;
  athleteId?: number;
  status?: FlightStatus;
  action?: string;
  ballId?: string;
}

interface SortSql {
  expr: string;
  /** The joins the expression needs beyond `flights f`. */
  joins: ('clip' | 'session' | 'athlete')[];
  /** True where flights without a fit have no value: they go last in either direction. */
  nullable: boolean;
}

const JOIN_SQL = {
  clip: 'JOIN clips c ON c.id = f.clip_id',
  session: 'JOIN sessions s ON s.id = c.session_id',
  athlete: 'JOIN athlete_profiles a ON a.id = f.athlete_profile_id',
} as const;

/**
 * ORDER BY expression per sort. The fit figures are the latest fit's, copied onto the flight (migration 0320)
 * with an index each, so a sorted page reads only its rows.
 */
const SORT_SQL: Record<FlightSort, SortSql> = {
  recent: { expr: 'f.id', joins: [], nullable: false },
  date: { expr: 's.date', joins: ['clip', 'session'], nullable: false },
  athlete: { expr: 'a.display_name', joins: ['athlete'], nullable: false },
  action: { expr: 'f.action', joins: [], nullable: false },
  ball: { expr: 'f.ball_id', joins: [], nullable: false },
  status: { expr: 'f.status', joins: [], nullable: false },
  launchSpeed: { expr: 'f.fit_launch_speed_mps', joins: [], nullable: true },
  launchAngle: { expr: 'f.fit_launch_angle_deg', joins: [], nullable: true },
  carry: { expr: 'f.fit_carry_m', joins: [], nullable: true },
  standardCarry: { expr: 'f.fit_standard_carry_m', joins: [], nullable: true },
};

/** WHERE clause and replacements of the list's filters, on `flights f JOIN clips c`. */
function flightFilterSql(club: ClubContext, query: FlightQuery): { where: string; replacements: Record<string, unknown> } | null {
  const scope = flightScope(club);
  const parts = ['f.club_id = :clubId'];
  const replacements: Record<string, unknown> = { clubId: scope.clubId };
  if (scope.athleteProfileId !== undefined) {
    if (query.athleteId && query.athleteId !== scope.athleteProfileId) return null;
    parts.push('f.athlete_profile_id = :athleteId');
    replacements.athleteId = scope.athleteProfileId;
  } else if (query.athleteId) {
    parts.push('f.athlete_profile_id = :athleteId');
    replacements.athleteId = query.athleteId;
  }
  const equalities: [column: string, name: keyof FlightQuery][] = [
    ['f.clip_id', 'clipId'],
    ['c.session_id', 'sessionId'],
    ['f.status', 'status'],
    ['f.action', 'action'],
    ['f.ball_id', 'ballId'],
  ];
  for (const [column, name] of equalities) {
    if (query[name] === undefined) continue;
    parts.push(`${column} = :${name}`);
    replacements[name] = query[name];
  }
  return { where: parts.join(' AND '), replacements };
}

/**
 * One page of the flights the caller may see that pass the filters, in the asked order (ties by id), and
 * the number of all that pass. Filters, order and paging run in the database.
 */
export async function listFlightsPage(club: ClubContext, query: FlightListQuery): Promise<{ data: FlightDto[]; meta: PageMeta }> {
  const meta = { page: query.page, pageSize: query.pageSize, total: 0 };
  const filter = flightFilterSql(club, query);
  if (!filter) return { data: [], meta };
  const sort = SORT_SQL[query.sort];
  const joins = new Set(sort.joins);
  if (query.sessionId) joins.add('clip');
  const from = ['FROM flights f', ...(['clip', 'session', 'athlete'] as const).filter((j) => joins.has(j)).map((j) => JOIN_SQL[j])].join(' ');
  const select = <T extends object>(sql: string, extra: Record<string, unknown> = {}) =>
    sequelize.query<T>(sql, { type: QueryTypes.SELECT, replacements: { ...filter.replacements, ...extra } });
  const idsOf = async (where: string, order: string, limit: number, offset: number) =>
    (await select<{ id: number }>(`SELECT f.id ${from} WHERE ${filter.where}${where} ORDER BY ${order} LIMIT :limit OFFSET :offset`, { limit, offset })).map((r) =>
      Number(r.id),
    );
  const offset = pageOffset(query);
  const countSql = `SELECT COUNT(*) AS n FROM flights f${query.sessionId ? ` ${JOIN_SQL.clip}` : ''} WHERE ${filter.where}`;
  if (!sort.nullable || query.order !== 'asc') {
    // Going down, MariaDB sorts NULL last by itself. The page and the total in one round trip: the page's
    // ids walk the sort's index in a derived table, the total is an uncorrelated subquery (read once), and
    // the rows' columns are read for the page's ids only.
    const dir = query.order === 'asc' ? 'ASC' : 'DESC';
    const rows = await select<FlightRow & { total: number | string }>(
      `SELECT ${FLIGHT_ROW_COLUMNS}, (${countSql}) AS total
         FROM (SELECT f.id, ${sort.expr} AS sortKey ${from} WHERE ${filter.where} ORDER BY ${sort.expr} ${dir}, f.id ${dir} LIMIT :limit OFFSET :offset) page
         JOIN flights f ON f.id = page.id
         ${FLIGHT_ROW_JOINS}
        ORDER BY page.sortKey ${dir}, page.id ${dir}`,
      { limit: query.pageSize, offset },
    );
    if (rows.length > 0) meta.total = Number(rows[0]!.total);
    else if (offset > 0) meta.total = Number((await select<{ n: number }>(countSql))[0]?.n ?? 0);
    return { data: rows.map(dtoOfRow), meta };
  }
  const pageIds = async (): Promise<number[]> => {
    // Note: MariaDB sorts NULL first going up; the flights without the figure are read after the others
    // instead, so that each part still walks its index in order.
    const [counted] = await select<{ n: number }>(`SELECT COUNT(*) AS n ${from} WHERE ${filter.where} AND ${sort.expr} IS NOT NULL`);
    const valued = Number(counted?.n ?? 0);
    const ids = offset < valued ? await idsOf(` AND ${sort.expr} IS NOT NULL`, `${sort.expr} ASC, f.id ASC`, query.pageSize, offset) : [];
    if (ids.length < query.pageSize) {
      ids.push(...(await idsOf(` AND ${sort.expr} IS NULL`, 'f.id ASC', query.pageSize - ids.length, Math.max(0, offset - valued))));
    }
    return ids;
  };
  const [ids, [counted]] = await Promise.all([pageIds(), select<{ n: number }>(countSql)]);
  meta.total = Number(counted?.n ?? 0);
  return { data: await flightDtosByIds(ids), meta };
}

/** Every flight the caller may see that passes the filters, oldest first (for a clip's own list and the services). */
export async function listFlights(club: ClubContext, query: FlightQuery): Promise<FlightDto[]> {
  const filter = flightFilterSql(club, query);
  if (!filter) return [];
  const rows = await sequelize.query<{ id: number }>(
    `SELECT f.id FROM flights f ${JOIN_SQL.clip} WHERE ${filter.where} ORDER BY f.id ASC`,
    { type: QueryTypes.SELECT, replacements: filter.replacements },
  );
  return flightDtosByIds(rows.map((r) => Number(r.id)));
}

export async function listClipFlights(club: ClubContext, clipId: number): Promise<FlightDto[]> {
  const clip = await findVisibleClip(club, clipId);
  return listFlights(club, { clipId: clip.id });
}

export async function getFlight(club: ClubContext, flightId: number): Promise<FlightDto> {
  const [dto] = await toFlightDtos([await findVisibleFlight(club, flightId)]);
  return dto!;
}

export async function getFlightDetail(club: ClubContext, flightId: number): Promise<FlightDetail> {
  const { flight, clip } = await findVisibleFlightWithClip(club, flightId);
  const cal = await currentCalibration(clip.id);
  const [dto] = await toFlightDtos([flight]);
  return {
    ...dto!,
    points: await pointsOf(flight, clip, cal),
    clip: {
      id: clip.id,
      label: clip.label,
      width: clip.width,
      height: clip.height,
      frameWidth: clip.frameWidth ?? null,
      frameHeight: clip.frameHeight ?? null,
      frameScale: clip.frameWidth ? clip.frameWidth / clip.width : null,
      frameCount: clip.frameCount ?? null,
      captureFps: clip.captureFps,
      calibration: cal ? toCalibrationDto(cal) : null,
    },
  };
}

function lastFrame(clip: Clip): number {
  return Math.max(0, (clip.frameCount ?? 1) - 1);
}

function checkRange(clip: Clip, frameStart: number, frameEnd: number): void {
  const last = lastFrame(clip);
  if (frameEnd > last) {
    throw new ApiError('VALIDATION_FAILED', `This clip has frames 0 to ${last}: the last frame of the flight must be at most ${last}.`, {
      frameEnd: `At most ${last}.`,
    });
  }
  if (frameEnd <= frameStart) {
    throw new ApiError('VALIDATION_FAILED', 'The last frame must come after the first frame.', { frameEnd: 'After the first frame.' });
  }
}

/**
 * A release frame must lie inside the flight's frames and not after its last traced point (the fit
 * traces the flight back to the release, never forward).
 * @throws ApiError VALIDATION_FAILED naming `releaseFrame`
 */
async function checkReleaseFrame(flightId: number | null, releaseFrame: number, frameStart: number, frameEnd: number, transaction?: Transaction): Promise<void> {
  if (releaseFrame < frameStart || releaseFrame > frameEnd) {
    throw new ApiError('VALIDATION_FAILED', `The release frame ${releaseFrame} lies outside the flight's frames ${frameStart}–${frameEnd}: mark the frame where the ball left the foot or hand.`, {
      releaseFrame: `Between ${frameStart} and ${frameEnd}.`,
    });
  }
  if (flightId === null) return;
  const [row] = await sequelize.query<{ last: number | null }>('SELECT MAX(frame) AS last FROM track_points WHERE flight_id = :id', {
    type: QueryTypes.SELECT, replacements: { id: flightId }, transaction,
  });
  const last = row?.last === null || row?.last === undefined ? null : Number(row.last);
  if (last !== null && releaseFrame > last) {
    throw new ApiError('VALIDATION_FAILED', `The release frame ${releaseFrame} comes after the last traced point (frame ${last}): the release is where the ball left the foot or hand, before the traced flight.`, {
      releaseFrame: `At most ${last}, the last traced frame.`,
    });
  }
}

export async function createFlight(club: ClubContext, clipId: number, input: FlightInput): Promise<FlightDto> {
  const clip = await findVisibleClip(club, clipId);
  const flight = await withTransaction(async (transaction) => {
    await checkAthlete(club.id, input.athleteId, transaction);
    await checkAction(club.id, input.action, transaction);
    await checkFlightBall(club.id, input.ballId, transaction);
    const frameStart = input.frameStart ?? 0;
    const frameEnd = input.frameEnd ?? lastFrame(clip);
    checkRange(clip, frameStart, frameEnd);
    if (input.releaseFrame !== undefined && input.releaseFrame !== null) await checkReleaseFrame(null, input.releaseFrame, frameStart, frameEnd, transaction);
    return Flight.create(
      {
        clubId: club.id,
        clipId: clip.id,
        athleteProfileId: input.athleteId,
        action: input.action,
        ballId: input.ballId,
        frameStart,
        frameEnd,
        releaseFrame: input.releaseFrame ?? null,
        releaseHeightM: input.releaseHeightM ?? null,
        attentionReason: null,
        notes: input.notes ?? null,
      },
      { transaction },
    );
  });
  return getFlight(club, flight.id);
}

const REVIEW_FROM: FlightStatus[] = ['fitted', 'needs_attention'];

export async function patchFlight(club: ClubContext, flightId: number, patch: FlightPatch): Promise<FlightDto> {
  await withTransaction(async (transaction) => {
    const { flight, clip } = await findVisibleFlightWithClip(club, flightId, transaction);
    if (patch.athleteId !== undefined) {
      await checkAthlete(club.id, patch.athleteId, transaction);
      flight.athleteProfileId = patch.athleteId;
    }
    if (patch.action !== undefined && patch.action !== flight.action) {
      await checkAction(club.id, patch.action, transaction);
      flight.action = patch.action;
    }
    const ballChanged = patch.ballId !== undefined && patch.ballId !== flight.ballId;
    if (ballChanged) await checkFlightBall(club.id, patch.ballId!, transaction);
    if (patch.ballId !== undefined) flight.ballId = patch.ballId;
    if (patch.notes !== undefined) flight.notes = patch.notes ?? null;
    if (patch.frameStart !== undefined || patch.frameEnd !== undefined) {
      const frameStart = patch.frameStart ?? flight.frameStart;
      const frameEnd = patch.frameEnd ?? flight.frameEnd;
      checkRange(clip, frameStart, frameEnd);
      const [row] = await sequelize.query<{ n: number }>(
        'SELECT COUNT(*) AS n FROM track_points WHERE flight_id = :id AND (frame < :start OR frame > :end)',
        { type: QueryTypes.SELECT, replacements: { id: flight.id, start: frameStart, end: frameEnd }, transaction },
      );
      const outside = Number(row?.n ?? 0);
      if (outside > 0) {
        throw new ApiError(
          'CONFLICT',
          `${outside} traced point${outside === 1 ? ' lies' : 's lie'} outside frames ${frameStart}–${frameEnd}. Delete ${outside === 1 ? 'it' : 'them'} first, or choose a range that holds every point.`,
        );
      }
      flight.frameStart = frameStart;
      flight.frameEnd = frameEnd;
    }
    const releaseFrame = patch.releaseFrame !== undefined ? patch.releaseFrame : flight.releaseFrame ?? null;
    const releaseHeightM = patch.releaseHeightM !== undefined ? patch.releaseHeightM : flight.releaseHeightM ?? null;
    const releaseChanged = releaseFrame !== (flight.releaseFrame ?? null) || releaseHeightM !== (flight.releaseHeightM ?? null);
    if (releaseChanged) {
      if (releaseFrame !== null && releaseHeightM !== null) {
        throw new ApiError('VALIDATION_FAILED', 'Give either the release frame or the release height, not both: clear the one you no longer want.', {
          releaseHeightM: 'Clear the release frame first, or leave this empty.',
        });
      }
      if (releaseFrame !== null) await checkReleaseFrame(flight.id, releaseFrame, flight.frameStart, flight.frameEnd, transaction);
      flight.releaseFrame = releaseFrame;
      flight.releaseHeightM = releaseHeightM;
    }
    if (patch.status !== undefined && patch.status !== flight.status) {
      if (patch.status === 'reviewed' && !REVIEW_FROM.includes(flight.status)) {
        throw new ApiError('CONFLICT', `Only a fitted flight can be marked reviewed; this one is ${flight.status.replace('_', ' ')}. Fit it first.`);
      }
      if (patch.status === 'fitted' && flight.status !== 'reviewed') {
        throw new ApiError('CONFLICT', 'Only a reviewed flight can go back to fitted.');
      }
      flight.status = patch.status;
    }
    await flight.save({ transaction });
    if (ballChanged || releaseChanged) await enqueueRefits(club.id, { flightId: flight.id, onlyFitted: true }, transaction);
  });
  return getFlight(club, flightId);
}

export async function deleteFlight(club: ClubContext, flightId: number): Promise<void> {
  const flight = await findVisibleFlight(club, flightId);
  await flight.destroy();
}

/** Flights the caller can see, for the overview. */
export async function countFlights(club: ClubContext, status?: FlightStatus): Promise<number> {
  return Flight.count({ where: { ...flightScope(club), ...(status ? { status } : {}) } });
}
