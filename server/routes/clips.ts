import { Router, type Request, type Response } from 'express';
import { rm } from 'node:fs/promises';
import multer from 'multer';
import { calibrationInputSchema } from '../../shared/schemas/calibration';
import { clipListQuerySchema, clipPatchSchema, clipUploadFieldsSchema } from '../../shared/schemas/clip';
import { MAX_TRACK_POINTS } from '../../shared/schemas/track';
import { config } from '../config';
import { confirmed } from '../http/confirm';
import { discardBody } from '../http/discard-body';
import { ApiError, parseId } from '../http/errors';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validate, validationError } from '../middleware/validate';
import { deleteCalibration, getCalibration, setCalibration } from '../services/calibration';
import { acceptUpload, deleteClip, frameImage, getClip, listClips, listSessionClips, patchClip, stripImage, tooLarge, type UploadedFile } from '../services/clips';
import { assertClubCanRecord } from '../services/subscriptions';
import { findVisibleSession } from '../services/visibility';
import { storage } from '../storage';
import { uploadWorkPurpose } from '../storage/work-names';

/** Most files in one frame-set upload. */
const MAX_FRAMES = MAX_TRACK_POINTS;
/** Room for multipart boundaries and text fields when judging the declared length against the limit. */
const MULTIPART_OVERHEAD_BYTES = 1024 * 1024;

const CONTROL_CHARACTER = /[\u0000-\u001f\u007f]/;

/** Runs multer into a fresh work folder in storage (streamed to disk, never held in memory). */
async function receive(req: Request, res: Response, maxBytes: number): Promise<{ workDir: string; files: Record<string, UploadedFile[]> }> {
  const declared = Number(req.headers['content-length']);
  if (Number.isFinite(declared) && declared > maxBytes + MULTIPART_OVERHEAD_BYTES) {
    res.setHeader('Connection', 'close');
    throw tooLarge(maxBytes);
  }
  const workDir = await storage().workDir(uploadWorkPurpose());
  let n = 0;
  const upload = multer({
    storage: multer.diskStorage({ destination: workDir, filename: (_req, _file, cb) => cb(null, `part-${n++}`) }),
    limits: { fileSize: maxBytes, files: MAX_FRAMES + 1, fields: 20, fieldSize: 10_000, parts: MAX_FRAMES + 30 },
  }).fields([
    { name: 'video', maxCount: 1 },
    { name: 'frames', maxCount: MAX_FRAMES },
  ]);
  try {
    await new Promise<void>((resolve, reject) => upload(req, res, (err: unknown) => (err ? reject(err) : resolve())));
  } catch (err) {
    await rm(workDir, { recursive: true, force: true });
    const code = (err as { code?: string; name?: string }).name === 'MulterError' ? (err as { code: string }).code : null;
    if (code === 'LIMIT_FILE_SIZE') {
      res.setHeader('Connection', 'close');
      throw tooLarge(maxBytes);
    }
    if (code === 'LIMIT_UNEXPECTED_FILE') {
      throw new ApiError('VALIDATION_FAILED', `Unexpected file field "${(err as { field?: string }).field ?? ''}": send one video in "video", or the frames in "frames" (at most ${MAX_FRAMES}).`, {
        video: 'Send the video in the field "video", or the frames in "frames".',
      });
    }
    if (code) throw new ApiError('BAD_REQUEST', `The upload could not be read (${(err as Error).message}). Send the form the upload page sends.`);
    if ((err as Error).message?.includes('Multipart: Boundary not found') || (err as Error).message?.includes('Unexpected end of form')) {
      throw new ApiError('BAD_REQUEST', 'The upload ended before it was complete. Check the connection and upload again.');
    }
    throw err;
  }
  const raw = (req.files ?? {}) as Record<string, Express.Multer.File[]>;
  const files: Record<string, UploadedFile[]> = {};
  for (const [field, list] of Object.entries(raw)) {
    files[field] = list.map((f) => ({ path: f.path, originalName: Buffer.from(f.originalname, 'latin1').toString('utf8'), sizeBytes: f.size }));
  }
  // A control character (NUL above all) in a file name is never a real name and breaks paths and logs.
  const badName = Object.values(files).flat().find((f) => CONTROL_CHARACTER.test(f.originalName));
  if (badName) {
    await rm(workDir, { recursive: true, force: true });
    throw new ApiError('BAD_REQUEST', 'A file name holds a control character (such as NUL). Rename the file and upload it again.', {
      file: 'Rename the file: letters, digits, spaces and punctuation only.',
    });
  }
  return { workDir, files };
}

/**
 * Clips: upload (admins and coaches), list and read (an athlete: clips holding their own flights),
 * frames and thumbnail strip as images, capture-rate correction, calibration.
 */
export const clipsRouter = Router();

clipsRouter.get('/clubs/:clubId/sessions/:sessionId/clips', clubAccess(...ANY_ROLE), async (req, res) => {
  const clips = await listSessionClips(clubOf(req), parseId(req.params.sessionId, 'session'));
  res.json({ data: clips, meta: { total: clips.length } });
});

clipsRouter.post('/clubs/:clubId/sessions/:sessionId/clips', clubAccess('admin', 'coach'), async (req, res) => {
  const club = clubOf(req);
  const sessionId = parseId(req.params.sessionId, 'session');
  // 404, or a lapsed subscription, before storing a byte of the upload.
  try {
    await findVisibleSession(club, sessionId);
    await assertClubCanRecord(club.id);
  } catch (err) {
    await discardBody(req, res);
    throw err;
  }
  const maxBytes = config.uploads.maxBytes;
  const { workDir, files } = await receive(req, res, maxBytes);
  const parsed = clipUploadFieldsSchema.safeParse(req.body ?? {});
  if (!parsed.success) {
    await rm(workDir, { recursive: true, force: true });
    throw validationError(parsed.error);
  }
  const result = await acceptUpload(club, sessionId, { fields: parsed.data, video: files.video ?? [], frames: files.frames ?? [], workDir }, maxBytes);
  res.status(201).json({ data: result });
});

clipsRouter.get('/clubs/:clubId/clips', clubAccess(...ANY_ROLE), async (req, res) => {
  const query = clipListQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  res.json(await listClips(clubOf(req), query.data));
});

clipsRouter.get('/clubs/:clubId/clips/:clipId', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await getClip(clubOf(req), parseId(req.params.clipId, 'clip')) });
});

clipsRouter.patch('/clubs/:clubId/clips/:clipId', clubAccess('admin', 'coach'), validate(clipPatchSchema), async (req, res) => {
  res.json({ data: await patchClip(clubOf(req), parseId(req.params.clipId, 'clip'), req.body) });
});

clipsRouter.delete('/clubs/:clubId/clips/:clipId', clubAccess('admin', 'coach'), async (req, res) => {
  await deleteClip(clubOf(req), parseId(req.params.clipId, 'clip'), confirmed(req));
  res.status(204).end();
});

async function sendImage(res: Response, image: { stream: NodeJS.ReadableStream; sizeBytes: number }): Promise<void> {
  res.setHeader('Content-Type', 'image/jpeg');
  res.setHeader('Content-Length', String(image.sizeBytes));
  // Frames never change once extracted; a reprocessed clip gets no new ids, so keep the cache short and private.
  res.setHeader('Cache-Control', 'private, max-age=300');
  await new Promise<void>((resolve, reject) => {
    image.stream.on('error', reject);
    res.on('finish', resolve);
    res.on('close', resolve);
    image.stream.pipe(res);
  });
}

clipsRouter.get('/clubs/:clubId/clips/:clipId/frames/:n', clubAccess(...ANY_ROLE), async (req, res) => {
  const raw = String(req.params.n);
  if (!/^\d{1,9}$/.test(raw)) throw new ApiError('NOT_FOUND', `"${raw}" is not a frame number: frames are numbered from 0.`);
  await sendImage(res, await frameImage(clubOf(req), parseId(req.params.clipId, 'clip'), Number(raw)));
});

clipsRouter.get('/clubs/:clubId/clips/:clipId/strip', clubAccess(...ANY_ROLE), async (req, res) => {
  await sendImage(res, await stripImage(clubOf(req), parseId(req.params.clipId, 'clip')));
});

clipsRouter.get('/clubs/:clubId/clips/:clipId/calibration', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await getCalibration(clubOf(req), parseId(req.params.clipId, 'clip')) });
});

clipsRouter.put('/clubs/:clubId/clips/:clipId/calibration', clubAccess('admin', 'coach'), validate(calibrationInputSchema), async (req, res) => {
  res.json({ data: await setCalibration(clubOf(req), parseId(req.params.clipId, 'clip'), req.body) });
});

clipsRouter.delete('/clubs/:clubId/clips/:clipId/calibration', clubAccess('admin', 'coach'), async (req, res) => {
  await deleteCalibration(clubOf(req), parseId(req.params.clipId, 'clip'));
  res.status(204).end();
});
