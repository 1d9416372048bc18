/**
 * Resumable video uploads (the tus protocol): the rules around the protocol. An upload is started by an admin or
 * coach for one session of their club, may arrive in any number of parts, and, once its last byte is in, becomes
 * a clip through the same `acceptUpload` as a multipart upload. Its bytes wait where the storage keeps uploads in
 * progress (`partialUploads()`: the local partial-uploads folder, or the bucket with the S3 driver, where any web
 * process can take the next part); an upload left unfinished expires and its bytes go.
 */
import { rm } from 'node:fs/promises';
import { join } from 'node:path';
import { ERRORS, type Upload } from '@tus/server';
import { clipUploadFieldsSchema, type ClipUploadFields } from '../../shared/schemas/clip';
import { config } from '../config';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { partialUploads, storage, type PartialUploads } from '../storage';
import { checkVideoHead, isVideoError } from '../video';
import { acceptUpload, assertCaptureRateGiven, tooLarge } from './clips';
import { assertClubCanRecord } from './subscriptions';
import { findVisibleSession } from './visibility';

/** Metadata keys the server writes itself at creation; a client's own values under these names are replaced. */
const OWNER_KEYS = ['clubId', 'sessionId', 'userId'] as const;
/** Bytes needed before the start of an upload can be recognised (as the video module's `readHead` reads them). */
const HEAD_BYTES = 4096;
/** Upload ids in addresses: 16 random bytes in hex, as `@tus/server` names them. */
const UPLOAD_ID = /^[0-9a-f]{32}$/;

/** Where the current storage keeps uploads in progress (it follows `setStorage`). */
export function uploadArea(): Promise<PartialUploads> {
  return partialUploads();
}

export function isUploadId(id: string): boolean {
  return UPLOAD_ID.test(id);
}

/** The id in the address of an upload, from the id its store knows it by (`partial-uploads/<id>` in a bucket). */
export function addressId(storeId: string): string {
  return storeId.slice(storeId.lastIndexOf('/') + 1);
}

/** The clip fields of a multipart upload, read from an upload's metadata (`label`, `slowMotion`, `captureFps`). */
export function metadataFields(meta: Record<string, string | null>) {
  return clipUploadFieldsSchema.safeParse({
    ...(meta.slowMotion ? { slowMotion: meta.slowMotion } : {}),
    ...(meta.captureFps ? { captureFps: meta.captureFps } : {}),
    ...(meta.label ? { label: meta.label } : {}),
  });
}

export interface UploadCreation {
  /** `Upload-Length` as sent, or null when missing. */
  length: string | null;
  /** True when the client asked to give the length later (`Upload-Defer-Length`). */
  deferLength: boolean;
  /** True when the creation request carries bytes of the file (tus "creation with upload"). */
  carriesBytes: boolean;
  /** The client's `Upload-Metadata`, decoded. */
  metadata: Record<string, string | null>;
}

/**
 * Checks the start of a resumable upload before anything is written: the session is the club's, the club may
 * record, the length is given and within the limit, the file is named and the fields (parsed by
 * `metadataFields`) are complete.
 * @returns the metadata to store with the upload (the client's, with the owner written by the server).
 */
export async function checkUploadCreation(
  club: ClubContext,
  userId: number,
  sessionId: number,
  creation: UploadCreation,
  fields: ClipUploadFields,
): Promise<Record<string, string>> {
  const session = await findVisibleSession(club, sessionId);
  await assertClubCanRecord(club.id);
  if (creation.deferLength || creation.length === null) {
    throw new ApiError('BAD_REQUEST', 'Give the size of the video in the Upload-Length header when the upload starts: uploads of unknown length are not accepted.');
  }
  if (!/^\d{1,16}$/.test(creation.length)) {
    throw new ApiError('BAD_REQUEST', `Upload-Length must be the size of the video in bytes (got "${creation.length}").`);
  }
  const length = Number(creation.length);
  if (length === 0) {
    throw new ApiError('MEDIA_UNREADABLE', 'The file is empty (0 bytes). The upload may have failed: upload the clip again.', { video: 'The file is empty (0 bytes).' });
  }
  if (length > config.uploads.maxBytes) throw tooLarge(config.uploads.maxBytes);
  if (creation.carriesBytes) {
    throw new ApiError('BAD_REQUEST', 'Start the upload without its bytes, then send them in PATCH requests to the address the answer gives.');
  }
  const filename = (creation.metadata.filename ?? '').trim();
  if (filename === '') {
    throw new ApiError('VALIDATION_FAILED', 'Name the video file in the upload metadata ("filename").', { video: 'Name the video file in the upload metadata ("filename").' });
  }
  assertCaptureRateGiven(fields, false);
  const stored: Record<string, string> = { filename: filename.slice(0, 255) };
  for (const key of ['slowMotion', 'captureFps', 'label', 'filetype'] as const) {
    const value = creation.metadata[key];
    if (typeof value === 'string' && value !== '') stored[key] = value.slice(0, 255);
  }
  stored.clubId = String(club.id);
  stored.sessionId = String(session.id);
  stored.userId = String(userId);
  return stored;
}

/**
 * An upload of the caller's: the one they started in this club and session. Anyone else's, or a missing one,
 * is 404 (nothing reveals that it exists); an expired one is 410.
 */
export async function findOwnUpload(club: ClubContext, userId: number, sessionId: number, uploadId: string): Promise<Upload> {
  if (!isUploadId(uploadId)) throw notFound('upload');
  const area = await uploadArea();
  let upload: Upload;
  try {
    upload = await area.store.getUpload(area.storeId(uploadId));
  } catch (err) {
    if (err === ERRORS.FILE_NOT_FOUND || err === ERRORS.FILE_NO_LONGER_EXISTS) throw notFound('upload');
    throw err;
  }
  const meta = upload.metadata ?? {};
  const owner = { clubId: String(club.id), sessionId: String(sessionId), userId: String(userId) };
  if (OWNER_KEYS.some((key) => meta[key] !== owner[key])) throw notFound('upload');
  if (isExpired(upload)) throw expiredUpload();
  return upload;
}

function isExpired(upload: Upload): boolean {
  const expiry = config.uploads.resumableExpiryMs;
  if (expiry <= 0 || !upload.creation_date) return false;
  return Date.now() > new Date(upload.creation_date).getTime() + expiry;
}

export function expiredUpload(): ApiError {
  const hours = +(config.uploads.resumableExpiryMs / 3600_000).toFixed(2);
  return new ApiError('UPLOAD_EXPIRED', `This upload was left unfinished for more than ${hours} hours and its bytes were removed. Start the upload again.`);
}

/**
 * Refuses an upload whose first bytes are not a video, as soon as they have arrived, and removes what it holds,
 * so that a wrong file is not sent in full before it is refused.
 */
export async function checkUploadHead(upload: Upload): Promise<void> {
  if (upload.offset < Math.min(HEAD_BYTES, upload.size ?? HEAD_BYTES)) return;
  const head = await (await uploadArea()).readHead(upload, HEAD_BYTES);
  if (!head) return;
  try {
    checkVideoHead(head, upload.metadata?.filename ?? 'upload');
  } catch (err) {
    if (!isVideoError(err)) throw err;
    await removeUpload(addressId(upload.id));
    throw new ApiError(err.apiCode === 'UNPROCESSABLE' ? 'MEDIA_UNREADABLE' : err.apiCode, err.message, { video: err.message });
  }
}

/** Removes an upload's bytes and its record, and its receipt with `receipt: true` (nothing happens for what is gone). */
export async function removeUpload(uploadId: string, options: { receipt?: boolean } = {}): Promise<void> {
  await (await uploadArea()).remove(uploadId, options);
}

/**
 * What became of a finished upload, kept beside the uploads in progress until it expires like them, so that a
 * client whose answer to the last part was lost (a dropped connection) learns its clip instead of sending the
 * file again: `clipId` null while the clip is being kept.
 */
export interface UploadReceipt {
  clubId: string;
  sessionId: string;
  userId: string;
  sizeBytes: number;
  clipId: number | null;
  jobId: number | null;
  keptAt: string;
}

async function writeReceipt(uploadId: string, receipt: UploadReceipt): Promise<void> {
  await (await uploadArea()).writeReceipt(uploadId, receipt);
}

/** The receipt of an upload of the caller's that has finished (or is being kept right now), else null. */
export async function findOwnReceipt(club: ClubContext, userId: number, sessionId: number, uploadId: string): Promise<UploadReceipt | null> {
  if (!isUploadId(uploadId)) return null;
  const receipt = await (await uploadArea()).readReceipt<UploadReceipt>(uploadId);
  if (!receipt || receipt.clubId !== String(club.id) || receipt.sessionId !== String(sessionId) || receipt.userId !== String(userId)) return null;
  return receipt;
}

/**
 * Turns a complete upload into a clip: its file moves into a work folder (fetched from the bucket with the S3
 * driver; the upload is gone from then on, whatever the outcome) and goes through `acceptUpload`, which checks it, keeps it and queues its processing.
 * A receipt says "being kept" meanwhile and names the clip afterwards; a refused upload leaves none.
 */
export async function finishUpload(club: ClubContext, sessionId: number, upload: Upload) {
  const meta = upload.metadata ?? {};
  const fields = metadataFields(meta);
  if (!fields.success) throw new Error(`Upload ${upload.id} holds fields that were checked at its creation and no longer parse.`);
  const sizeBytes = upload.size ?? upload.offset;
  const id = addressId(upload.id);
  const receipt: UploadReceipt = { clubId: String(club.id), sessionId: String(sessionId), userId: meta.userId ?? '', sizeBytes, clipId: null, jobId: null, keptAt: new Date().toISOString() };
  await writeReceipt(id, receipt);
  const workDir = await storage().workDir('upload');
  const path = join(workDir, 'part-0');
  try {
    await (await uploadArea()).takeOut(upload, path);
    const result = await acceptUpload(club, sessionId, { fields: fields.data, video: [{ path, originalName: meta.filename ?? 'video', sizeBytes }], frames: [], workDir }, config.uploads.maxBytes);
    await writeReceipt(id, { ...receipt, clipId: result.clip.id, jobId: result.job.id });
    return result;
  } catch (err) {
    await rm(workDir, { recursive: true, force: true });
    await removeUpload(id, { receipt: true });
    throw err;
  }
}

/**
 * Removes what expired where uploads wait: unfinished uploads (from their creation), receipts (from the time their
 * clip was kept), and leftovers of either. Returns how many uploads went.
 */
export async function sweepExpiredUploads(): Promise<number> {
  return (await uploadArea()).sweep(config.uploads.resumableExpiryMs);
}

let sweeper: NodeJS.Timeout | null = null;

/**
 * Sweeps expired uploads now (what expired while the process was down) and then every `UPLOAD_SWEEP_MINUTES`
 * (0: never) in this process; the timer never keeps the process alive.
 */
export function startUploadSweeper(onError: (err: unknown) => void): void {
  if (sweeper || config.uploads.resumableSweepMs === 0) return;
  const sweep = () => {
    sweepExpiredUploads().catch(onError);
  };
  sweeper = setInterval(sweep, config.uploads.resumableSweepMs);
  sweeper.unref();
  sweep();
}

export function stopUploadSweeper(): void {
  if (sweeper) clearInterval(sweeper);
  sweeper = null;
}
