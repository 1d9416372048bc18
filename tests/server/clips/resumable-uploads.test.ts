import { mkdtemp, readFile, rm, utimes, writeFile } from 'node:fs/promises';
import type { Server as HttpServer } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Metadata } from '@tus/server';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { config } from '../../../server/config';
import { sweepExpiredUploads } from '../../../server/services/clip-uploads';
import type { BadFiles } from '../../../server/video/synth';
import type { ApiClient, ClubFixture } from '../../support/app';
import { httpSession, type HttpSession } from '../../support/http-session';
import { clipRowCount, clubPath, createSession, getJob, useTestStorage, type TestStorage } from './helpers';
import { TUS, cutPatch, patchAs, uploadFixture, waitForOffset } from './tus-helpers';
import { testWorker } from './worker-helper';

let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let bad: BadFiles;
let sessionId: number;
let video: Buffer;
let server: HttpServer;
let base: string;
let coach: HttpSession;
const originalLimit = config.uploads.maxBytes;
const originalExpiry = config.uploads.resumableExpiryMs;

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-resumable-'));
  ({ fx, sessionId, bad, video, server, base } = await uploadFixture(dir));
  coach = await httpSession(base, fx.members.coach.email);
  for (const client of [fx.admin, fx.coach, fx.athlete, fx.outsider, fx.anonymous]) await client.refreshCsrf();
});

afterEach(() => {
  config.uploads.maxBytes = originalLimit;
  config.uploads.resumableExpiryMs = originalExpiry;
});

afterAll(async () => {
  await new Promise((resolve) => server.close(resolve));
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

const uploadsPath = (clubId = fx.clubId, session = sessionId) => `/api/v1/clubs/${clubId}/sessions/${session}/clips/uploads`;

/** Starts an upload through a supertest client (cookie and CSRF token handled). */
function start(client: ApiClient, size: number, meta: Record<string, string> = { filename: 'punt.mp4' }, path = uploadsPath()) {
  return client.agent
    .post(path)
    .set(TUS)
    .set('X-CSRF-Token', client.csrfToken ?? '')
    .set('Upload-Length', String(size))
    .set('Upload-Metadata', Metadata.stringify(meta));
}

async function startOverHttp(size: number, meta: Record<string, string> = { filename: 'punt.mp4' }): Promise<string> {
  const res = await coach.fetch(uploadsPath(), { method: 'POST', headers: { ...TUS, 'Upload-Length': String(size), 'Upload-Metadata': Metadata.stringify(meta) } });
  expect(res.status).toBe(201);
  return res.headers.get('location')!;
}

async function patch(location: string, offset: number, bytes: Buffer): Promise<Response> {
  return coach.fetch(location, {
    method: 'PATCH',
    headers: { ...TUS, 'Upload-Offset': String(offset), 'Content-Type': 'application/offset+octet-stream' },
    body: bytes,
  });
}

async function offsetOf(location: string): Promise<Response> {
  return coach.fetch(location, { method: 'HEAD', headers: TUS });
}

/** Files under the storage root that belong to uploads in progress. */
async function partialFiles(): Promise<string[]> {
  return (await store.files()).filter((f) => f.startsWith('.partial-uploads/'));
}

describe('resumable clip uploads (tus)', () => {
  it('resumes an upload cut at 50 % from the offset the server reports, then keeps and processes the clip', async () => {
    const half = Math.floor(video.length / 2);
    const location = await startOverHttp(video.length, { filename: 'punt.mp4', label: 'Punt, cut at half' });
    expect(location).toMatch(new RegExp(`^${uploadsPath()}/[0-9a-f]{32}$`));

    const cut = await cutPatch(`${base}${location}`, coach, video, half);
    expect(cut).toBeNull();

    const offset = await waitForOffset(() => offsetOf(location), half);
    expect(offset).toBe(half);
    const head = await offsetOf(location);
    expect(head.status).toBe(200);
    expect(head.headers.get('upload-length')).toBe(String(video.length));
    expect(head.headers.get('cache-control')).toBe('no-store');

    const rest = await patch(location, offset, video.subarray(offset));
    expect(rest.status).toBe(201);
    expect(rest.headers.get('upload-offset')).toBe(String(video.length));
    const { clip, job } = ((await rest.json()) as { data: { clip: Record<string, unknown>; job: { id: number } } }).data;
    expect(clip).toMatchObject({ label: 'Punt, cut at half', originalName: 'punt.mp4', kind: 'video', sizeBytes: video.length, frameCount: 48, status: 'processing' });
    const uploadId = location.split('/').pop()!;
    expect((await partialFiles()).filter((f) => f.includes(uploadId))).toEqual([`.partial-uploads/${uploadId}.kept`]);
    expect(await store.storage.list(`clubs/${fx.clubId}/clips/${clip.id as number}/source`)).toEqual([`clubs/${fx.clubId}/clips/${clip.id as number}/source/video.mp4`]);
    const kept = await store.storage.localPath(`clubs/${fx.clubId}/clips/${clip.id as number}/source/video.mp4`);
    expect((await readFile(kept!.path)).equals(video)).toBe(true);

    expect(await testWorker().drain()).toBeGreaterThanOrEqual(1);
    expect(await getJob(fx.coach, fx.clubId, job.id)).toMatchObject({ status: 'done', progress: 100 });
    expect((await fx.coach.get(clubPath(fx, `/clips/${clip.id as number}`))).body.data).toMatchObject({ status: 'ready', framesReady: true });
    // The bytes are gone; asking again (a client that lost the answer) finds the upload complete, with its clip.
    const again = await offsetOf(location);
    expect(again.status).toBe(200);
    expect(again.headers.get('upload-offset')).toBe(String(video.length));
    expect(again.headers.get('upload-length')).toBe(String(video.length));
    expect(again.headers.get('arcwright-clip-id')).toBe(String(clip.id));
    expect(again.headers.get('arcwright-job-id')).toBe(String(job.id));
    expect((await fx.admin.agent.head(location).set(TUS)).status).toBe(404);
    expect((await fx.outsider.agent.head(location).set(TUS)).status).toBe(404);
  });

  it('answers a part that does not start at the offset with 409 and a message saying what to do', async () => {
    const location = await startOverHttp(video.length);
    const res = await patch(location, 100, video.subarray(100, 200));
    expect(res.status).toBe(409);
    expect(res.headers.get('content-type')).toMatch(/application\/json/);
    expect(((await res.json()) as { error: { code: string; message: string } }).error).toMatchObject({ code: 'CONFLICT', message: expect.stringMatching(/ask for the offset \(HEAD\)/) });
    await coach.fetch(location, { method: 'DELETE', headers: TUS });
  });

  it('refuses an Upload-Length over UPLOAD_MAX_BYTES at creation with the limit in the message, keeping nothing', async () => {
    config.uploads.maxBytes = 20_000;
    const before = await partialFiles();
    const res = await start(fx.coach, 20_001);
    expect(res.status).toBe(413);
    expect(res.body.error).toMatchObject({ code: 'PAYLOAD_TOO_LARGE', message: expect.stringMatching(/larger than the 19\.5 KiB limit/) });
    expect(await partialFiles()).toEqual(before);
  });

  const creationRefusals: [string, () => ReturnType<typeof start>, number, string, RegExp][] = [
    ['no file name', () => start(fx.coach, 1000, { label: 'x' }), 400, 'VALIDATION_FAILED', /Name the video file/],
    ['a zero length', () => start(fx.coach, 0), 422, 'MEDIA_UNREADABLE', /empty \(0 bytes\)/],
    ['slow motion without its capture rate', () => start(fx.coach, 1000, { filename: 'a.mp4', slowMotion: 'true' }), 400, 'VALIDATION_FAILED', /give the capture frame rate/],
    ['a capture rate of zero', () => start(fx.coach, 1000, { filename: 'a.mp4', slowMotion: 'true', captureFps: '0' }), 400, 'VALIDATION_FAILED', /captureFps/],
    ['an unknown length', () => start(fx.coach, 1000).unset('Upload-Length').set('Upload-Defer-Length', '1'), 400, 'BAD_REQUEST', /Upload-Length/],
    ['no protocol header', () => start(fx.coach, 1000).unset('Tus-Resumable'), 400, 'BAD_REQUEST', /Tus-Resumable: 1\.0\.0/],
    ['bytes in the creation request', () => start(fx.coach, 10).set('Content-Type', 'application/offset+octet-stream').send(Buffer.alloc(10)), 400, 'BAD_REQUEST', /PATCH requests/],
  ];
  for (const [what, send, status, code, message] of creationRefusals) {
    it(`refuses to start an upload with ${what}, clearly, keeping nothing`, async () => {
      const before = await partialFiles();
      const res = await send();
      expect(res.status).toBe(status);
      expect(res.body.error).toMatchObject({ code, message: expect.stringMatching(message) });
      expect(await partialFiles()).toEqual(before);
    });
  }

  it('refuses a file that is no video as soon as its first bytes are in, and removes what arrived', async () => {
    const notes = Buffer.alloc(12_000, 'Fennick Vale training notes. ');
    const partialBefore = await partialFiles();
    const location = await startOverHttp(notes.length, { filename: 'notes.mp4' });
    expect((await patch(location, 0, notes.subarray(0, 5000))).status).toBe(204);
    const before = await clipRowCount(fx.clubId);
    const res = await patch(location, 5000, notes.subarray(5000));
    expect(res.status).toBe(415);
    expect(((await res.json()) as { error: { code: string; message: string } }).error).toMatchObject({ code: 'UNSUPPORTED_MEDIA', message: expect.stringMatching(/not a video/) });
    expect(await partialFiles()).toEqual(partialBefore);
    expect(await clipRowCount(fx.clubId)).toEqual(before);
    expect((await offsetOf(location)).status).toBe(404);
  });

  it('refuses a small complete upload that is no video with the multipart upload’s message, keeping no row and no file', async () => {
    const text = await readFile(bad.textAsMp4);
    const location = await startOverHttp(text.length, { filename: 'notes.mp4' });
    const before = await clipRowCount(fx.clubId);
    const outsidePartial = async () => (await store.files()).filter((f) => !f.startsWith('.partial-uploads/'));
    const filesBefore = await outsidePartial();
    const res = await patch(location, 0, text);
    expect(res.status).toBe(415);
    const body = (await res.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe('UNSUPPORTED_MEDIA');
    expect(body.error.message).toMatch(/not a video/);
    expect(body.error.message).not.toMatch(/\/tmp\/|\.work|part-\d|partial/);
    expect(await clipRowCount(fx.clubId)).toEqual(before);
    expect(await outsidePartial()).toEqual(filesBefore);
    expect((await partialFiles()).some((f) => f.includes(location.split('/').pop()!))).toBe(false);
    expect((await offsetOf(location)).status).toBe(404);
  });

  it('answers 423 while a finished upload is being kept, so that a client asks again instead of starting over', async () => {
    const id = 'b'.repeat(32);
    const receipt = { clubId: String(fx.clubId), sessionId: String(sessionId), userId: String(fx.members.coach.userId), sizeBytes: 10, clipId: null, jobId: null, keptAt: new Date().toISOString() };
    await writeFile(join(store.root, '.partial-uploads', `${id}.kept`), JSON.stringify(receipt));
    expect((await offsetOf(`${uploadsPath()}/${id}`)).status).toBe(423);
    expect((await fx.admin.agent.head(`${uploadsPath()}/${id}`).set(TUS)).status).toBe(404);
    await rm(join(store.root, '.partial-uploads', `${id}.kept`));
  });

  it('removes the bytes of an upload the coach abandons (DELETE)', async () => {
    const before = await partialFiles();
    const location = await startOverHttp(video.length);
    expect((await patch(location, 0, video.subarray(0, 5000))).status).toBe(204);
    expect(await partialFiles()).toHaveLength(before.length + 2);
    expect((await coach.fetch(location, { method: 'DELETE', headers: TUS })).status).toBe(204);
    expect(await partialFiles()).toEqual(before);
  });

  it('expires an upload left unfinished: 410 with a message, and the sweep removes its bytes', async () => {
    const location = await startOverHttp(video.length);
    expect((await patch(location, 0, video.subarray(0, 5000))).status).toBe(204);
    const keep = await startOverHttp(video.length);
    // Age the first upload past the expiry (its record holds its creation time).
    const id = location.split('/').pop()!;
    const recordPath = join(store.root, '.partial-uploads', `${id}.json`);
    const record = JSON.parse(await readFile(recordPath, 'utf8')) as { creation_date: string };
    record.creation_date = new Date(Date.now() - 2 * 3600_000).toISOString();
    await writeFile(recordPath, JSON.stringify(record));
    config.uploads.resumableExpiryMs = 3600_000;

    expect((await offsetOf(location)).status).toBe(410);
    const res = await patch(location, 5000, video.subarray(5000));
    expect(res.status).toBe(410);
    expect(((await res.json()) as { error: { code: string; message: string } }).error).toMatchObject({
      code: 'UPLOAD_EXPIRED',
      message: expect.stringMatching(/unfinished for more than 1 hours.*Start the upload again/),
    });
    // A receipt expires too, and bytes left without their record.
    const oldReceipt = 'c'.repeat(32);
    await writeFile(join(store.root, '.partial-uploads', `${oldReceipt}.kept`), JSON.stringify({ keptAt: new Date(Date.now() - 2 * 3600_000).toISOString() }));
    const stray = 'd'.repeat(32);
    await writeFile(join(store.root, '.partial-uploads', stray), 'bytes');
    await utimes(join(store.root, '.partial-uploads', stray), new Date(Date.now() - 2 * 3600_000), new Date(Date.now() - 2 * 3600_000));
    expect(await sweepExpiredUploads()).toBe(3);
    const left = await partialFiles();
    expect(left.some((f) => f.includes(id) || f.includes(oldReceipt) || f.includes(stray))).toBe(false);
    expect(left.some((f) => f.includes(keep.split('/').pop()!))).toBe(true);
    expect((await offsetOf(keep)).status).toBe(200);
    await coach.fetch(keep, { method: 'DELETE', headers: TUS });
  });

  describe('denials', () => {
    let location: string;
    let id: string;
    beforeAll(async () => {
      location = await startOverHttp(video.length);
      expect((await patch(location, 0, video.subarray(0, 5000))).status).toBe(204);
      id = location.split('/').pop()!;
    });

    const offsetStays = async () => expect(Number((await offsetOf(location)).headers.get('upload-offset'))).toBe(5000);

    it('answers another club’s admin 404 at creation and for the upload, through either club', async () => {
      expect((await start(fx.outsider, 1000)).status).toBe(404);
      expect((await fx.outsider.agent.head(location).set(TUS)).status).toBe(404);
      const outsiderSession = await createSession(fx.outsider, fx.otherClubId, 'Elsewhere');
      const viaOwnClub = `${uploadsPath(fx.otherClubId, outsiderSession)}/${id}`;
      expect((await fx.outsider.agent.head(viaOwnClub).set(TUS)).status).toBe(404);
      await fx.outsider.refreshCsrf();
      const res = await patchAs(fx.outsider, viaOwnClub, 5000, video.subarray(5000, 6000));
      expect(res.status).toBe(404);
      expect(res.body.error.code).toBe('NOT_FOUND');
      await offsetStays();
    });

    it('answers 404 for an upload another member of the club started, and for one of another session', async () => {
      expect((await fx.admin.agent.head(location).set(TUS)).status).toBe(404);
      const otherSession = await createSession(fx.coach, fx.clubId, 'Other day');
      expect((await coach.fetch(`${uploadsPath(fx.clubId, otherSession)}/${id}`, { method: 'HEAD', headers: TUS })).status).toBe(404);
      await offsetStays();
    });

    it('keeps the owner the server wrote, whatever owner the client puts in the metadata', async () => {
      const res = await start(fx.coach, 1000, { filename: 'a.mp4', clubId: String(fx.otherClubId), userId: String(fx.members.admin.userId), sessionId: '1' });
      expect(res.status).toBe(201);
      const spoofed = res.headers.location as string;
      expect((await fx.admin.agent.head(spoofed).set(TUS)).status).toBe(404);
      const head = await fx.coach.agent.head(spoofed).set(TUS);
      expect(head.status).toBe(200);
      expect(Metadata.parse(head.headers['upload-metadata'] as string)).toMatchObject({ clubId: String(fx.clubId), sessionId: String(sessionId), userId: String(fx.members.coach.userId) });
      await fx.coach.agent.delete(spoofed).set(TUS).set('X-CSRF-Token', fx.coach.csrfToken!);
    });

    it('answers an athlete 403 at creation, for the offset, a part and a removal', async () => {
      expect((await start(fx.athlete, 1000)).status).toBe(403);
      expect((await fx.athlete.agent.head(location).set(TUS)).status).toBe(403);
      const res = await fx.athlete.patch(location, undefined);
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('FORBIDDEN');
      expect((await fx.athlete.delete(location)).status).toBe(403);
      await offsetStays();
    });

    it('answers 401 without a session and 403 without the CSRF token', async () => {
      expect((await start(fx.anonymous, 1000)).status).toBe(401);
      expect((await fx.anonymous.agent.head(location).set(TUS)).status).toBe(401);
      const noToken = await fx.coach.agent.post(uploadsPath()).set(TUS).set('Upload-Length', '1000').set('Upload-Metadata', Metadata.stringify({ filename: 'a.mp4' }));
      expect(noToken.status).toBe(403);
      expect(noToken.body.error.code).toBe('CSRF_INVALID');
      const bare = await fetch(`${base}${location}`, {
        method: 'PATCH',
        headers: { ...TUS, cookie: coach.cookie, 'Upload-Offset': '5000', 'Content-Type': 'application/offset+octet-stream' },
        body: video.subarray(5000, 6000),
      });
      expect(bare.status).toBe(403);
      expect(((await bare.json()) as { error: { code: string } }).error.code).toBe('CSRF_INVALID');
      const removal = await fetch(`${base}${location}`, { method: 'DELETE', headers: { ...TUS, cookie: coach.cookie } });
      expect(removal.status).toBe(403);
      await offsetStays();
    });

    it('answers 404 for an id that is not one', async () => {
      expect((await coach.fetch(`${uploadsPath()}/..%2F..%2Fetc`, { method: 'HEAD', headers: TUS })).status).toBe(404);
      expect((await coach.fetch(`${uploadsPath()}/${'0'.repeat(32)}`, { method: 'HEAD', headers: TUS })).status).toBe(404);
    });
  });
});
