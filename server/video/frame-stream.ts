/**
 * Grayscale frames streamed from ffmpeg (`-f rawvideo -pix_fmt gray`), for the follower.
 *
 * Frames are read one at a time from ffmpeg's stdout and handed on as they complete; the consumer
 * pulls them, so a slow consumer makes ffmpeg wait instead of filling memory. Breaking out of the
 * loop (or aborting) kills ffmpeg.
 */
import { spawn } from 'node:child_process';
import { mkdtemp, readdir, rm, stat, symlink } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { extname, join, resolve } from 'node:path';
import { cancelledError, VideoError } from './errors';
import { FRAME_PATTERN } from './extract';
import { probeClip, probeFrameSet } from './probe';
import { ffmpegPath, lastErrorLine, toolCommand, toolMissing } from './tools';
import type { ClipProbe, ExtractedFrames, FollowSource, FrameSetProbe } from './types';

export interface GrayFrame {
  /** 0-based frame index in the clip. */
  index: number;
  /** width × height bytes, row by row; only the luma of the picture. */
  data: Buffer;
}

export interface OpenedSource {
  /** Size of the delivered gray frames. */
  width: number;
  height: number;
  /** Displayed size of the clip: the pixel space of the caller's positions. */
  sourceWidth: number;
  sourceHeight: number;
  /** The source's own frame rate (frame sets and extracted frames: the stated rate). */
  frameRate: number;
  frameCount: number;
  /** Presentation times of a variable-rate video's frames (seconds at the playback rate); null otherwise. */
  frameTimesS: number[] | null;
  /** The rate those timestamps count in (the stream's nominal rate). */
  timestampRate: number;
  /**
   * Streams frames `first`..`last` (inclusive; null = to the end). Buffers are taken from `pool`
   * when it has any: a caller that is done with a frame may push its buffer back for reuse.
   */
  read(first: number, last: number | null, signal?: AbortSignal, pool?: Buffer[]): AsyncGenerator<GrayFrame>;
  /** Removes temporary links made for frame sets. */
  close(): Promise<void>;
}

const IMAGE_EXT = /\.(jpe?g|png)$/i;

/**
 * Resolves a follow source: a video path, a folder of frames (which needs `captureFps`; positions are
 * in the pixels of its images), a probe, or extracted frames (positions mapped to clip pixels).
 */
export async function openSource(source: FollowSource, captureFps: number | undefined, seekAfterS: number): Promise<OpenedSource> {
  if (typeof source === 'string') {
    let isDir = false;
    try {
      isDir = (await stat(source)).isDirectory();
    } catch {
      isDir = false;
    }
    if (!isDir) return videoSource(await probeClip(source), seekAfterS);
    if (!captureFps) throw needRate(source);
    // A folder written by extractFrames: its numbered frames only (not strip.jpg). Otherwise every image.
    const images = (await readdir(source)).filter((n) => IMAGE_EXT.test(n));
    const ours = images.filter((n) => /^frame-\d{6}\.jpg$/.test(n));
    const names = ours.length > 0 ? ours : images;
    return frameSetSource(await probeFrameSet(names.map((n) => join(source, n)), captureFps));
  }
  if (source.kind === 'video') return videoSource(source, seekAfterS);
  if (source.kind === 'frames') return frameSetSource(source);
  return extractedSource(source);
}

function needRate(dir: string): VideoError {
  return new VideoError('VIDEO_BAD_REQUEST', `${dir} is a folder of frames: state their capture rate (frames per second).`, { dir });
}

function videoSource(probe: ClipProbe, seekAfterS: number): OpenedSource {
  // The luma plane is the gray picture; taking it costs a copy, where a gray conversion rescales every pixel.
  const gray = /^(yuv|yuvj|nv1|nv2|gray)/.test(probe.pixelFormat) ? 'extractplanes=y' : 'format=gray';
  return {
    width: probe.width,
    height: probe.height,
    sourceWidth: probe.width,
    sourceHeight: probe.height,
    frameRate: probe.frameRate,
    frameCount: probe.frameCount,
    frameTimesS: probe.frameTimesS ?? null,
    timestampRate: probe.nominalFrameRate ?? probe.frameRate,
    read(first, last, signal, pool) {
      const args = ['-nostdin', '-v', 'error'];
      let filter: string;
      // Note: a seek lands on the first frame whose timestamp is at or after the target, so
      // aiming half a frame early lands exactly on `first` when the rate is constant. With a
      // variable rate timestamps do not give frame numbers, so those clips decode from the start.
      if (probe.constantFrameRate && first / probe.frameRate > seekAfterS) {
        args.push('-ss', ((first - 0.5) / probe.frameRate).toFixed(6));
        filter = gray;
      } else {
        filter = first > 0 ? `trim=start_frame=${first},${gray}` : gray;
      }
      args.push('-i', probe.path, '-map', '0:v:0', '-vf', filter);
      if (last !== null) args.push('-frames:v', String(last - first + 1));
      args.push('-fps_mode', 'passthrough', '-f', 'rawvideo', '-pix_fmt', 'gray', 'pipe:1');
      return grayFrames(args, probe.width, probe.height, first, signal, pool);
    },
    close: async () => undefined,
  };
}

async function frameSetSource(probe: FrameSetProbe): Promise<OpenedSource> {
  const dir = await mkdtemp(join(tmpdir(), 'arcwright-frames-'));
  const ext = extname(probe.files[0]!).toLowerCase() || (probe.format === 'png' ? '.png' : '.jpg');
  await Promise.all(probe.files.map((f, i) => symlink(resolve(f), join(dir, `in-${String(i).padStart(6, '0')}${ext}`))));
  const src = imageSequence(join(dir, `in-%06d${ext}`), probe.format, probe.width, probe.height, probe.width, probe.height, probe.frameRate, probe.frameCount, dir);
  return src;
}

function extractedSource(ex: ExtractedFrames): OpenedSource {
  return imageSequence(join(ex.dir, FRAME_PATTERN), 'jpeg', ex.width, ex.height, ex.sourceWidth, ex.sourceHeight, ex.frameRate, ex.frameCount, null);
}

function imageSequence(
  pattern: string,
  format: 'jpeg' | 'png',
  width: number,
  height: number,
  sourceWidth: number,
  sourceHeight: number,
  frameRate: number,
  frameCount: number,
  tempDir: string | null,
): OpenedSource {
  return {
    width,
    height,
    sourceWidth,
    sourceHeight,
    frameRate,
    frameCount,
    frameTimesS: null,
    timestampRate: frameRate,
    read(first, last, signal, pool) {
      // Image sequences start at any number exactly: no seeking question arises.
      const args = ['-nostdin', '-v', 'error', '-framerate', String(frameRate), '-start_number', String(first), '-i', pattern];
      args.push('-vf', format === 'jpeg' ? 'extractplanes=y' : 'format=gray');
      if (last !== null) args.push('-frames:v', String(last - first + 1));
      args.push('-fps_mode', 'passthrough', '-f', 'rawvideo', '-pix_fmt', 'gray', 'pipe:1');
      return grayFrames(args, width, height, first, signal, pool);
    },
    close: async () => {
      if (tempDir) await rm(tempDir, { recursive: true, force: true });
    },
  };
}

/** Runs ffmpeg and yields its raw gray output frame by frame, numbered from `firstIndex`. */
export async function* grayFrames(
  args: string[],
  width: number,
  height: number,
  firstIndex: number,
  signal?: AbortSignal,
  pool: Buffer[] = [],
): AsyncGenerator<GrayFrame> {
  if (signal?.aborted) throw cancelledError('Following');
  const frameSize = width * height;
  const child = spawn(...toolCommand(ffmpegPath(), args), { stdio: ['ignore', 'pipe', 'pipe'] });
  let stderr = '';
  child.stderr.setEncoding('utf8');
  child.stderr.on('data', (d: string) => {
    stderr = (stderr + d).slice(-8000);
  });
  let spawnError: NodeJS.ErrnoException | null = null;
  const closed = new Promise<number | null>((res) => {
    child.on('error', (err: NodeJS.ErrnoException) => {
      spawnError = err;
      res(null);
    });
    child.on('close', (code) => res(code));
  });
  let killed = false;
  const onAbort = (): void => {
    killed = true;
    child.kill('SIGKILL');
  };
  signal?.addEventListener('abort', onAbort, { once: true });
  let finished = false;
  try {
    const take = (): Buffer => {
      const b = pool.pop();
      return b && b.length === frameSize ? b : Buffer.allocUnsafe(frameSize);
    };
    let frame = take();
    let filled = 0;
    let index = firstIndex;
    for await (const chunk of child.stdout as AsyncIterable<Buffer>) {
      let offset = 0;
      while (offset < chunk.length) {
        const n = Math.min(frameSize - filled, chunk.length - offset);
        chunk.copy(frame, filled, offset, offset + n);
        filled += n;
        offset += n;
        if (filled === frameSize) {
          yield { index: index++, data: frame };
          frame = take();
          filled = 0;
        }
      }
    }
    const code = await closed;
    finished = true;
    if (spawnError) {
      const err = spawnError as NodeJS.ErrnoException;
      throw err.code === 'ENOENT' || err.code === 'EACCES' ? toolMissing('ffmpeg', ffmpegPath()) : err;
    }
    if (killed || signal?.aborted) throw cancelledError('Following');
    if (code !== 0) {
      const why = lastErrorLine(stderr);
      throw new VideoError('VIDEO_DECODE_FAILED', `The clip could not be decoded for following (${why || `ffmpeg exited with ${String(code)}`}). The file may be damaged: upload it again.`, {
        ffmpeg: why,
      });
    }
  } finally {
    signal?.removeEventListener('abort', onAbort);
    if (!finished) {
      child.kill('SIGKILL');
      await closed;
    }
  }
}
