/**
 * Clips: accepting an upload (checked by its bytes and by ffprobe before anything is kept), listing,
 * correcting the capture rate, deleting, and serving frames. An athlete reaches only clips holding
 * one of their own flights.
 */
import { rename, rm } from 'node:fs/promises';
import { extname, join } from 'node:path';
import type { Readable } from 'node:stream';
import { Op, QueryTypes } from 'sequelize';
import type { ErrorCode } from '../../shared/errors';
import type { Clip as ClipDto, ClipListQuery, ClipPatch, ClipStatus, ClipUploadFields, JobSummary } from '../../shared/schemas/clip';
import { pageOffset, type PageMeta } from '../../shared/schemas/pagination';
import { sequelize, withTransaction } from '../db';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { enqueue } from '../jobs/queue';
import { Clip } from '../models';
import { clipKeys, storage } from '../storage';
import { isVideoError, probeClip, probeFrameSet, type ClipProbe, type FrameSetProbe } from '../video';
import { currentCalibrations, toCalibrationDto } from './calibration';
import { latestJobs, toJobDto, toJobSummary } from './jobs';
import { enqueueRefits } from './refits';
import { removeClipFiles } from './sessions';
import { athleteClipIds, findVisibleClip, findVisibleSession } from './visibility';

/** A file multer wrote to the upload work folder. */
export interface UploadedFile {
  path: string;
  originalName: string;
  sizeBytes: number;
}

export interface ClipUpload {
  fields: ClipUploadFields;
  video: UploadedFile[];
  frames: UploadedFile[];
  /** The request's private work folder; removed whatever happens. */
  workDir: string;
}

const VIDEO_EXTENSIONS: Record<string, string> = { mp4: '.mp4', mov: '.mov', matroska: '.mkv', webm: '.webm', avi: '.avi', mpegts: '.ts' };

async function flightCounts(club: ClubContext, clipIds: number[]): Promise<Map<number, number>> {
  const out = new Map<number, number>();
  if (clipIds.length === 0) return out;
  const athlete = club.role === 'athlete';
  const rows = await sequelize.query<{ id: number; n: number }>(
    `SELECT clip_id AS id, COUNT(*) AS n FROM flights WHERE clip_id IN (:ids) ${athlete ? 'AND athlete_profile_id = :athleteId' : ''} GROUP BY clip_id`,
    { type: QueryTypes.SELECT, replacements: { ids: clipIds, athleteId: club.athleteProfileId ?? 0 } },
  );
  for (const r of rows) out.set(Number(r.id), Number(r.n));
  return out;
}

export function stripUrl(clubId: number, clipId: number): string {
  return `/api/v1/clubs/${clubId}/clips/${clipId}/strip`;
}

/** Clip DTOs with their latest processing job, current calibration and flight count, loaded in batches. */
export async function toClipDtos(club: ClubContext, clips: Clip[]): Promise<ClipDto[]> {
  const ids = clips.map((c) => c.id);
  const [jobs, calibrations, counts] = await Promise.all([
    latestJobs('clipId', ids, ['clip.process']),
    currentCalibrations(ids),
    flightCounts(club, ids),
  ]);
  return clips.map((clip) => {
    const job = jobs.get(clip.id);
    const cal = calibrations.get(clip.id);
    return {
      id: clip.id,
      clubId: clip.clubId,
      sessionId: clip.sessionId,
      label: clip.label,
      kind: clip.kind,
      originalName: clip.originalName,
      sizeBytes: clip.sizeBytes,
      container: clip.container ?? null,
      codec: clip.codec ?? null,
      width: clip.width,
      height: clip.height,
      frameWidth: clip.frameWidth ?? null,
      frameHeight: clip.frameHeight ?? null,
      frameScale: clip.frameWidth ? clip.frameWidth / clip.width : null,
      rotationDeg: clip.rotationDeg,
      playbackFps: clip.playbackFps ?? null,
      captureFps: clip.captureFps,
      slowMotion: clip.slowMotion,
      frameCount: clip.frameCount ?? null,
      durationS: clip.frameCount ? clip.frameCount / clip.captureFps : null,
      variableFrameRate: Boolean(clip.frameTimes),
      timestampWarning: clip.timestampWarning ?? null,
      cameraStill: clip.cameraStill,
      status: clip.status,
      failureReason: clip.failureReason ?? null,
      job: job ? (toJobSummary(job) as JobSummary) : null,
      framesReady: clip.framesReady,
      strip: clip.strip ? { url: stripUrl(clip.clubId, clip.id), ...clip.strip } : null,
      calibration: cal ? toCalibrationDto(cal) : null,
      flightCount: counts.get(clip.id) ?? 0,
      createdAt: clip.createdAt.toISOString(),
      updatedAt: clip.updatedAt.toISOString(),
    };
  });
}

async function clipWhere(club: ClubContext, query: { sessionId?: number; status?: ClipStatus }): Promise<Record<string | symbol, unknown>> {
  const where: Record<string | symbol, unknown> = { clubId: club.id };
  if (query.sessionId) where.sessionId = query.sessionId;
  if (query.status) where.status = query.status;
  if (club.role === 'athlete') where.id = { [Op.in]: await athleteClipIds(club) };
  return where;
}

/** One page of the clips the caller may see, oldest first, and how many there are in all. */
export async function listClips(club: ClubContext, query: ClipListQuery): Promise<{ data: ClipDto[]; meta: PageMeta }> {
  const where = await clipWhere(club, query);
  const [total, clips] = await Promise.all([
    Clip.count({ where }),
    Clip.findAll({ where, order: [['id', 'ASC']], limit: query.pageSize, offset: pageOffset(query) }),
  ]);
  return { data: await toClipDtos(club, clips), meta: { page: query.page, pageSize: query.pageSize, total } };
}

/** Every clip of a session the caller may see (a session holds a day's clips, a short list). */
export async function listSessionClips(club: ClubContext, sessionId: number): Promise<ClipDto[]> {
  const session = await findVisibleSession(club, sessionId);
  const clips = await Clip.findAll({ where: await clipWhere(club, { sessionId: session.id }), order: [['id', 'ASC']] });
  return toClipDtos(club, clips);
}

export async function getClip(club: ClubContext, clipId: number): Promise<ClipDto> {
  const [dto] = await toClipDtos(club, [await findVisibleClip(club, clipId)]);
  return dto!;
}

/** A video-engine refusal as an API error: its message as is; "unprocessable" media is MEDIA_UNREADABLE. */
function uploadRefusal(err: unknown, field: 'video' | 'frames'): ApiError | null {
  if (!isVideoError(err)) return null;
  let code: ErrorCode = err.apiCode;
  if (code === 'UNPROCESSABLE') code = 'MEDIA_UNREADABLE';
  if (code === 'INTERNAL' || code === 'SERVICE_UNAVAILABLE' || code === 'CONFLICT') return null;
  return new ApiError(code, err.message, { [field]: err.message });
}

function humanBytes(bytes: number): string {
  if (bytes >= 1024 ** 3) return `${+(bytes / 1024 ** 3).toFixed(2)} GiB`;
  if (bytes >= 1024 ** 2) return `${+(bytes / 1024 ** 2).toFixed(1)} MiB`;
  if (bytes >= 1024) return `${+(bytes / 1024).toFixed(1)} KiB`;
  return `${bytes} bytes`;
}

export function tooLarge(maxBytes: number): ApiError {
  return new ApiError(
    'PAYLOAD_TOO_LARGE',
    `The upload is larger than the ${humanBytes(maxBytes)} limit of this server. Trim the clip to the throw or kick (a few seconds), or upload fewer frames.`,
  );
}

/** Refuses a slow-motion clip or a frame set without the capture rate: nothing else times their frames. */
export function assertCaptureRateGiven(fields: ClipUploadFields, isFrameSet: boolean): void {
  if ((fields.slowMotion || isFrameSet) && fields.captureFps === undefined) {
    const why = isFrameSet ? 'A set of frames has no timing of its own' : 'A slow-motion clip plays back slower than it was filmed';
    throw new ApiError('VALIDATION_FAILED', `${why}: give the capture frame rate (frames per second the camera recorded).`, {
      captureFps: 'Give the capture frame rate, e.g. 240 for a 240 fps slow-motion clip.',
    });
  }
}

const natural = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

/**
 * Checks an upload and keeps it: probes the video (or the frame set) in the request's work folder,
 * then creates the clip row, moves the files into storage and queues the `clip.process` job in one
 * transaction. A refused upload leaves no row and no file.
 */
export async function acceptUpload(club: ClubContext, sessionId: number, upload: ClipUpload, maxBytes: number) {
  try {
    const session = await findVisibleSession(club, sessionId);
    const { fields, video, frames } = upload;
    if (video.length === 0 && frames.length === 0) {
      throw new ApiError('VALIDATION_FAILED', 'Choose a video, or a set of frames, to upload.', {
        video: 'Send the video in the form field "video", or the frames in "frames".',
      });
    }
    if (video.length > 0 && frames.length > 0) {
      throw new ApiError('VALIDATION_FAILED', 'Send either one video or a set of frames, not both.', {
        frames: 'Send either one video or a set of frames, not both.',
      });
    }
    if (video.length > 1) {
      throw new ApiError('VALIDATION_FAILED', 'Send one video per upload.', { video: 'Send one video per upload.' });
    }
    const total = [...video, ...frames].reduce((sum, f) => sum + f.sizeBytes, 0);
    if (total > maxBytes) throw tooLarge(maxBytes);
    assertCaptureRateGiven(fields, frames.length > 0);

    if (video.length === 1) {
      const file = video[0]!;
      let probe: ClipProbe;
      try {
        probe = await probeClip(file.path);
      } catch (err) {
        throw uploadRefusal(err, 'video') ?? err;
      }
      // A variable-rate clip's timestamps count in its nominal rate: that is its capture rate unless the coach says otherwise.
      const captureFps = fields.captureFps ?? (probe.constantFrameRate ? probe.frameRate : probe.nominalFrameRate);
      return await keep(club, session.id, {
        kind: 'video',
        label: fields.label || file.originalName,
        originalName: file.originalName,
        sizeBytes: file.sizeBytes,
        container: probe.container,
        codec: probe.codec,
        width: probe.width,
        height: probe.height,
        rotationDeg: probe.rotationDeg,
        playbackFps: probe.frameRate,
        captureFps,
        slowMotion: Boolean(fields.slowMotion),
        frameCount: probe.frameCount,
        timing: { frameTimes: probe.frameTimesS, timestampRate: probe.nominalFrameRate, warning: probe.timestampWarning },
        files: [{ from: file.path, name: `video${VIDEO_EXTENSIONS[probe.container] ?? extname(file.originalName)}` }],
      });
    }

    if (frames.length < 2) {
      throw new ApiError('VALIDATION_FAILED', 'A set of frames needs at least two frames.', { frames: 'Send at least two frames.' });
    }
    // Natural order of the names the coach gave (f2 before f10); files are renumbered in that order.
    const ordered = [...frames].sort((a, b) => natural.compare(a.originalName, b.originalName));
    const dup = ordered.find((f, i) => i > 0 && natural.compare(f.originalName, ordered[i - 1]!.originalName) === 0);
    if (dup) {
      throw new ApiError('VALIDATION_FAILED', `Two frames are named "${dup.originalName}": give every frame its own name, numbered in order.`, {
        frames: `Two frames are named "${dup.originalName}".`,
      });
    }
    const renamed: string[] = [];
    for (let i = 0; i < ordered.length; i++) {
      const ext = extname(ordered[i]!.originalName).toLowerCase().replace(/[^.a-z0-9]/g, '') || '.img';
      const to = join(upload.workDir, `frame-${String(i).padStart(6, '0')}${ext}`);
      await rename(ordered[i]!.path, to);
      renamed.push(to);
    }
    let probe: FrameSetProbe;
    try {
      probe = await probeFrameSet(renamed, fields.captureFps!);
    } catch (err) {
      // Name the coach's file, not our renumbered one.
      const refusal = uploadRefusal(err, 'frames');
      if (refusal) {
        let message = refusal.message;
        renamed.forEach((path, i) => {
          const ours = path.slice(upload.workDir.length + 1);
          message = message.split(`"${ours}"`).join(`"${ordered[i]!.originalName}"`);
        });
        throw new ApiError(refusal.code, message, { frames: message });
      }
      throw err;
    }
    const ext = probe.format === 'png' ? '.png' : '.jpg';
    return await keep(club, session.id, {
      kind: 'frames',
      label: fields.label || `${ordered[0]!.originalName} … (${ordered.length} frames)`,
      originalName: ordered[0]!.originalName,
      sizeBytes: total,
      container: probe.format,
      codec: null,
      width: probe.width,
      height: probe.height,
      rotationDeg: 0,
      playbackFps: null,
      captureFps: fields.captureFps!,
      slowMotion: Boolean(fields.slowMotion),
      frameCount: probe.frameCount,
      files: probe.files.map((from, i) => ({ from, name: `frame-${String(i).padStart(6, '0')}${ext}` })),
    });
  } finally {
    await rm(upload.workDir, { recursive: true, force: true });
  }
}

interface KeepInput {
  kind: 'video' | 'frames';
  label: string;
  originalName: string;
  sizeBytes: number;
  container: string | null;
  codec: string | null;
  width: number;
  height: number;
  rotationDeg: number;
  playbackFps: number | null;
  captureFps: number;
  slowMotion: boolean;
  frameCount: number;
  /** A variable-rate video's frame timestamps, their rate and what is odd about them (see ClipProbe). */
  timing?: { frameTimes: number[] | null; timestampRate: number | null; warning: string | null };
  files: { from: string; name: string }[];
}

async function keep(club: ClubContext, sessionId: number, input: KeepInput) {
  let clipId: number | null = null;
  try {
    return await sequelize.transaction(async (transaction) => {
      const clip = await Clip.create(
        {
          clubId: club.id,
          sessionId,
          label: input.label.slice(0, 120),
          kind: input.kind,
          originalName: input.originalName.slice(0, 255),
          sizeBytes: input.sizeBytes,
          sourceKey: 'pending',
          container: input.container,
          codec: input.codec,
          width: input.width,
          height: input.height,
          rotationDeg: input.rotationDeg,
          playbackFps: input.playbackFps,
          captureFps: input.captureFps,
          slowMotion: input.slowMotion,
          frameCount: input.frameCount,
          frameTimes: input.timing?.frameTimes ?? null,
          timestampRate: input.timing?.frameTimes ? input.timing.timestampRate : null,
          timestampWarning: input.timing?.warning ?? null,
          frameWidth: null,
          frameHeight: null,
          frameNamePattern: null,
          strip: null,
          failureReason: null,
        },
        { transaction },
      );
      clipId = clip.id;
      const prefix = clipKeys.source(club.id, clip.id);
      for (const file of input.files) await storage().importFile(`${prefix}/${file.name}`, file.from);
      clip.sourceKey = input.kind === 'video' ? `${prefix}/${input.files[0]!.name}` : prefix;
      await clip.save({ transaction });
      const job = await enqueue({ clubId: club.id, type: 'clip.process', payload: { clipId: clip.id }, clipId: clip.id }, transaction);
      return { clip, job };
    }).then(async ({ clip, job }) => {
      const [dto] = await toClipDtos(club, [clip]);
      return { clip: dto!, job: toJobDto(job) };
    });
  } catch (err) {
    // The row was rolled back: its files must go too.
    if (clipId !== null) await removeClipFiles(club.id, [clipId]);
    throw err;
  }
}

/**
 * Corrects the label or the capture rate, or marks the camera as still (auto-follow then skips the motion
 * estimate; flights already followed keep theirs until followed again); a new rate re-times every flight, so
 * fitted flights are refitted.
 */
export async function patchClip(club: ClubContext, clipId: number, patch: ClipPatch): Promise<ClipDto> {
  const clip = await findVisibleClip(club, clipId);
  await withTransaction(async (transaction) => {
    const rateChanged = patch.captureFps !== undefined && patch.captureFps !== clip.captureFps;
    if (patch.label !== undefined) clip.label = patch.label;
    if (patch.cameraStill !== undefined) clip.cameraStill = patch.cameraStill;
    if (patch.captureFps !== undefined) {
      clip.captureFps = patch.captureFps;
      if (clip.playbackFps !== null && Math.abs(patch.captureFps - clip.playbackFps) > 1e-6) clip.slowMotion = patch.captureFps > clip.playbackFps;
    }
    await clip.save({ transaction });
    if (rateChanged) await enqueueRefits(club.id, { clipId: clip.id, onlyFitted: true }, transaction);
  });
  return getClip(club, clip.id);
}

/** Deletes a clip with its flights (confirmation needed when it has some), then its files. */
export async function deleteClip(club: ClubContext, clipId: number, confirm: boolean): Promise<void> {
  await withTransaction(async (transaction) => {
    const clip = await Clip.findOne({ where: { id: clipId, clubId: club.id }, transaction, lock: transaction.LOCK.UPDATE });
    if (!clip) throw notFound('clip');
    const [row] = await sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM flights WHERE clip_id = :id', {
      type: QueryTypes.SELECT,
      replacements: { id: clipId },
      transaction,
    });
    const flights = Number(row?.n ?? 0);
    if (flights > 0 && !confirm) {
      throw new ApiError(
        'CONFLICT',
        `This clip holds ${flights} flight${flights === 1 ? '' : 's'}. Deleting it deletes them with their tracks and fits. Confirm to delete it (send confirm=true).`,
      );
    }
    await clip.destroy({ transaction });
  });
  await removeClipFiles(club.id, [clipId]);
}

/** A stored frame image (0-based index) of a clip the caller may see. */
export async function frameImage(club: ClubContext, clipId: number, index: number): Promise<{ stream: Readable; sizeBytes: number }> {
  const clip = await findVisibleClip(club, clipId);
  if (!clip.framesReady || !clip.frameNamePattern) {
    throw new ApiError('NOT_FOUND', 'The frames of this clip are not ready yet: wait for processing to finish.');
  }
  if (!Number.isInteger(index) || index < 0 || (clip.frameCount !== null && index >= clip.frameCount)) {
    throw new ApiError('NOT_FOUND', `This clip has frames 0 to ${(clip.frameCount ?? 1) - 1}; there is no frame ${index}.`);
  }
  const name = clip.frameNamePattern.replace(/%0(\d)d/, (_m, width: string) => String(index).padStart(Number(width), '0'));
  return openStored(`${clipKeys.frames(clip.clubId, clip.id)}/${name}`, 'frame');
}

export async function stripImage(club: ClubContext, clipId: number): Promise<{ stream: Readable; sizeBytes: number }> {
  const clip = await findVisibleClip(club, clipId);
  if (!clip.strip) throw new ApiError('NOT_FOUND', 'The thumbnail strip of this clip is not ready yet: wait for processing to finish.');
  return openStored(`${clipKeys.frames(clip.clubId, clip.id)}/strip.jpg`, 'thumbnail strip');
}

async function openStored(key: string, what: string): Promise<{ stream: Readable; sizeBytes: number }> {
  const info = await storage().stat(key);
  const stream = info ? await storage().get(key) : null;
  if (!info || !stream) throw notFound(what);
  return { stream, sizeBytes: info.sizeBytes };
}

/** Clips the caller can see, for the overview. */
export async function countClips(club: ClubContext): Promise<number> {
  if (club.role === 'athlete') return (await athleteClipIds(club)).length;
  return Clip.count({ where: { clubId: club.id } });
}

/** Clips being processed, for the overview; athletes start no processing, so theirs is 0. */
export async function countProcessingClips(club: ClubContext): Promise<number> {
  if (club.role === 'athlete') return 0;
  return Clip.count({ where: { clubId: club.id, status: 'processing' } });
}

