/**
 * Frame extraction for tracing: one ffmpeg pass that writes every decoded frame as a JPEG and a
 * thumbnail strip, with progress, cancellation, and nothing left behind on failure.
 *
 * ffmpeg is spawned directly rather than through fluent-ffmpeg: the pass needs a filter graph with
 * two outputs, machine-readable progress (`-progress pipe:1`) and a kill tied to an AbortSignal,
 * all of which are plainer as arguments than through fluent-ffmpeg's builder.
 */
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdir, readdir, rename, rm, rmdir, symlink } from 'node:fs/promises';
import { basename, dirname, extname, join, resolve } from 'node:path';
import { cancelledError, VideoError } from './errors';
import { ffmpegPath, lastErrorLine, toolCommand, toolMissing } from './tools';
import type { ExtractedFrames, ExtractOptions, MediaProbe } from './types';

export const FRAME_PATTERN = 'frame-%06d.jpg' as const;

/**
 * Longest side of extracted frame images unless the caller says otherwise (see ExtractOptions.maxSide).
 * Note: JPEG encoding, not decoding, dominates extraction: at 1080p, full-size frames cost about
 * 2.3 times the decode's CPU, 1280 px about 2, 960 px about 1.7 (measured with scripts/bench/video.ts
 * on two cores). 960 px keeps extraction plus following within twice the decode time.
 */
export const DEFAULT_MAX_SIDE = 960;

/** Size of the frame images for a clip of `width`×`height` under `maxSide` (0 = no limit); even sides for 4:2:0 JPEG. */
export function frameImageSize(width: number, height: number, maxSide: number): { width: number; height: number; scaled: boolean } {
  const longest = Math.max(width, height);
  if (!(maxSide > 0) || longest <= maxSide) return { width, height, scaled: false };
  const s = maxSide / longest;
  const even = (v: number): number => Math.max(2, 2 * Math.round(v / 2));
  return { width: even(width * s), height: even(height * s), scaled: true };
}

/** Path of extracted frame `index` (0-based). */
export function framePath(extracted: Pick<ExtractedFrames, 'dir'>, index: number): string {
  return join(extracted.dir, frameFileName(index));
}

export function frameFileName(index: number): string {
  return `frame-${String(index).padStart(6, '0')}.jpg`;
}

/** ffmpeg input arguments for a probed clip or frame set; frame sets are read through numbered links. */
export async function inputArgs(probe: MediaProbe, linkDir: string | null): Promise<string[]> {
  if (probe.kind === 'video') return ['-i', probe.path];
  if (!linkDir) throw new Error('A frame set needs a folder for its numbered links.');
  await mkdir(linkDir, { recursive: true });
  const ext = extname(probe.files[0]!).toLowerCase() || (probe.format === 'png' ? '.png' : '.jpg');
  // The image2 demuxer reads numbered names only; links give the sorted frames such names without copying them.
  await Promise.all(probe.files.map((f, i) => symlink(resolve(f), join(linkDir, `in-${String(i).padStart(6, '0')}${ext}`))));
  return [
    '-framerate', String(probe.frameRate), '-start_number', '0',
    '-c:v', probe.format === 'png' ? 'png' : 'mjpeg',
    '-i', join(linkDir, `in-%06d${ext}`),
  ];
}

async function isEmptyOrMissing(dir: string): Promise<boolean> {
  try {
    return (await readdir(dir)).length === 0;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return true;
    throw err;
  }
}

/**
 * Extracts every frame of a clip as `frame-000000.jpg`, `frame-000001.jpg`, … (0-based, in decode
 * order, one file per decoded frame, rotation applied) plus `strip.jpg`, into `outDir`.
 * @param probe the result of `probeClip` or `probeFrameSet`.
 * @param outDir a folder that does not exist yet or is empty; its parent must be writable.
 * @returns the folder, the frame count actually written, the frame size and the strip.
 * @throws VideoError VIDEO_OUTPUT_EXISTS, VIDEO_TRUNCATED (fewer frames than the container states),
 *   VIDEO_DECODE_FAILED, VIDEO_CANCELLED, VIDEO_TOOL_MISSING. Whatever the failure, nothing is
 *   left in or beside `outDir`.
 */
export async function extractFrames(probe: MediaProbe, outDir: string, options: ExtractOptions = {}): Promise<ExtractedFrames> {
  const { onProgress, signal } = options;
  const quality = Math.min(31, Math.max(2, Math.round(options.jpegQuality ?? 5)));
  const stripHeight = Math.max(16, Math.round(options.stripHeight ?? 90));
  const tiles = Math.max(1, Math.min(Math.round(options.stripTiles ?? 12), probe.frameCount));
  const step = Math.max(1, Math.floor(probe.frameCount / tiles));
  const stripFrames = Array.from({ length: tiles }, (_, i) => i * step);
  const size = frameImageSize(probe.width, probe.height, options.maxSide ?? DEFAULT_MAX_SIDE);

  if (signal?.aborted) throw cancelledError('Frame extraction');
  if (!(await isEmptyOrMissing(outDir))) {
    throw new VideoError('VIDEO_OUTPUT_EXISTS', `The folder ${outDir} already holds files; frames are extracted only into a new or empty folder.`, { outDir });
  }
  const tag = randomBytes(4).toString('hex');
  // Staging beside the target (same file system) so the final step is one atomic rename.
  const staging = join(dirname(outDir), `.${basename(outDir)}.part-${tag}`);
  const links = probe.kind === 'frames' ? join(dirname(outDir), `.${basename(outDir)}.in-${tag}`) : null;
  await mkdir(staging, { recursive: true });

  let lastPercent = -1;
  const report = (p: number): void => {
    const percent = Math.max(0, Math.min(100, Math.floor(p)));
    if (percent > lastPercent) {
      lastPercent = percent;
      onProgress?.(percent);
    }
  };

  try {
    const input = await inputArgs(probe, links);
    const strip = `select='not(mod(n\\,${step}))',scale=-2:${stripHeight},tile=${tiles}x1`;
    // Bilinear is enough for viewing frames and costs less than the default bicubic.
    const resize = size.scaled ? `scale=${size.width}:${size.height}:flags=bilinear,` : '';
    const args = [
      '-nostdin', '-v', 'error', '-nostats', '-progress', 'pipe:1',
      ...input,
      '-filter_complex', `[0:v]${resize}format=yuvj420p,split=2[f][s];[s]${strip}[strip]`,
      // Every decoded frame becomes one file: no frame is dropped or repeated to fit a nominal rate.
      // `-huffman default` skips the second pass that optimal Huffman tables need: about 10 % less
      // CPU for files a few per cent larger.
      '-map', '[f]', '-fps_mode', 'passthrough', '-c:v', 'mjpeg', '-huffman', 'default', '-q:v', String(quality), '-start_number', '0',
      join(staging, FRAME_PATTERN),
      '-map', '[strip]', '-frames:v', '1', '-c:v', 'mjpeg', '-q:v', '4', '-update', '1', join(staging, 'strip.jpg'),
    ];
    report(0);
    const { code, stderr } = await runFfmpeg(args, signal, (frame) => report((99 * frame) / probe.frameCount));
    if (signal?.aborted) throw cancelledError('Frame extraction');
    if (code !== 0) {
      const why = lastErrorLine(stderr);
      throw new VideoError(
        'VIDEO_DECODE_FAILED',
        `The frames could not be cut from the clip (${why || `ffmpeg exited with ${String(code)}`}). The file may be damaged: upload it again, or export it as MP4.`,
        { ffmpeg: why },
      );
    }
    const written = (await readdir(staging)).filter((f) => /^frame-\d{6}\.jpg$/.test(f)).length;
    const expected = probe.frameCount;
    // Containers may trim a few frames through edit lists; a large shortfall means the data ran out.
    if (written === 0 || written < Math.floor(expected * 0.98) - 2) {
      throw new VideoError(
        'VIDEO_TRUNCATED',
        `Only ${written} of the ${expected} frames the clip announces could be decoded: the file is incomplete or damaged. Upload the whole file again.`,
        { written, expected },
      );
    }
    if (!(await isEmptyOrMissing(outDir))) {
      throw new VideoError('VIDEO_OUTPUT_EXISTS', `The folder ${outDir} filled up while frames were being extracted; nothing was changed.`, { outDir });
    }
    await rmdir(outDir).catch((err: NodeJS.ErrnoException) => {
      if (err.code !== 'ENOENT') throw err;
    });
    await rename(staging, outDir);
    report(100);
    return {
      kind: 'extracted',
      dir: outDir,
      pattern: FRAME_PATTERN,
      frameCount: written,
      width: size.width,
      height: size.height,
      sourceWidth: probe.width,
      sourceHeight: probe.height,
      scale: size.width / probe.width,
      frameRate: probe.frameRate,
      stripPath: join(outDir, 'strip.jpg'),
      stripTiles: tiles,
      stripFrames,
    };
  } catch (err) {
    await rm(staging, { recursive: true, force: true });
    throw err;
  } finally {
    if (links) await rm(links, { recursive: true, force: true });
  }
}

/** Runs ffmpeg with `-progress pipe:1`, calling `onFrame` with each reported frame number. */
function runFfmpeg(args: string[], signal: AbortSignal | undefined, onFrame: (frame: number) => void): Promise<{ code: number | null; stderr: string }> {
  return new Promise((resolvePromise, reject) => {
    const child = spawn(...toolCommand(ffmpegPath(), args), { stdio: ['ignore', 'pipe', 'pipe'] });
    const onAbort = (): void => {
      child.kill('SIGKILL');
    };
    // Note: a signal aborted before the spawn never fires 'abort' again.
    if (signal?.aborted) onAbort();
    else signal?.addEventListener('abort', onAbort, { once: true });
    let stderr = '';
    let pending = '';
    child.stdout.setEncoding('utf8');
    child.stdout.on('data', (chunk: string) => {
      pending += chunk;
      const lines = pending.split('\n');
      pending = lines.pop() ?? '';
      for (const line of lines) {
        const m = /^frame=(\d+)/.exec(line);
        if (m) onFrame(Number(m[1]));
      }
    });
    child.stderr.setEncoding('utf8');
    child.stderr.on('data', (d: string) => {
      stderr = (stderr + d).slice(-16000);
    });
    child.on('error', (err: NodeJS.ErrnoException) => {
      signal?.removeEventListener('abort', onAbort);
      reject(err.code === 'ENOENT' || err.code === 'EACCES' ? toolMissing('ffmpeg', ffmpegPath()) : err);
    });
    child.on('close', (code) => {
      signal?.removeEventListener('abort', onAbort);
      resolvePromise({ code, stderr });
    });
  });
}
