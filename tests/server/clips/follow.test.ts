import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FlightTruth } from '../../../server/video/synth';
import { createClubFixture, type ClubFixture } from '../../support/app';
import { clubPath, createSession, flightClip, getJob, upload, useTestStorage, type TestStorage } from './helpers';
import { testWorker } from './worker-helper';

let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let clipId: number;
let truth: FlightTruth;

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-follow-'));
  fx = await createClubFixture();
  const sessionId = await createSession(fx.coach, fx.clubId);
  const clip = await flightClip(dir);
  truth = clip.truth;
  const res = await upload(fx.coach, fx.clubId, sessionId, { video: clip.videoPath });
  clipId = res.body.data.clip.id;
  await testWorker().drain();
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

interface Point {
  frame: number;
  xPx: number;
  yPx: number;
  source: string;
  confidence: number | null;
}

const median = (values: number[]) => {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
};

describe('auto-follow job', () => {
  it('refuses to start outside the flight or off the picture', async () => {
    const flight = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5', frameStart: 5, frameEnd: 40 });
    const id = flight.body.data.id;
    const early = await fx.coach.post(clubPath(fx, `/flights/${id}/follow`), { frame: 2, xPx: 10, yPx: 10 });
    expect(early.status).toBe(400);
    expect(early.body.error.message).toMatch(/Frame 2 is outside this flight's frames 5–40/);
    const off = await fx.coach.post(clubPath(fx, `/flights/${id}/follow`), { frame: 10, xPx: 10, yPx: 500 });
    expect(off.status).toBe(400);
    expect(off.body.error.message).toMatch(/outside the 320×240 picture/);
  });

  it('follows the ball from one click, keeps the points before it, and places the centres near the truth', async () => {
    const flight = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
    const id = flight.body.data.id as number;
    const start = truth.frames[truth.launchFrame + 2]!;
    await fx.coach.put(clubPath(fx, `/flights/${id}/points`), { points: [{ frame: 1, xPx: 20, yPx: 200 }, { frame: start.frame + 3, xPx: 1, yPx: 1 }] });
    const res = await fx.coach.post(clubPath(fx, `/flights/${id}/follow`), { frame: start.frame, xPx: start.x + 1, yPx: start.y - 1 });
    expect(res.status).toBe(202);
    expect(res.body.data).toMatchObject({ type: 'flight.follow', status: 'queued', flightId: id, clipId });
    await testWorker().drain();

    const job = await getJob(fx.coach, fx.clubId, res.body.data.id);
    expect(job).toMatchObject({ status: 'done', progress: 100, error: null });
    expect(job.result).toMatchObject({ stoppedBecause: expect.any(String) });
    const points = (await fx.coach.get(clubPath(fx, `/flights/${id}/points`))).body.data as Point[];
    // The manual point before the click stays; the one after it was replaced by followed points.
    expect(points[0]).toMatchObject({ frame: 1, xPx: 20, yPx: 200, source: 'manual' });
    const auto = points.filter((p) => p.source === 'auto');
    expect(auto.length).toBe(job.result!.pointCount);
    expect(auto[0]!.frame).toBe(start.frame);
    expect(points.some((p) => p.xPx === 1 && p.yPx === 1)).toBe(false);
    for (const p of auto) expect(p.confidence).toBeGreaterThanOrEqual(0);

    // The follower's acceptance bar: median error ≤ 1.5 px, ≥ 95 % of the visible airborne frames from the click.
    const errors = auto.map((p) => {
      const t = truth.frames[p.frame]!;
      return Math.hypot(p.xPx - t.x, p.yPx - t.y);
    });
    expect(median(errors)).toBeLessThanOrEqual(1.5);
    const expected = truth.frames.filter((f) => f.frame >= start.frame && f.visible && f.airborne).length;
    expect(auto.length).toBeGreaterThanOrEqual(Math.floor(0.95 * expected));
    const detail = await fx.coach.get(clubPath(fx, `/flights/${id}`));
    expect(detail.body.data).toMatchObject({ status: 'traced', job: { type: 'flight.follow', status: 'done' } });
  });

  it('resumes from a later point, replacing only the points from there on', async () => {
    const flight = await fx.coach.post(clubPath(fx, `/clips/${clipId}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
    const id = flight.body.data.id as number;
    const first = truth.frames[truth.launchFrame + 1]!;
    await fx.coach.post(clubPath(fx, `/flights/${id}/follow`), { frame: first.frame, xPx: first.x, yPx: first.y });
    await testWorker().drain();
    const before = (await fx.coach.get(clubPath(fx, `/flights/${id}/points`))).body.data as Point[];
    const resumeAt = truth.frames[first.frame + 15]!;
    await fx.coach.post(clubPath(fx, `/flights/${id}/follow`), { frame: resumeAt.frame, xPx: resumeAt.x, yPx: resumeAt.y });
    await testWorker().drain();
    const after = (await fx.coach.get(clubPath(fx, `/flights/${id}/points`))).body.data as Point[];
    expect(after.filter((p) => p.frame < resumeAt.frame)).toEqual(before.filter((p) => p.frame < resumeAt.frame));
    expect(after.find((p) => p.frame === resumeAt.frame)).toBeDefined();
  });
});
