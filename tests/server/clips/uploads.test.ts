import { copyFile, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { config } from '../../../server/config';
import { Clip } from '../../../server/models';
import { frameAtTime, frameTimer } from '../../../server/services/frame-times';
import { makeBadFiles, type BadFiles } from '../../../server/video/synth';
import { DEFAULT_MAX_SIDE } from '../../../server/video';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { clipRowCount, clubPath, createSession, flightClip, getJob, upload, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let bad: BadFiles;
let sessionId: number;
let video: string;
const originalLimit = config.uploads.maxBytes;

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-uploads-'));
  fx = await createClubFixture();
  sessionId = await createSession(fx.coach, fx.clubId);
  [bad, { videoPath: video }] = await Promise.all([makeBadFiles(join(dir, 'bad')), flightClip(dir)]);
});

afterEach(() => {
  config.uploads.maxBytes = originalLimit;
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

/** Asserts that a refused upload kept nothing: no clip or job rows, no stored file. */
async function expectNothingKept(before: { clips: number; jobs: number }, filesBefore: string[]): Promise<void> {
  expect(await clipRowCount(fx.clubId)).toEqual(before);
  expect(await store.files()).toEqual(filesBefore);
}

describe('clip uploads', () => {
  it('keeps a good video, queues its processing and serves frames and a strip once the job is done', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video, fields: { label: 'Punt, left foot' } });
    expect(res.status).toBe(201);
    const { clip, job } = res.body.data;
    expect(clip).toMatchObject({
      label: 'Punt, left foot',
      kind: 'video',
      container: 'mp4',
      codec: 'h264',
      width: 320,
      height: 240,
      playbackFps: 30,
      captureFps: 30,
      slowMotion: false,
      frameCount: 48,
      status: 'processing',
      framesReady: false,
      job: { id: job.id, type: 'clip.process', status: 'queued', progress: 0 },
    });
    expect(clip.durationS).toBeCloseTo(1.6, 9);
    expect(await store.storage.list(`clubs/${fx.clubId}/clips/${clip.id}/source`)).toEqual([`clubs/${fx.clubId}/clips/${clip.id}/source/video.mp4`]);

    expect(await testWorker().drain()).toBeGreaterThanOrEqual(1);
    expect(await getJob(fx.coach, fx.clubId, job.id)).toMatchObject({ status: 'done', progress: 100, error: null });
    const ready = (await fx.coach.get(clubPath(fx, `/clips/${clip.id}`))).body.data;
    expect(ready).toMatchObject({ status: 'ready', framesReady: true, frameCount: 48, frameWidth: 320, frameHeight: 240, frameScale: 1, job: { status: 'done', progress: 100 } });
    expect(ready.strip).toMatchObject({ url: `/api/v1/clubs/${fx.clubId}/clips/${clip.id}/strip`, tileCount: 12, tileHeight: 90, tileWidth: 120 });

    const frame = await fx.coach.agent.get(clubPath(fx, `/clips/${clip.id}/frames/47`)).buffer(true);
    expect(frame.status).toBe(200);
    expect(frame.headers['content-type']).toBe('image/jpeg');
    expect((frame.body as Buffer).subarray(0, 3)).toEqual(Buffer.from([0xff, 0xd8, 0xff]));
    const missing = await fx.coach.get(clubPath(fx, `/clips/${clip.id}/frames/48`));
    expect(missing.status).toBe(404);
    expect(missing.body.error.message).toMatch(/frames 0 to 47; there is no frame 48/);
    const strip = await fx.coach.agent.get(clubPath(fx, `/clips/${clip.id}/strip`)).buffer(true);
    expect(strip.status).toBe(200);
    expect(strip.headers['content-type']).toBe('image/jpeg');
  });

  it('serves scaled-down frame images of a wide clip while its pixels stay the clip’s own', async () => {
    const wide = await flightClip(dir, { width: 1600, height: 96, durationS: 0.3 });
    const res = await upload(fx.coach, fx.clubId, sessionId, { video: wide.videoPath });
    expect(res.status).toBe(201);
    await testWorker().drain();
    const clip = (await fx.coach.get(clubPath(fx, `/clips/${res.body.data.clip.id}`))).body.data;
    expect(clip).toMatchObject({ width: 1600, height: 96, frameWidth: DEFAULT_MAX_SIDE, frameScale: DEFAULT_MAX_SIDE / 1600, frameCount: 9 });
    // Points are in clip pixels: x = 1500 is inside the 1600-pixel picture though the images are narrower.
    const flight = await fx.coach.post(clubPath(fx, `/clips/${clip.id}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
    const put = await fx.coach.put(clubPath(fx, `/flights/${flight.body.data.id}/points`), { points: [{ frame: 2, xPx: 1500, yPx: 50 }] });
    expect(put.status).toBe(200);
  });

  it('asks for the capture rate of a slow-motion clip and keeps nothing until it is given', async () => {
    const before = await clipRowCount(fx.clubId);
    const files = await store.files();
    const res = await upload(fx.coach, fx.clubId, sessionId, { video, fields: { slowMotion: 'true' } });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields.captureFps).toMatch(/capture frame rate/);
    await expectNothingKept(before, files);
  });

  it('times a slow-motion clip by its capture rate, and re-times it when the rate is corrected', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video, fields: { slowMotion: 'true', captureFps: '240' } });
    expect(res.status).toBe(201);
    const clip = res.body.data.clip;
    expect(clip).toMatchObject({ playbackFps: 30, captureFps: 240, slowMotion: true, frameCount: 48 });
    expect(clip.durationS).toBeCloseTo(48 / 240, 12);
    await testWorker().drain();

    const athleteId = fx.otherAthleteProfileId;
    const flight = await fx.coach.post(clubPath(fx, `/clips/${clip.id}/flights`), { athleteId, action: 'punt', ballId: 'football-5' });
    expect(flight.status).toBe(201);
    await fx.coach.put(clubPath(fx, `/flights/${flight.body.data.id}/points`), { points: [{ frame: 24, xPx: 100, yPx: 100 }] });
    const points = await fx.coach.get(clubPath(fx, `/flights/${flight.body.data.id}/points`));
    expect(points.body.data[0].tS).toBeCloseTo(24 / 240, 12);

    const patched = await fx.coach.patch(clubPath(fx, `/clips/${clip.id}`), { captureFps: 120 });
    expect(patched.status).toBe(200);
    expect(patched.body.data).toMatchObject({ captureFps: 120, frameCount: 48 });
    expect(patched.body.data.durationS).toBeCloseTo(48 / 120, 12);
    const after = await fx.coach.get(clubPath(fx, `/flights/${flight.body.data.id}/points`));
    expect(after.body.data[0]).toMatchObject({ frame: 24, xPx: 100, yPx: 100 });
    expect(after.body.data[0].tS).toBeCloseTo(24 / 120, 12);
  });

  it('refuses a capture rate of zero with a message naming the field', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video, fields: { slowMotion: 'true', captureFps: '0' } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.captureFps).toMatch(/at least 1 frame per second/);
  });

  it('keeps a set of frames with its stated rate, in natural name order, and extracts them', async () => {
    // Upload out of order and with f10 after f9 by number, not by text.
    const frames = [join(dir, 'f10.png'), join(dir, 'f9.png'), join(dir, 'f2.png')];
    await copyFile(bad.goodFrames[2]!, frames[0]!);
    await copyFile(bad.goodFrames[1]!, frames[1]!);
    await copyFile(bad.goodFrames[0]!, frames[2]!);
    const res = await upload(fx.coach, fx.clubId, sessionId, { frames, fields: { captureFps: '100' } });
    expect(res.status).toBe(201);
    const clip = res.body.data.clip;
    expect(clip).toMatchObject({ kind: 'frames', container: 'png', width: 160, height: 120, frameCount: 3, captureFps: 100, playbackFps: null, originalName: 'f2.png' });
    expect(await store.storage.list(`clubs/${fx.clubId}/clips/${clip.id}/source`)).toHaveLength(3);
    await testWorker().drain();
    const ready = (await fx.coach.get(clubPath(fx, `/clips/${clip.id}`))).body.data;
    expect(ready).toMatchObject({ status: 'ready', framesReady: true, frameCount: 3 });
    const frame = await fx.coach.agent.get(clubPath(fx, `/clips/${clip.id}/frames/2`)).buffer(true);
    expect(frame.status).toBe(200);
  });

  it('keeps a video whose timestamps jump and repeat, says so, and takes the times of its points from the timestamps', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video: bad.jumpyTimestamps });
    expect(res.status).toBe(201);
    const { clip } = res.body.data;
    expect(clip.variableFrameRate).toBe(true);
    expect(clip.timestampWarning).toMatch(/^1 frame repeats the timestamp of the frame before \(the first is frame 30\).* The timestamps jump 2 times \(the first before frame 20/);
    const again = (await fx.coach.get(clubPath(fx, `/clips/${clip.id}`))).body.data;
    expect(again.timestampWarning).toBe(clip.timestampWarning);
    const row = await Clip.findByPk(clip.id);
    expect(row!.frameTimes![20]).toBeCloseTo(20 * 0.04 + 0.5, 3);
    const at = frameTimer(row!);
    expect(at(19)).toBeCloseTo(0.76, 3);
    expect(at(21)).toBeCloseTo(0.84 + 0.5, 3);
    expect(frameAtTime(row!, 1.34)).toBe(21);
  });

  it('keeps a constant-rate video without a timestamp warning', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video });
    expect(res.body.data.clip).toMatchObject({ variableFrameRate: false, timestampWarning: null });
  });

  it('asks for the rate of a frame set and keeps nothing without it', async () => {
    const before = await clipRowCount(fx.clubId);
    const files = await store.files();
    const res = await upload(fx.coach, fx.clubId, sessionId, { frames: bad.goodFrames });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.captureFps).toBeDefined();
    expect(res.body.error.message).toMatch(/A set of frames has no timing of its own/);
    await expectNothingKept(before, files);
  });

  const refusals: [string, () => UploadArgs, number, string, RegExp][] = [
    ['a text file named .mp4', () => ({ video: bad.textAsMp4 }), 415, 'UNSUPPORTED_MEDIA', /not a video/],
    ['a truncated video', () => ({ video: bad.truncatedMp4 }), 422, 'MEDIA_UNREADABLE', /.+/],
    ['a zero-length file', () => ({ video: bad.empty }), 422, 'MEDIA_UNREADABLE', /empty|0 bytes|zero/i],
    ['a video whose codec no decoder reads', () => ({ video: bad.unknownCodec }), 415, 'UNSUPPORTED_MEDIA', /.+/],
    ['a file with sound only', () => ({ video: bad.audioOnly }), 415, 'UNSUPPORTED_MEDIA', /sound only/],
    ['a video whose timestamps go backwards', () => ({ video: bad.backwardsTimestamps }), 422, 'MEDIA_UNREADABLE', /^The clip's timestamps go backwards: frame 15 .* upload its frames with their capture rate\.$/],
    ['frames of mixed sizes', () => ({ frames: bad.mixedSizeFrames, fields: { captureFps: '50' } }), 422, 'MEDIA_UNREADABLE', /f10\.png.*200×150|200×150.*f10\.png/],
    ['no file at all', () => ({ fields: { captureFps: '50' } }), 400, 'VALIDATION_FAILED', /Choose a video/],
    ['a video and frames together', () => ({ video, frames: bad.goodFrames, fields: { captureFps: '50' } }), 400, 'VALIDATION_FAILED', /either one video or a set of frames/],
  ];

  for (const [what, args, status, code, message] of refusals) {
    it(`refuses ${what} with a clear message and keeps no row and no file`, async () => {
      const before = await clipRowCount(fx.clubId);
      const files = await store.files();
      const res = await upload(fx.coach, fx.clubId, sessionId, args());
      expect(res.status).toBe(status);
      expect(res.body.error.code).toBe(code);
      expect(res.body.error.message).toMatch(message);
      expect(res.body.error.message).not.toMatch(/\/tmp\/|\.work|part-\d/);
      await expectNothingKept(before, files);
    });
  }

  it('answers 413 with the limit in the message for an upload over UPLOAD_MAX_BYTES, keeping nothing', async () => {
    config.uploads.maxBytes = 20_000;
    const before = await clipRowCount(fx.clubId);
    const files = await store.files();
    const res = await upload(fx.coach, fx.clubId, sessionId, { video });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('PAYLOAD_TOO_LARGE');
    expect(res.body.error.message).toMatch(/larger than the 19\.5 KiB limit/);
    await expectNothingKept(before, files);
  });

  it('marks the clip failed with the reason, removes partial frames, and processes it after a retry', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video });
    const { clip, job } = res.body.data;
    const sourceKey = `clubs/${fx.clubId}/clips/${clip.id}/source/video.mp4`;
    const saved = join(dir, 'saved.mp4');
    await copyFile(join(store.root, sourceKey), saved);
    await store.storage.removePrefix(`clubs/${fx.clubId}/clips/${clip.id}/source`);
    await testWorker().drain();
    const failed = await getJob(fx.coach, fx.clubId, job.id);
    expect(failed.status).toBe('failed');
    expect(failed.error).toMatch(/missing from storage/);
    const row = await Clip.findByPk(clip.id);
    expect(row).toMatchObject({ status: 'failed', framesReady: false });
    expect(row?.failureReason).toBe(failed.error);
    expect(await store.storage.list(`clubs/${fx.clubId}/clips/${clip.id}/frames`)).toEqual([]);

    await store.storage.importFile(sourceKey, saved);
    const retry = await fx.coach.post(clubPath(fx, `/jobs/${job.id}/retry`));
    expect(retry.status).toBe(202);
    expect((await fx.coach.get(clubPath(fx, `/clips/${clip.id}`))).body.data).toMatchObject({ status: 'processing', failureReason: null });
    await testWorker().drain();
    expect((await fx.coach.get(clubPath(fx, `/clips/${clip.id}`))).body.data).toMatchObject({ status: 'ready', framesReady: true, frameCount: 48 });
  });

  it('deletes a clip without flights and its files; asks for confirmation when it holds flights', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video });
    const clipId = res.body.data.clip.id as number;
    await testWorker().drain();
    const flight = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
    expect(flight.status).toBe(201);
    const refused = await fx.coach.delete(clubPath(fx, `/clips/${clipId}`));
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/holds 1 flight/);
    expect((await fx.coach.delete(clubPath(fx, `/clips/${clipId}?confirm=true`))).status).toBe(204);
    expect(await Clip.findByPk(clipId)).toBeNull();
    expect(await store.storage.list(`clubs/${fx.clubId}/clips/${clipId}`)).toEqual([]);
  });
});

type UploadArgs = Parameters<typeof upload>[3];
