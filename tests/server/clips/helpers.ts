/**
 * Helpers of the clips API tests: a private storage folder, a job worker the test drives, uploads with
 * CSRF, generated clips (real ffmpeg) and counts of what an upload left behind.
 */
import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Response } from 'supertest';
import { QueryTypes } from 'sequelize';
import { Clip, sequelize } from '../../../server/models';
import { LocalDiskStorage, setStorage } from '../../../server/storage';
import { renderFlightClip, type RenderedClip } from '../../../server/video/synth';
import type { ApiClient, ClubFixture } from '../../support/app';

export interface TestStorage {
  root: string;
  storage: LocalDiskStorage;
  /** Every file under the storage root (work folders included), relative paths. */
  files(): Promise<string[]>;
  remove(): Promise<void>;
}

/**
 * Points the app's storage at a fresh temporary folder, and empties the job queue: jobs an earlier test
 * file left queued refer to files of its own (removed) storage, and would only slow this file's workers.
 */
export async function useTestStorage(): Promise<TestStorage> {
  await sequelize.query("DELETE FROM jobs WHERE status IN ('queued', 'running')");
  const root = await mkdtemp(join(tmpdir(), 'arcwright-storage-'));
  const storage = new LocalDiskStorage(root);
  setStorage(storage);
  return {
    root,
    storage,
    async files() {
      const out: string[] = [];
      const walk = async (dir: string, rel: string): Promise<void> => {
        for (const e of await readdir(dir, { withFileTypes: true })) {
          if (e.isDirectory()) await walk(join(dir, e.name), `${rel}${e.name}/`);
          else out.push(`${rel}${e.name}`);
        }
      };
      await walk(root, '');
      return out.sort();
    },
    remove: () => rm(root, { recursive: true, force: true }),
  };
}

export function clubPath(fx: Pick<ClubFixture, 'clubId'>, path: string): string {
  return `/api/v1/clubs/${fx.clubId}${path}`;
}

/** Creates a session through the API and returns its id. */
export async function createSession(client: ApiClient, clubId: number, venue = 'Fennick Vale upper pitch'): Promise<number> {
  const res = await client.post(`/api/v1/clubs/${clubId}/sessions`, { date: '2025-04-12', venue, conditions: { airTemperatureK: 288.15, altitudeM: 0 } });
  if (res.status !== 201) throw new Error(`session create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return (res.body as { data: { id: number } }).data.id;
}

export interface UploadFiles {
  video?: string;
  frames?: string[];
  fields?: Record<string, string>;
}

/** A multipart upload with the client's cookie and CSRF token. */
export async function upload(client: ApiClient, clubId: number, sessionId: number, files: UploadFiles): Promise<Response> {
  if (client.csrfToken === null) await client.refreshCsrf();
  let req = client.agent.post(`/api/v1/clubs/${clubId}/sessions/${sessionId}/clips`).set('X-CSRF-Token', client.csrfToken ?? '');
  for (const [k, v] of Object.entries(files.fields ?? {})) req = req.field(k, v);
  if (files.video) req = req.attach('video', files.video);
  for (const f of files.frames ?? []) req = req.attach('frames', f);
  return req;
}

/** Rows of the clips tables of a club, to prove a refused upload created none. */
export async function clipRowCount(clubId: number): Promise<{ clips: number; jobs: number }> {
  const [row] = await sequelize.query<{ clips: number; jobs: number }>(
    'SELECT (SELECT COUNT(*) FROM clips WHERE club_id = :clubId) AS clips, (SELECT COUNT(*) FROM jobs WHERE club_id = :clubId) AS jobs',
    { type: QueryTypes.SELECT, replacements: { clubId } },
  );
  return { clips: Number(row?.clips ?? 0), jobs: Number(row?.jobs ?? 0) };
}

const rendered = new Map<string, Promise<RenderedClip>>();

/** A small generated flight clip (320×240, 30 fps, 1.6 s by default), made once per test file and spec. */
export function flightClip(dir: string, spec: { width?: number; height?: number; fps?: number; playbackFps?: number; durationS?: number } = {}): Promise<RenderedClip> {
  const width = spec.width ?? 320;
  const height = spec.height ?? 240;
  const fps = spec.fps ?? 30;
  const durationS = spec.durationS ?? 1.6;
  const key = `${width}x${height}@${fps}/${spec.playbackFps ?? fps}:${durationS}`;
  let clip = rendered.get(key);
  if (!clip) {
    clip = renderFlightClip(join(dir, `flight-${width}x${height}-${fps}-${spec.playbackFps ?? fps}.mp4`), {
      width,
      height,
      captureFps: fps,
      playbackFps: spec.playbackFps,
      durationS,
      ballRadiusPx: 6,
      preset: 'ultrafast',
    });
    rendered.set(key, clip);
  }
  return clip;
}

/** A job as the API shows it. */
export interface JobBody {
  id: number;
  status: string;
  progress: number;
  error: string | null;
  result: Record<string, unknown> | null;
}

export async function getJob(client: ApiClient, clubId: number, jobId: number): Promise<JobBody> {
  const res = await client.get(`/api/v1/clubs/${clubId}/jobs/${jobId}`);
  if (res.status !== 200) throw new Error(`job read failed: ${res.status} ${JSON.stringify(res.body)}`);
  return (res.body as { data: JobBody }).data;
}

/** A ready clip row written straight to the database, for tests that need flights but not the clip pipeline. */
export async function insertClip(clubId: number, sessionId: number, label = 'seeded'): Promise<Clip> {
  return Clip.create({
    clubId,
    sessionId,
    label,
    kind: 'video',
    originalName: `${label}.mp4`,
    sizeBytes: 1,
    sourceKey: 'none',
    container: 'mp4',
    codec: 'h264',
    width: 320,
    height: 240,
    playbackFps: 30,
    captureFps: 30,
    frameCount: 48,
    frameNamePattern: null,
    strip: null,
    failureReason: null,
  });
}
