import { spawn } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeBadFiles, type BadFiles } from '../../../server/video/synth';
import { CLIP_SPECS, testClip } from '../../support/clips/index';

const script = resolve('scripts/follow.ts');
let dir: string;
let bad: BadFiles;

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'arcwright-follow-cli-'));
  bad = await makeBadFiles(join(dir, 'bad'));
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

/** Runs `scripts/follow.ts` as `npm run follow` does (through tsx), collecting its output. */
function follow(args: string[]): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((res, rej) => {
    const child = spawn(process.execPath, ['--import', 'tsx', script, ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('error', rej);
    child.on('close', (code) => res({ code, stdout, stderr }));
  });
}

describe('follow command', () => {
  it('prints the CSV header and one row per followed frame, starting at the click, when the start is on the ball', async () => {
    const clip = await testClip('flat60', CLIP_SPECS.flat60);
    const at = clip.truth.frames[20]!;
    const { code, stdout } = await follow([clip.videoPath, '--from', `20,${at.x.toFixed(1)},${at.y.toFixed(1)}`]);
    expect(code).toBe(0);
    const lines = stdout.trim().split('\n');
    expect(lines[0]).toBe('frame,t,x_px,y_px,confidence,x_ref_px,y_ref_px');
    const rows = lines.slice(1).map((l) => l.split(',').map(Number));
    expect(rows.length).toBeGreaterThan(50);
    expect(rows[0]![0]).toBe(20);
    for (const [frame, t, x, y, confidence, xRef, yRef] of rows as Array<[number, number, number, number, number, number, number]>) {
      expect(t).toBe(Number((frame / 60).toFixed(6)));
      // A still camera: the reference frame's pixels are the frame's own.
      expect([xRef, yRef]).toEqual([x, y]);
      const truth = clip.truth.frames[frame]!;
      expect(Math.hypot(x - truth.x, y - truth.y)).toBeLessThan(3);
      expect(confidence).toBeGreaterThanOrEqual(0);
      expect(confidence).toBeLessThanOrEqual(1);
    }
  });

  it('gives the track in the start frame\'s pixels after the first five columns when the camera panned', async () => {
    const clip = await testClip('panning', CLIP_SPECS.panning);
    const at = clip.truth.frames[14]!;
    const { code, stdout } = await follow([clip.videoPath, '--from', `14,${at.x.toFixed(1)},${at.y.toFixed(1)}`, '--moving-camera']);
    expect(code).toBe(0);
    const rows = stdout.trim().split('\n').slice(1).map((l) => l.split(',').map(Number));
    const last = rows[rows.length - 1]!;
    const truth = clip.truth.frames[last[0]!]!;
    expect(Math.hypot(last[2]! - truth.x, last[3]! - truth.y)).toBeLessThan(3);
    // By then the view has turned far: the same point sits hundreds of pixels away in the start frame.
    expect(last[5]! - last[2]!).toBeGreaterThan(200);
  });

  it('computes t from --fps when the clip is slow motion', async () => {
    const clip = await testClip('slowMotion', CLIP_SPECS.slowMotion);
    const at = clip.truth.frames[30]!;
    const { code, stdout } = await follow([clip.videoPath, '--from', `30,${at.x},${at.y}`, '--fps', '120']);
    expect(code).toBe(0);
    const second = stdout.trim().split('\n')[2]!.split(',');
    expect(second[0]).toBe('31');
    expect(Number(second[1])).toBeCloseTo(31 / 120, 6);
  });

  it('exits 1 with a clear message when the clip is not a video', async () => {
    const { code, stdout, stderr } = await follow([bad.textAsMp4, '--from', '0,10,10']);
    expect(code).toBe(1);
    expect(stdout).toBe('');
    expect(stderr).toMatch(/^follow: This file is not a video/);
    expect(stderr).not.toMatch(/at .*\.ts:\d+/);
  });

  it('exits 1 with a clear message when the start is outside the picture', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const { code, stderr } = await follow([clip.videoPath, '--from', '5,400,20']);
    expect(code).toBe(1);
    expect(stderr).toContain('The start point (400, 20) is outside the picture, which is 320×240 pixels');
  });

  it('exits 2 with the usage when --from is not three numbers', async () => {
    const { code, stderr } = await follow(['clip.mp4', '--from', '5,abc']);
    expect(code).toBe(2);
    expect(stderr).toContain('--from must be three numbers FRAME,X,Y (got "5,abc")');
    expect(stderr).toContain('Usage: npm run --silent follow -- CLIP --from FRAME,X,Y');
  });

  it('exits 2 with the usage when an option is unknown or the clip is missing', async () => {
    const unknown = await follow(['clip.mp4', '--from', '1,2,3', '--speed', '4']);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toMatch(/Unknown option '--speed'/);
    const noClip = await follow(['--from', '1,2,3']);
    expect(noClip.code).toBe(2);
    expect(noClip.stderr).toMatch(/give the clip to follow/);
  });

  it('prints the usage on stdout and exits 0 with --help', async () => {
    const { code, stdout } = await follow(['--help']);
    expect(code).toBe(0);
    expect(stdout).toMatch(/^Usage: npm run --silent follow -- CLIP --from FRAME,X,Y \[--fps CAPTURE_RATE\]/);
  });
});
