/** Steps of the resumable-upload tests shared by the local-disk and the S3 runs. */
import { readFile } from 'node:fs/promises';
import type { Server as HttpServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { makeBadFiles, type BadFiles } from '../../../server/video/synth';
import { createClubFixture, type ApiClient, type ClubFixture } from '../../support/app';
import { streamedRequest } from '../../support/http-session';
import { createSession, flightClip } from './helpers';

export const TUS = { 'Tus-Resumable': '1.0.0' } as const;

/**
 * Starts the PATCH of a whole file at offset 0, sends its first `sentBytes` and cuts the connection (a dropped
 * network); resolves with null when the cut happened before any answer.
 */
export function cutPatch(url: string, session: { cookie: string; csrfToken: string }, file: Buffer, sentBytes: number) {
  return streamedRequest(url, {
    method: 'PATCH',
    headers: { ...TUS, 'Upload-Offset': '0', 'Content-Type': 'application/offset+octet-stream', cookie: session.cookie, 'x-csrf-token': session.csrfToken },
    declaredBytes: file.length,
    chunks: [file.subarray(0, sentBytes)],
    between: () => new Promise((r) => setTimeout(r, 300)),
    cut: true,
  });
}

/** Asks for the offset (`head()`, a HEAD request) until it reaches `atLeast` or 10 s pass; the last offset. */
export async function waitForOffset(head: () => Promise<Response>, atLeast: number): Promise<number> {
  const until = Date.now() + 10_000;
  for (;;) {
    const offset = Number((await head()).headers.get('upload-offset'));
    if (offset >= atLeast || Date.now() > until) return offset;
    await new Promise((r) => setTimeout(r, 50));
  }
}

export interface UploadFixture {
  fx: ClubFixture;
  sessionId: number;
  bad: BadFiles;
  /** The bytes of a small generated flight clip (48 frames). */
  video: Buffer;
  /** The fixture's app listening on 127.0.0.1 (for requests that need a socket of their own). */
  server: HttpServer;
  base: string;
}

/** A club with a session, the files to upload (made under `dir`) and the app listening on a port. */
export async function uploadFixture(dir: string): Promise<UploadFixture> {
  const fx = await createClubFixture();
  const sessionId = await createSession(fx.coach, fx.clubId);
  const [bad, clip] = await Promise.all([makeBadFiles(join(dir, 'bad')), flightClip(dir)]);
  const video = await readFile(clip.videoPath);
  const server = fx.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  return { fx, sessionId, bad, video, server, base: `http://127.0.0.1:${(server.address() as AddressInfo).port}` };
}

/** A part sent by a supertest client (its cookie and CSRF token) at `offset`. */
export function patchAs(client: ApiClient, path: string, offset: number, bytes: Buffer) {
  return client.agent
    .patch(path)
    .set(TUS)
    .set('X-CSRF-Token', client.csrfToken ?? '')
    .set('Upload-Offset', String(offset))
    .set('Content-Type', 'application/offset+octet-stream')
    .send(bytes);
}
