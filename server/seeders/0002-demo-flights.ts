/**
 * Demo flights of "Fennick Vale Sporting Club": a month of training in four sessions in different air and
 * wind (demo/plan.ts). A few flights are rendered as clips by the project's generator and go through the
 * real pipeline (`clip.process`); the other reps are seeded as traced tracks without footage
 * (demo/tracks.ts), because rendering every clip would take the first start past two minutes. Every flight
 * gets its calibration, its traced points and a queued `flight.fit` job that the worker of the running app
 * (or `npm run worker`) carries out with the real engine.
 *
 * Idempotent: a demo session already in the club (same venue) is left as it is, with whatever the coaches
 * did to it since; only missing sessions are seeded.
 *
 * Files and the transaction: the clips are rendered into a work folder of the storage first; the rows go
 * into the seeding transaction; the files move into storage only after that transaction commits (they
 * are removed instead when the seeding fails here, and a folder left by a run whose transaction rolled
 * back later is swept on the next run).
 */
import { readdir, rm, stat } from 'node:fs/promises';
import { join } from 'node:path';
import type { Transaction } from 'sequelize';
import { BALLS } from '../../shared/physics';
import { calibrationInputSchema, type CalibrationInput } from '../../shared/schemas/calibration';
import type { TrackPointInput } from '../../shared/schemas/track';
import { config } from '../config';
import { enqueue } from '../jobs/queue';
import { log } from '../logger';
import { AthleteProfile, Calibration, Clip, Club, Flight, FlightAction, Membership, Session, User } from '../models';
import { calibrationValues } from '../services/calibration';
import { ensureDefaultActions } from '../services/flights';
import { insertPoints } from '../services/tracks';
import { clipKeys, LocalDiskStorage, storage } from '../storage';
import { DEMO_CLUB_NAME, DEMO_USERS } from './0001-demo-club';
import { DEMO_CUSTOM_ACTIONS, DEMO_SESSIONS, type DemoSessionPlan } from './demo/plan';
import { checkVideoTools, renderDemoClip, type RenderedDemoClip } from './demo/render';
import { seededTracks, type SeededDemoTrack } from './demo/tracks';

/** Prefix of this seeder's work folders in the storage's `.work` folder. */
const WORK_PURPOSE = 'demo-flights';
/** A work folder of this seeder older than this was left by a run whose transaction never committed. */
const STALE_WORK_MS = 10 * 60 * 1000;
/** Clips rendered at once: the generator paints in this process while ffmpeg encodes in its own. */
const RENDER_CONCURRENCY = 2;

/** The demo club as 0001-demo-club made it (found through its admin, not by a name anyone could give a club). */
export async function demoClub(transaction: Transaction): Promise<Club | null> {
  const admin = await User.findOne({ where: { email: DEMO_USERS[0]!.email }, transaction });
  if (!admin) return null;
  const membership = await Membership.findOne({
    where: { userId: admin.id },
    include: [{ model: Club, as: 'club', where: { name: DEMO_CLUB_NAME } }],
    transaction,
  });
  return membership?.club ?? null;
}

/** The club's profile of a demo athlete: through the sign-in for athletes who have one (their name may have been edited), else by name. */
async function athleteProfile(clubId: number, displayName: string, transaction: Transaction): Promise<AthleteProfile | null> {
  const withSignIn = DEMO_USERS.find((u) => u.athlete?.displayName === displayName);
  if (withSignIn) {
    const user = await User.findOne({ where: { email: withSignIn.email }, transaction });
    const own = user ? await AthleteProfile.findOne({ where: { clubId, userId: user.id }, transaction }) : null;
    if (own) return own;
  }
  return AthleteProfile.findOne({ where: { clubId, displayName }, order: [['id', 'ASC']], transaction });
}

/**
 * Runs `work` over `items`, at most `limit` at a time, keeping the order of the results. After a failure
 * no new item starts, and the first error is thrown only once every running item has settled (so nothing
 * still writes into a folder the caller is about to remove).
 */
async function mapLimited<T, R>(items: readonly T[], limit: number, work: (item: T) => Promise<R>): Promise<R[]> {
  const results: R[] = new Array(items.length);
  let next = 0;
  let failed = false;
  const lanes = Array.from({ length: Math.min(limit, items.length) }, async () => {
    while (!failed && next < items.length) {
      const i = next++;
      try {
        results[i] = await work(items[i]!);
      } catch (err) {
        failed = true;
        throw err;
      }
    }
  });
  const settled = await Promise.allSettled(lanes);
  const failure = settled.find((s): s is PromiseRejectedResult => s.status === 'rejected');
  if (failure) throw failure.reason;
  return results;
}

/** Removes work folders of earlier runs that never handed their files over (their transaction rolled back). */
async function sweepStaleWork(): Promise<void> {
  const store = storage();
  if (!(store instanceof LocalDiskStorage)) return;
  const base = join(store.root, '.work');
  let names: string[];
  try {
    names = await readdir(base);
  } catch {
    return;
  }
  for (const name of names.filter((n) => n.startsWith(`${WORK_PURPOSE}-`))) {
    const path = join(base, name);
    const info = await stat(path).catch(() => null);
    if (info && Date.now() - info.mtimeMs > STALE_WORK_MS) await rm(path, { recursive: true, force: true });
  }
}

interface Seeded {
  clipId: number;
  videoPath: string;
  sourceKey: string;
}

/** Inserts one demo session with its clips, calibrations, flights, points and jobs. */
/** A flight of a seeded clip with the clip's calibration, its traced points and its queued fit. */
async function insertCalibratedFlight(
  clubId: number,
  clipId: number,
  calibration: CalibrationInput,
  flight: { athleteProfileId: number; action: string; ballId: string; frameStart: number; frameEnd: number; notes: string | null },
  points: TrackPointInput[],
  transaction: Transaction,
): Promise<void> {
  const input = calibrationInputSchema.parse(calibration);
  await Calibration.create({ clubId, clipId, input, ...(await calibrationValues(clubId, input)), supersededAt: null }, { transaction });
  const row = await Flight.create(
    { clubId, clipId, ...flight, status: points.length > 0 ? 'traced' : 'uploaded', attentionReason: null },
    { transaction },
  );
  await insertPoints(row.id, points, transaction);
  await enqueue({ clubId, type: 'flight.fit', payload: { flightId: row.id }, clipId, flightId: row.id }, transaction);
}

/** Inserts a seeded rep: a clip row without footage, its calibration, the flight, its points and its fit job. */
async function insertTrack(clubId: number, sessionId: number, track: SeededDemoTrack, athletes: Map<string, number>, transaction: Transaction): Promise<void> {
  const { clip: c, block } = track;
  if (!BALLS[block.ballId]) throw new Error(`Demo track "${track.key}" names the ball "${block.ballId}", which is not in the catalogue.`);
  const clip = await Clip.create(
    {
      clubId,
      sessionId,
      label: c.label,
      kind: 'video',
      originalName: c.fileName,
      sizeBytes: 0,
      sourceKey: 'none',
      container: null,
      codec: null,
      width: c.width,
      height: c.height,
      rotationDeg: 0,
      playbackFps: c.playbackFps,
      captureFps: c.captureFps,
      slowMotion: c.captureFps > c.playbackFps + 1e-6,
      frameCount: c.frameCount,
      frameWidth: null,
      frameHeight: null,
      frameNamePattern: null,
      strip: null,
      status: 'ready',
      failureReason: null,
    },
    { transaction },
  );
  const flight = { athleteProfileId: athletes.get(block.athlete)!, action: block.action, ballId: block.ballId, notes: null };
  await insertCalibratedFlight(clubId, clip.id, track.calibration, { ...flight, frameStart: track.frameStart, frameEnd: track.frameEnd }, track.points, transaction);
}

async function insertSession(
  clubId: number,
  plan: DemoSessionPlan,
  clips: RenderedDemoClip[],
  athletes: Map<string, number>,
  transaction: Transaction,
): Promise<Seeded[]> {
  const session = await Session.create({ clubId, date: plan.date, venue: plan.venue, notes: plan.notes, ...plan.conditions }, { transaction });
  const seeded: Seeded[] = [];
  for (const r of clips) {
    const { probe, flight, layout } = r;
    const clip = await Clip.create(
      {
        clubId,
        sessionId: session.id,
        label: flight.clip.label,
        kind: 'video',
        originalName: flight.clip.fileName,
        sizeBytes: probe.sizeBytes,
        sourceKey: 'pending',
        container: probe.container,
        codec: probe.codec,
        width: probe.width,
        height: probe.height,
        rotationDeg: probe.rotationDeg,
        playbackFps: probe.frameRate,
        captureFps: layout.captureFps,
        slowMotion: layout.captureFps > probe.frameRate + 1e-6,
        frameCount: probe.frameCount,
        frameWidth: null,
        frameHeight: null,
        frameNamePattern: null,
        strip: null,
        failureReason: null,
      },
      { transaction },
    );
    clip.sourceKey = `${clipKeys.source(clubId, clip.id)}/video.mp4`;
    await clip.save({ transaction });

    if (!BALLS[flight.ballId]) throw new Error(`Demo flight "${flight.key}" names the ball "${flight.ballId}", which is not in the catalogue.`);
    await enqueue({ clubId, type: 'clip.process', payload: { clipId: clip.id }, clipId: clip.id }, transaction);
    const planned = { athleteProfileId: athletes.get(flight.athlete)!, action: flight.action, ballId: flight.ballId, notes: flight.notes };
    await insertCalibratedFlight(clubId, clip.id, r.calibration, { ...planned, frameStart: r.frameStart, frameEnd: r.frameEnd }, r.points, transaction);
    seeded.push({ clipId: clip.id, videoPath: r.videoPath, sourceKey: clip.sourceKey });
  }
  for (const track of seededTracks(plan)) await insertTrack(clubId, session.id, track, athletes, transaction);
  return seeded;
}

/** Moves the rendered clips into storage once their rows are committed; drops them when the rows are not there. */
async function handOver(work: string, seeded: Seeded[]): Promise<void> {
  try {
    // Note: Sequelize runs after-commit hooks even when the COMMIT itself failed, so look for the rows first.
    const committed = await Clip.count({ where: { id: seeded.map((s) => s.clipId) } });
    if (committed === seeded.length) {
      for (const s of seeded) await storage().importFile(s.sourceKey, s.videoPath);
    }
  } catch (err) {
    // The rows are committed: their clip.process jobs will fail with "missing from storage", which the coach sees.
    log.error('The demo clips could not be moved into storage', { error: err instanceof Error ? err.message : String(err) });
  } finally {
    await rm(work, { recursive: true, force: true });
  }
}

/** Seeds the missing demo sessions in the given transaction; returns what it did for the log. */
export async function seed(transaction: Transaction): Promise<string> {
  const club = await demoClub(transaction);
  if (!club) return 'no demo club, so no demo flights';
  const missing: DemoSessionPlan[] = [];
  for (const plan of DEMO_SESSIONS) {
    // By venue alone: the demo's dates count back from the day it is seeded, so they differ on every run.
    const found = await Session.findOne({ where: { clubId: club.id, venue: plan.venue }, transaction });
    if (!found) missing.push(plan);
  }
  if (missing.length === 0) return 'demo sessions, clips and flights already present';

  const store = storage();
  // Note: test runs share one database but must never write clips into the developer's storage folder.
  if (config.isTest && store instanceof LocalDiskStorage && store.root === config.storage.dir) {
    return 'demo flights skipped: a test run without a storage folder of its own (setStorage) writes no clips';
  }

  const athletes = new Map<string, number>();
  for (const name of new Set(missing.flatMap((s) => [...s.flights.map((f) => f.athlete), ...s.blocks.map((b) => b.athlete)]))) {
    const profile = await athleteProfile(club.id, name, transaction);
    if (!profile) return `demo flights skipped: the demo athlete "${name}" is missing from the club`;
    athletes.set(name, profile.id);
  }

  await sweepStaleWork();
  const work = await store.workDir(WORK_PURPOSE);
  let handedOver = false;
  try {
    let rendered: RenderedDemoClip[];
    try {
      await checkVideoTools();
      const items = missing.flatMap((plan) => plan.flights.map((flight) => ({ plan, flight })));
      rendered = await mapLimited(items, RENDER_CONCURRENCY, ({ plan, flight }) => renderDemoClip(work, plan, flight));
    } catch (err) {
      // The demo club stays usable without its clips; the next start tries again.
      return `demo flights skipped: the demo clips could not be rendered (${err instanceof Error ? err.message : String(err)})`;
    }

    await ensureDefaultActions(club.id, transaction);
    for (const custom of DEMO_CUSTOM_ACTIONS) {
      if (!missing.some((s) => [...s.flights, ...s.blocks].some((f) => f.action === custom.key))) continue;
      const existing = await FlightAction.findOne({ where: { clubId: club.id, key: custom.key }, transaction });
      if (!existing) {
        const last = (await FlightAction.max<number, FlightAction>('sortOrder', { where: { clubId: club.id }, transaction })) ?? 0;
        await FlightAction.create({ clubId: club.id, key: custom.key, label: custom.label, sortOrder: last + 10 }, { transaction });
      }
    }

    const seeded: Seeded[] = [];
    for (const plan of missing) {
      seeded.push(...(await insertSession(club.id, plan, rendered.filter((r) => r.session === plan), athletes, transaction)));
    }
    transaction.afterCommit(() => handOver(work, seeded));
    handedOver = true;
    const clips = rendered.length;
    const tracks = missing.reduce((n, plan) => n + plan.blocks.reduce((m, b) => m + b.reps, 0), 0);
    return (
      `demo sessions seeded: ${missing.length} session(s), ${clips + tracks} flight(s): ${clips} rendered as clip(s) by the generator ` +
      `(processing queued), ${tracks} seeded as traced tracks without footage (rendering every clip would slow the first start); ` +
      `all ${clips + tracks} fits are queued for the worker`
    );
  } finally {
    if (!handedOver) await rm(work, { recursive: true, force: true });
  }
}
