/**
 * Resumable clip uploads (tus) with the S3 driver, against the local S3 fake: the parts go straight into a
 * multipart upload in the bucket, so an upload started through one web process is resumed and finished through
 * another (a second app process on the same bucket and database, no sticky sessions), and what is refused, removed
 * or expired leaves no object and no multipart upload behind.
 */
import { mkdtemp, readFile, rm, utimes } from 'node:fs/promises';
import type { Server as HttpServer } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { CreateMultipartUploadCommand, GetObjectCommand, PutObjectCommand } from '@aws-sdk/client-s3';
import { Metadata } from '@tus/server';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { config } from '../../../server/config';
import { sweepExpiredUploads } from '../../../server/services/clip-uploads';
import { setStorage, type S3Storage } from '../../../server/storage';
import type { BadFiles } from '../../../server/video/synth';
import type { ClubFixture } from '../../support/app';
import { httpSession, type HttpSession } from '../../support/http-session';
import { freePort, startProcess, type ServerProcess } from '../../support/process';
import { S3_FAKE_KEYS, startS3Fake, type S3Fake } from '../../support/s3';
import { clipRowCount, clubPath, getJob } from './helpers';
import { TUS, cutPatch, patchAs, uploadFixture, waitForOffset } from './tus-helpers';
import { testWorker } from './worker-helper';

let fx: ClubFixture;
let fake: S3Fake;
let store: S3Storage;
let scratch: string;
let otherScratch: string;
let dir: string;
let bad: BadFiles;
let sessionId: number;
let video: Buffer;
let server: HttpServer;
let baseA: string;
let baseB: string;
let other: ServerProcess;
let coach: HttpSession;
const originalExpiry = config.uploads.resumableExpiryMs;

beforeAll(async () => {
  fake = await startS3Fake();
  scratch = await mkdtemp(join(tmpdir(), 'arcwright-tus-s3-a-'));
  otherScratch = await mkdtemp(join(tmpdir(), 'arcwright-tus-s3-b-'));
  dir = await mkdtemp(join(tmpdir(), 'arcwright-tus-s3-'));
  store = fake.storage(scratch);
  setStorage(store);
  ({ fx, sessionId, bad, video, server, base: baseA } = await uploadFixture(dir));
  // A second web process on the same bucket and database, with a scratch folder of its own.
  const port = await freePort();
  other = startProcess('server/index.ts', {
    PORT: String(port),
    HOST: '127.0.0.1',
    WORKERS_IN_WEB: '0',
    UPLOAD_SWEEP_MINUTES: '0',
    STORAGE_DRIVER: 's3',
    STORAGE_DIR: otherScratch,
    S3_ENDPOINT: fake.endpoint,
    S3_BUCKET: fake.bucket,
    S3_ACCESS_KEY_ID: S3_FAKE_KEYS.accessKeyId,
    S3_SECRET_ACCESS_KEY: S3_FAKE_KEYS.secretAccessKey,
    S3_FORCE_PATH_STYLE: '1',
  });
  await other.waitForOutput(/Arcwright listening on/);
  baseB = `http://127.0.0.1:${port}`;
  coach = await httpSession(baseA, fx.members.coach.email);
  for (const client of [fx.admin, fx.coach, fx.athlete]) await client.refreshCsrf();
}, 120_000);

afterEach(() => {
  config.uploads.resumableExpiryMs = originalExpiry;
});

afterAll(async () => {
  if (other && other.child.exitCode === null) {
    other.child.kill('SIGTERM');
    await other.exited;
  }
  await new Promise((resolve) => server.close(resolve));
  await fake.stop();
  await Promise.all([scratch, otherScratch, dir].map((d) => rm(d, { recursive: true, force: true })));
});

const uploadsPath = () => `/api/v1/clubs/${fx.clubId}/sessions/${sessionId}/clips/uploads`;

/** A request of the coach's browser session to either web process (same cookie, same CSRF token). */
function send(base: string, path: string, init: { method: string; headers?: Record<string, string>; body?: Buffer }): Promise<Response> {
  return fetch(`${base}${path}`, { method: init.method, headers: { ...TUS, cookie: coach.cookie, 'x-csrf-token': coach.csrfToken, ...init.headers }, body: init.body });
}

async function start(base: string, size: number, meta: Record<string, string> = { filename: 'punt.mp4' }): Promise<string> {
  const res = await send(base, uploadsPath(), { method: 'POST', headers: { 'Upload-Length': String(size), 'Upload-Metadata': Metadata.stringify(meta) } });
  expect(res.status).toBe(201);
  return res.headers.get('location')!;
}

function patch(base: string, location: string, offset: number, bytes: Buffer): Promise<Response> {
  return send(base, location, { method: 'PATCH', headers: { 'Upload-Offset': String(offset), 'Content-Type': 'application/offset+octet-stream' }, body: bytes });
}

const offsetOf = (base: string, location: string) => send(base, location, { method: 'HEAD' });

/** Objects of the bucket's partial-uploads folder that belong to an upload. */
async function objectsOf(location: string): Promise<string[]> {
  const id = location.split('/').pop()!;
  return (await store.list('partial-uploads')).filter((key) => key.includes(id));
}

async function multipartsOf(location: string): Promise<string[]> {
  const id = location.split('/').pop()!;
  return (await fake.multipartUploads()).map((u) => u.key).filter((key) => key.includes(id));
}

/** Bytes whose start is not a video, in a size of several S3 parts' worth (`partial-uploads/<id>` gets real parts). */
function notesOf(bytes: number): Buffer {
  return Buffer.alloc(bytes, 'Fennick Vale training notes. ');
}

describe('resumable clip uploads on S3-compatible storage', () => {
  it('resumes through a second web process an upload cut at 50 % in the first, and keeps the clip in the bucket', async () => {
    const half = Math.floor(video.length / 2);
    const location = await start(baseA, video.length, { filename: 'punt.mp4', label: 'Punt, resumed elsewhere' });
    expect(location).toMatch(new RegExp(`^${uploadsPath()}/[0-9a-f]{32}$`));
    expect(await multipartsOf(location)).toEqual([`partial-uploads/${location.split('/').pop()!}`]);

    const cut = await cutPatch(`${baseA}${location}`, coach, video, half);
    expect(cut).toBeNull();

    // The other process sees the bytes the first one received: they are in the bucket, not on its disk.
    // Note: bytes still in the socket when the connection is cut are lost, so on a busy machine a little less than half may have arrived.
    const offset = await waitForOffset(() => offsetOf(baseB, location), half);
    expect(offset).toBeGreaterThan(half / 2);
    expect(offset).toBeLessThanOrEqual(half);
    const head = await offsetOf(baseB, location);
    expect(head.status).toBe(200);
    expect(head.headers.get('upload-length')).toBe(String(video.length));

    const rest = await patch(baseB, location, offset, video.subarray(offset));
    expect(rest.status).toBe(201);
    const { clip, job } = ((await rest.json()) as { data: { clip: Record<string, unknown>; job: { id: number } } }).data;
    expect(clip).toMatchObject({ label: 'Punt, resumed elsewhere', originalName: 'punt.mp4', kind: 'video', sizeBytes: video.length, frameCount: 48, status: 'processing' });

    const source = `clubs/${fx.clubId}/clips/${clip.id as number}/source`;
    expect(await store.list(source)).toEqual([`${source}/video.mp4`]);
    const kept = await store.localPath(`${source}/video.mp4`);
    expect((await readFile(kept!.path)).equals(video)).toBe(true);
    await kept!.release();
    // Of the upload only its receipt is left; no multipart upload stays open.
    const id = location.split('/').pop()!;
    expect(await objectsOf(location)).toEqual([`partial-uploads/${id}.kept`]);
    expect(await multipartsOf(location)).toEqual([]);

    // The first process answers a client that lost the answer with the clip the second one kept.
    const again = await offsetOf(baseA, location);
    expect(again.status).toBe(200);
    expect(again.headers.get('upload-offset')).toBe(String(video.length));
    expect(again.headers.get('arcwright-clip-id')).toBe(String(clip.id));
    expect(again.headers.get('arcwright-job-id')).toBe(String(job.id));
    expect((await fx.admin.agent.head(location).set(TUS)).status).toBe(404);

    expect(await testWorker().drain()).toBeGreaterThanOrEqual(1);
    expect(await getJob(fx.coach, fx.clubId, job.id)).toMatchObject({ status: 'done' });
    expect((await fx.coach.get(clubPath(fx, `/clips/${clip.id as number}`))).body.data).toMatchObject({ status: 'ready', framesReady: true });
  });

  it('refuses a complete upload that is no video, leaving no object, no multipart upload and no row', async () => {
    const text = await readFile(bad.textAsMp4);
    const location = await start(baseB, text.length, { filename: 'notes.mp4' });
    const before = await clipRowCount(fx.clubId);
    const clubObjects = await store.list(`clubs/${fx.clubId}`);
    const res = await patch(baseB, location, 0, text);
    expect(res.status).toBe(415);
    const body = (await res.json()) as { error: { code: string; message: string } };
    expect(body.error).toMatchObject({ code: 'UNSUPPORTED_MEDIA', message: expect.stringMatching(/not a video/) });
    expect(body.error.message).not.toMatch(/\/tmp\/|\.work|part-\d|partial/);
    expect(await clipRowCount(fx.clubId)).toEqual(before);
    expect(await store.list(`clubs/${fx.clubId}`)).toEqual(clubObjects);
    expect(await objectsOf(location)).toEqual([]);
    expect(await multipartsOf(location)).toEqual([]);
    expect((await offsetOf(baseA, location)).status).toBe(404);
  });

  it('sends a large upload in parts of the multipart upload and refuses it from its first bytes before the rest arrives', async () => {
    // Over S3's 5 MiB minimum, the first PATCH becomes a real part (unreadable until complete): its start is kept beside it.
    const notes = notesOf(6 * 1024 * 1024 + 1000);
    const first = 5 * 1024 * 1024 + 500;
    const location = await start(baseA, notes.length, { filename: 'notes.mp4' });
    expect((await patch(baseA, location, 0, notes.subarray(0, first))).status).toBe(204);
    const id = location.split('/').pop()!;
    expect(await objectsOf(location)).toEqual([`partial-uploads/${id}.head`, `partial-uploads/${id}.info`]);
    expect(Number((await offsetOf(baseB, location)).headers.get('upload-offset'))).toBe(first);

    const res = await patch(baseB, location, first, notes.subarray(first));
    expect(res.status).toBe(415);
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe('UNSUPPORTED_MEDIA');
    expect(await objectsOf(location)).toEqual([]);
    expect(await multipartsOf(location)).toEqual([]);
    expect((await offsetOf(baseA, location)).status).toBe(404);
  });

  it('refuses through the other process a small upload whose first part, held as a tail, is no video', async () => {
    const notes = notesOf(12_000);
    const location = await start(baseA, notes.length, { filename: 'notes.mp4' });
    expect((await patch(baseA, location, 0, notes.subarray(0, 5000))).status).toBe(204);
    expect(await objectsOf(location)).toContain(`partial-uploads/${location.split('/').pop()!}.part`);
    const res = await patch(baseB, location, 5000, notes.subarray(5000));
    expect(res.status).toBe(415);
    expect(await objectsOf(location)).toEqual([]);
    expect(await multipartsOf(location)).toEqual([]);
  });

  it('aborts the multipart upload of an upload the coach abandons (DELETE) through the other process', async () => {
    const location = await start(baseA, video.length);
    expect((await patch(baseA, location, 0, video.subarray(0, 5000))).status).toBe(204);
    expect(await multipartsOf(location)).toHaveLength(1);
    expect((await send(baseB, location, { method: 'DELETE' })).status).toBe(204);
    expect(await objectsOf(location)).toEqual([]);
    expect(await multipartsOf(location)).toEqual([]);
    expect((await offsetOf(baseA, location)).status).toBe(404);
  });

  it('expires an unfinished upload: 410, and the sweep aborts its multipart upload and removes its objects and old receipts', async () => {
    const location = await start(baseA, video.length);
    expect((await patch(baseA, location, 0, video.subarray(0, 5000))).status).toBe(204);
    const keep = await start(baseA, video.length);
    const id = location.split('/').pop()!;
    // Age the upload's record past the expiry (it holds the creation time).
    const infoKey = `partial-uploads/${id}.info`;
    const info = await store.client.send(new GetObjectCommand({ Bucket: store.bucket, Key: infoKey }));
    const record = JSON.parse(await info.Body!.transformToString()) as { creation_date: string };
    record.creation_date = new Date(Date.now() - 2 * 3600_000).toISOString();
    await store.client.send(new PutObjectCommand({ Bucket: store.bucket, Key: infoKey, Body: JSON.stringify(record), Metadata: info.Metadata }));
    config.uploads.resumableExpiryMs = 3600_000;

    expect((await offsetOf(baseA, location)).status).toBe(410);
    const res = await patch(baseA, location, 5000, video.subarray(5000));
    expect(res.status).toBe(410);
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe('UPLOAD_EXPIRED');

    // An old receipt, and a multipart upload whose record is gone (a process stopped between the two), expire too.
    const oldReceipt = 'c'.repeat(32);
    await store.client.send(
      new PutObjectCommand({ Bucket: store.bucket, Key: `partial-uploads/${oldReceipt}.kept`, Body: JSON.stringify({ keptAt: new Date(Date.now() - 2 * 3600_000).toISOString() }) }),
    );
    const orphan = 'd'.repeat(32);
    const started = await store.client.send(new CreateMultipartUploadCommand({ Bucket: store.bucket, Key: `partial-uploads/${orphan}` }));
    const aged = new Date(Date.now() - 2 * 3600_000);
    await utimes(join(fake.directory, fake.bucket, '._S3rver_uploads', started.UploadId!, 'key'), aged, aged);

    expect(await sweepExpiredUploads()).toBe(3);
    const left = await store.list('partial-uploads');
    expect(left.some((key) => key.includes(id) || key.includes(oldReceipt))).toBe(false);
    expect(left.some((key) => key.includes(keep.split('/').pop()!))).toBe(true);
    const open = (await fake.multipartUploads()).map((u) => u.key);
    expect(open.some((key) => key.includes(id) || key.includes(orphan))).toBe(false);
    expect(open).toContain(`partial-uploads/${keep.split('/').pop()!}`);
    expect((await offsetOf(baseB, keep)).status).toBe(200);
    expect((await send(baseB, keep, { method: 'DELETE' })).status).toBe(204);
  });

  it('keeps every upload its owner’s through either process: 404 for another member, 403 for an athlete', async () => {
    const location = await start(baseB, video.length);
    expect((await patch(baseB, location, 0, video.subarray(0, 5000))).status).toBe(204);
    expect((await fx.admin.agent.head(location).set(TUS)).status).toBe(404);
    expect((await fx.athlete.agent.head(location).set(TUS)).status).toBe(403);
    const foreign = await patchAs(fx.admin, location, 5000, video.subarray(5000, 6000));
    expect(foreign.status).toBe(404);
    expect(Number((await offsetOf(baseA, location)).headers.get('upload-offset'))).toBe(5000);
    expect((await send(baseA, location, { method: 'DELETE' })).status).toBe(204);
    expect(await multipartsOf(location)).toEqual([]);
  });
});
