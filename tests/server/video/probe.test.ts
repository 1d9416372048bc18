import { copyFile, mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { probeClip, probeFrameSet, sniffMedia, VideoError } from '../../../server/video/index';
import { sniffBytes } from '../../../server/video/sniff';
import { makeBadFiles, type BadFiles } from '../../../server/video/synth';
import { ffmpegPath, runTool } from '../../../server/video/tools';
import { CLIP_SPECS, testClip } from '../../support/clips/index';

let dir: string;
let bad: BadFiles;

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'arcwright-probe-'));
  bad = await makeBadFiles(join(dir, 'bad'));
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

async function ffmpeg(args: string[]): Promise<void> {
  const res = await runTool(ffmpegPath(), ['-v', 'error', '-nostdin', '-y', ...args]);
  if (res.code !== 0) throw new Error(res.stderr);
}

/** The error a promise rejects with, asserted to be a VideoError. */
async function videoError(p: Promise<unknown>): Promise<VideoError> {
  const err = await p.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(VideoError);
  return err as VideoError;
}

describe('sniffMedia', () => {
  it('recognises an MP4 by its bytes when the file name says nothing', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const renamed = join(dir, 'upload.bin');
    await copyFile(clip.videoPath, renamed);
    expect(await sniffMedia(renamed)).toEqual({ format: 'mp4', kind: 'video', mime: 'video/mp4' });
  });

  it('returns null when a text file is named .mp4', async () => {
    expect(await sniffMedia(bad.textAsMp4)).toBeNull();
  });

  it('recognises PNG and JPEG stills by their signatures', async () => {
    expect((await sniffMedia(bad.goodFrames[0]!))?.format).toBe('png');
    expect((await sniffMedia(bad.mixedTypeFrames[2]!))?.format).toBe('jpeg');
  });

  it('recognises Matroska, WebM, AVI and MPEG-TS when ffmpeg wrote them', async () => {
    const src = ['-f', 'lavfi', '-i', 'testsrc=size=64x48:rate=10', '-t', '0.3'];
    const cases: Array<[string, string[], string]> = [
      ['a.mkv', ['-c:v', 'libx264', '-preset', 'ultrafast'], 'matroska'],
      ['a.webm', ['-c:v', 'libvpx', '-deadline', 'realtime', '-b:v', '200k'], 'webm'],
      ['a.avi', ['-c:v', 'mpeg4'], 'avi'],
      ['a.ts', ['-c:v', 'libx264', '-preset', 'ultrafast'], 'mpegts'],
    ];
    for (const [name, codec, format] of cases) {
      await ffmpeg([...src, ...codec, join(dir, name)]);
      expect((await sniffMedia(join(dir, name)))?.format, name).toBe(format);
    }
  });

  it('recognises an M2TS stream when its packets carry a 4-byte timestamp', () => {
    const head = Buffer.alloc(600);
    for (const p of [4, 196, 388]) head[p] = 0x47;
    expect(sniffBytes(head)?.format).toBe('mpegts');
  });

  it('throws VIDEO_EMPTY_FILE when the file has no bytes', async () => {
    const err = await videoError(sniffMedia(bad.empty));
    expect(err.code).toBe('VIDEO_EMPTY_FILE');
    expect(err.message).toMatch(/empty \(0 bytes\).*upload the clip again/i);
  });
});

describe('probeClip', () => {
  it('reports rate, frame count, duration, size and codec when the clip is a constant-rate MP4', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const probe = await probeClip(clip.videoPath);
    expect(probe).toMatchObject({
      kind: 'video',
      container: 'mp4',
      codec: 'h264',
      width: 320,
      height: 240,
      rotationDeg: 0,
      frameRate: 30,
      frameRateFraction: '30/1',
      constantFrameRate: true,
      frameTimesS: null,
      timestampWarning: null,
      frameCount: 78,
      frameCountSource: 'header',
      hasAudio: false,
    });
    expect(probe.durationS).toBeCloseTo(2.6, 2);
  });

  it('reports the playback rate, not the capture rate, when the clip is slow motion', async () => {
    const clip = await testClip('slowMotion', CLIP_SPECS.slowMotion);
    const probe = await probeClip(clip.videoPath);
    // Filmed at 120 fps for 1.2 s: 144 frames that play back at 30 fps for 4.8 s.
    expect(probe.frameRate).toBe(30);
    expect(probe.frameCount).toBe(144);
    expect(probe.durationS).toBeCloseTo(4.8, 2);
  });

  it('reports a 90° turn and the upright size when the clip carries a rotation', async () => {
    const clip = await testClip('rotated', CLIP_SPECS.rotated);
    const probe = await probeClip(clip.videoPath);
    expect(probe.rotationDeg).toBe(90);
    expect([probe.codedWidth, probe.codedHeight]).toEqual([480, 360]);
    expect([probe.width, probe.height]).toEqual([360, 480]);
  });

  it('counts the frames when the container states no count', async () => {
    const mkv = join(dir, 'count.mkv');
    await ffmpeg(['-f', 'lavfi', '-i', 'testsrc=size=96x64:rate=25', '-frames:v', '37', '-c:v', 'libx264', '-preset', 'ultrafast', mkv]);
    const probe = await probeClip(mkv);
    expect(probe.container).toBe('matroska');
    expect(probe.frameCountSource).toBe('counted');
    expect(probe.frameCount).toBe(37);
  });

  it('refuses a text file named .mp4 before ffprobe sees it', async () => {
    const err = await videoError(probeClip(bad.textAsMp4));
    expect(err.code).toBe('VIDEO_NOT_MEDIA');
    expect(err.apiCode).toBe('UNSUPPORTED_MEDIA');
    expect(err.message).toMatch(/not a video: its first bytes/);
  });

  it('refuses a zero-length file', async () => {
    const err = await videoError(probeClip(bad.empty));
    expect(err.code).toBe('VIDEO_EMPTY_FILE');
  });

  it('refuses a still image given as a video', async () => {
    const err = await videoError(probeClip(bad.imageAsVideo));
    expect(err.code).toBe('VIDEO_IS_IMAGE');
    expect(err.message).toMatch(/single PNG image.*frame set/);
  });

  it('names a truncated MP4 as incomplete when its media data is cut', async () => {
    const err = await videoError(probeClip(bad.truncatedMp4));
    expect(err.code).toBe('VIDEO_TRUNCATED');
    expect(err.message).toMatch(/incomplete.*Upload the whole file again/);
  });

  it('names a truncated MP4 as incomplete when its index is missing', async () => {
    const err = await videoError(probeClip(bad.truncatedNoIndex));
    expect(err.code).toBe('VIDEO_TRUNCATED');
  });

  it('refuses a file that holds sound only', async () => {
    const err = await videoError(probeClip(bad.audioOnly));
    expect(err.code).toBe('VIDEO_NO_DECODABLE_STREAM');
    expect(err.message).toMatch(/sound only, no picture/);
  });

  it('refuses a video stream whose codec cannot be decoded', async () => {
    const err = await videoError(probeClip(bad.unknownCodec));
    expect(err.code).toBe('VIDEO_NO_DECODABLE_STREAM');
    expect(err.message).toMatch(/cannot decode.*Export the clip as MP4/);
  });

  it('refuses a clip whose timestamps go backwards, naming the frame and what to do', async () => {
    const err = await videoError(probeClip(bad.backwardsTimestamps));
    expect(err.code).toBe('VIDEO_TIMESTAMPS_BACKWARDS');
    expect(err.apiCode).toBe('UNPROCESSABLE');
    expect(err.message).toMatch(/^The clip's timestamps go backwards: frame 15 in the file is stamped .* s, before the .* s of a frame that comes earlier in the file/);
    expect(err.message).toMatch(/Save or export the clip again .* or upload its frames with their capture rate\.$/);
  });

  it('keeps a clip whose timestamps jump and repeat, with a warning that says where, and times from the timestamps', async () => {
    const probe = await probeClip(bad.jumpyTimestamps);
    expect(probe.constantFrameRate).toBe(false);
    expect(probe.timestampWarning).toMatch(/1 frame repeats the timestamp of the frame before \(the first is frame 30\)/);
    expect(probe.timestampWarning).toMatch(/The timestamps jump 2 times \(the first before frame 20, the largest gap 540 ms where frames are 40 ms apart\)/);
    expect(probe.frameTimesS![19]).toBeCloseTo(19 * 0.04, 3);
    expect(probe.frameTimesS![20]).toBeCloseTo(20 * 0.04 + 0.5, 3);
  });

  it('reads each frame\'s own time and no warning when the clip has a variable frame rate', async () => {
    const clip = await testClip('variableRate', CLIP_SPECS.variableRate);
    const probe = await probeClip(clip.videoPath);
    expect(probe.constantFrameRate).toBe(false);
    expect(probe.timestampWarning).toBeNull();
    expect(probe.frameTimesS).toHaveLength(clip.truth.frames.length);
    // The container's clock is 1/90 000 s.
    for (const f of clip.truth.frames) expect(Math.abs(probe.frameTimesS![f.frame]! - f.t)).toBeLessThan(2e-5);
  });

  it('says the file does not exist when the path is wrong', async () => {
    const err = await videoError(probeClip(join(dir, 'missing.mp4')));
    expect(err.code).toBe('VIDEO_FILE_UNREADABLE');
    expect(err.message).toMatch(/does not exist/);
  });

  it('names the missing tool when FFPROBE_PATH points nowhere', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const saved = process.env.FFPROBE_PATH;
    process.env.FFPROBE_PATH = join(dir, 'no-ffprobe');
    try {
      const err = await videoError(probeClip(clip.videoPath));
      expect(err.code).toBe('VIDEO_TOOL_MISSING');
      expect(err.message).toMatch(/FFPROBE_PATH/);
    } finally {
      if (saved === undefined) delete process.env.FFPROBE_PATH;
      else process.env.FFPROBE_PATH = saved;
    }
  });
});

describe('probeFrameSet', () => {
  it('sorts frames in natural filename order and reports their size and timing', async () => {
    const [f1, f2, f3] = bad.goodFrames as [string, string, string];
    const f10 = join(dir, 'f10.png');
    await copyFile(f3, f10);
    const probe = await probeFrameSet([f10, f2, f3, f1], 25);
    expect(probe.files).toEqual([f1, f2, f3, f10]);
    expect(probe).toMatchObject({ kind: 'frames', format: 'png', width: 160, height: 120, frameRate: 25, frameCount: 4 });
    expect(probe.durationS).toBeCloseTo(0.16, 10);
  });

  it('names the first odd frame and both sizes when the frames differ in size', async () => {
    const err = await videoError(probeFrameSet(bad.mixedSizeFrames, 30));
    expect(err.code).toBe('FRAMES_INVALID');
    expect(err.message).toContain('"f10.png" is 200×150 pixels but "f1.png" is 160×120');
    expect(err.details).toMatchObject({ size: [200, 150], firstSize: [160, 120] });
  });

  it('refuses a set that mixes JPEG and PNG frames', async () => {
    const err = await videoError(probeFrameSet(bad.mixedTypeFrames, 30));
    expect(err.code).toBe('FRAMES_INVALID');
    expect(err.message).toMatch(/"f11.jpg" is a JPEG but "f1.png" is a PNG/);
  });

  it('refuses a frame that is not an image by its bytes', async () => {
    const fake = join(dir, 'f4.png');
    await writeFile(fake, 'not a picture');
    const err = await videoError(probeFrameSet([...bad.goodFrames, fake], 30));
    expect(err.code).toBe('VIDEO_NOT_MEDIA');
    expect(err.message).toMatch(/"f4.png" is not a JPEG or PNG image/);
  });

  it('refuses a capture rate that is not above zero', async () => {
    const err = await videoError(probeFrameSet(bad.goodFrames, 0));
    expect(err.code).toBe('FRAMES_INVALID');
    expect(err.message).toMatch(/capture rate must be/);
  });

  it('refuses a set of fewer than two frames', async () => {
    const err = await videoError(probeFrameSet(bad.goodFrames.slice(0, 1), 30));
    expect(err.code).toBe('FRAMES_INVALID');
    expect(err.message).toMatch(/at least two frames/);
  });
});
