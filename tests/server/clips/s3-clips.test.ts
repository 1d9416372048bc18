import { mkdtemp, readdir, readFile, rm } from 'node:fs/promises';
import type { Server as HttpServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { Metadata } from '@tus/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, sequelize } from '../../../server/models';
import { setStorage, type S3Storage } from '../../../server/storage';
import type { FlightTruth } from '../../../server/video/synth';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { httpSession } from '../../support/http-session';
import { startS3Fake, type S3Fake } from '../../support/s3';
import { clubPath, createSession, flightClip, getJob, upload } from './helpers';
import { testWorker } from './worker-helper';

let fx: ClubFixture;
let outsider: ClubFixture;
let fake: S3Fake;
let store: S3Storage;
let scratch: string;
let dir: string;
let sessionId: number;
let video: string;
let truth: FlightTruth;

beforeAll(async () => {
  await sequelize.query("DELETE FROM jobs WHERE status IN ('queued', 'running')");
  fake = await startS3Fake();
  scratch = await mkdtemp(join(tmpdir(), 'arcwright-s3-scratch-'));
  dir = await mkdtemp(join(tmpdir(), 'arcwright-s3-clips-'));
  store = fake.storage(scratch);
  setStorage(store);
  [fx, outsider] = await Promise.all([createClubFixture(), createClubFixture()]);
  sessionId = await createSession(fx.coach, fx.clubId);
  ({ videoPath: video, truth } = await flightClip(dir));
});

afterAll(async () => {
  await fake.stop();
  await rm(scratch, { recursive: true, force: true });
  await rm(dir, { recursive: true, force: true });
});

/** What is left in the local scratch root's work folder (downloads for ffmpeg, extraction folders, uploads). */
async function scratchLeft(): Promise<string[]> {
  return readdir(join(scratch, '.work')).catch(() => []);
}

describe('clips on S3-compatible storage', () => {
  it('keeps an upload in the bucket, processes it from a local copy, serves frames after the club check, and cleans scratch', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video, fields: { label: 'Punt into the wind' } });
    expect(res.status).toBe(201);
    const { clip, job } = res.body.data;
    const prefix = `clubs/${fx.clubId}/clips/${clip.id}`;
    expect(await store.list(`${prefix}/source`)).toEqual([`${prefix}/source/video.mp4`]);
    expect(await scratchLeft()).toEqual([]);

    await testWorker().drain();
    expect(await getJob(fx.coach, fx.clubId, job.id)).toMatchObject({ status: 'done', error: null });
    const frames = await store.list(`${prefix}/frames`);
    expect(frames).toContain(`${prefix}/frames/strip.jpg`);
    expect(frames.length).toBe(48 + 1);
    expect(await scratchLeft()).toEqual([]);

    const frame = await fx.coach.agent.get(clubPath(fx, `/clips/${clip.id}/frames/12`)).buffer(true);
    expect(frame.status).toBe(200);
    expect(frame.headers['content-type']).toBe('image/jpeg');
    expect((frame.body as Buffer).subarray(0, 3)).toEqual(Buffer.from([0xff, 0xd8, 0xff]));
    expect(Number(frame.headers['content-length'])).toBe((frame.body as Buffer).length);
    const coachStrip = await fx.coach.agent.get(clubPath(fx, `/clips/${clip.id}/strip`)).buffer(true);
    expect(coachStrip.status).toBe(200);

    // Another club's member learns nothing: 404, no bytes of the object.
    const foreign = await outsider.coach.get(`/api/v1/clubs/${fx.clubId}/clips/${clip.id}/frames/12`);
    expect(foreign.status).toBe(404);
    expect(foreign.headers['content-type']).toMatch(/application\/json/);
  });

  it('follows the ball from a copy of the clip fetched to scratch, and removes the copy', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video });
    const clipId = res.body.data.clip.id as number;
    await testWorker().drain();
    const flight = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
    const start = truth.frames[truth.launchFrame + 2]!;
    const follow = await fx.coach.post(clubPath(fx, `/flights/${flight.body.data.id}/follow`), { frame: start.frame, xPx: start.x, yPx: start.y });
    expect(follow.status).toBe(202);
    await testWorker().drain();
    const job = await getJob(fx.coach, fx.clubId, follow.body.data.id);
    expect(job).toMatchObject({ status: 'done', error: null });
    expect(Number(job.result?.pointCount)).toBeGreaterThan(10);
    expect(await scratchLeft()).toEqual([]);
  });

  it('leaves no frames in the bucket and nothing in scratch when processing fails', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video });
    const { clip, job } = res.body.data;
    const prefix = `clubs/${fx.clubId}/clips/${clip.id}`;
    // The stored video is replaced by bytes ffprobe cannot read.
    await store.put(`${prefix}/source/video.mp4`, Readable.from([Buffer.alloc(64 * 1024, 7)]));
    await testWorker().drain();
    const failed = await getJob(fx.coach, fx.clubId, job.id);
    expect(failed.status).toBe('failed');
    expect(await Clip.findByPk(clip.id)).toMatchObject({ status: 'failed', framesReady: false });
    expect(await store.list(`${prefix}/frames`)).toEqual([]);
    expect(await scratchLeft()).toEqual([]);
  });

  it('sends a resumable upload in two parts straight to the bucket and keeps the clip once its last part is in', async () => {
    const server: HttpServer = fx.app.listen(0, '127.0.0.1');
    await new Promise<void>((resolve) => server.once('listening', resolve));
    try {
      const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
      const coach = await httpSession(base, fx.members.coach.email);
      const bytes = await readFile(video);
      const tus = { 'Tus-Resumable': '1.0.0' };
      const created = await coach.fetch(`/api/v1/clubs/${fx.clubId}/sessions/${sessionId}/clips/uploads`, {
        method: 'POST',
        headers: { ...tus, 'Upload-Length': String(bytes.length), 'Upload-Metadata': Metadata.stringify({ filename: 'kick.mp4', label: 'Resumed kick' }) },
      });
      expect(created.status).toBe(201);
      const location = created.headers.get('location')!;
      const half = Math.floor(bytes.length / 2);
      const first = await coach.fetch(location, { method: 'PATCH', headers: { ...tus, 'Upload-Offset': '0', 'Content-Type': 'application/offset+octet-stream' }, body: bytes.subarray(0, half) });
      expect(first.status).toBe(204);
      const last = await coach.fetch(location, { method: 'PATCH', headers: { ...tus, 'Upload-Offset': String(half), 'Content-Type': 'application/offset+octet-stream' }, body: bytes.subarray(half) });
      expect(last.status).toBe(201);
      const { clip } = ((await last.json()) as { data: { clip: { id: number } } }).data;
      const key = `clubs/${fx.clubId}/clips/${clip.id}/source/video.mp4`;
      expect(await store.stat(key)).toEqual({ key, sizeBytes: bytes.length });
      expect(await scratchLeft()).toEqual([]);
      // The parts went to the bucket, never to the local scratch folder; of the upload only its receipt is left.
      expect(await readdir(join(scratch, '.partial-uploads')).catch(() => [])).toEqual([]);
      const uploadId = location.split('/').pop()!;
      expect((await store.list('partial-uploads')).filter((k) => k.includes(uploadId))).toEqual([`partial-uploads/${uploadId}.kept`]);
      expect(await fake.multipartUploads()).toEqual([]);
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  });

  it('deletes every object of a clip with the clip', async () => {
    const res = await upload(fx.coach, fx.clubId, sessionId, { video });
    const clipId = res.body.data.clip.id as number;
    await testWorker().drain();
    const prefix = `clubs/${fx.clubId}/clips/${clipId}`;
    expect((await store.list(prefix)).length).toBeGreaterThan(1);
    // A member whose role may not delete is refused, and the objects stay.
    expect((await fx.athlete.delete(clubPath(fx, `/clips/${clipId}`))).status).toBe(403);
    expect((await store.list(prefix)).length).toBeGreaterThan(1);
    expect((await fx.coach.delete(clubPath(fx, `/clips/${clipId}`))).status).toBe(204);
    expect(await store.list(prefix)).toEqual([]);
  });
});
