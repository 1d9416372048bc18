/**
 * Probing: what a clip or a frame set holds, checked before any frame is cut from it.
 *
 * Order of checks for a video, cheapest first, so that each bad input gets its own message:
 * empty file → first bytes (not a video at all, or a still image) → the container's own structure
 * (a truncated MP4/MOV/Matroska/AVI) → ffprobe through fluent-ffmpeg (streams, codec, rate, rotation)
 * → one frame decoded (a codec this ffmpeg cannot read).
 */
import { open, stat } from 'node:fs/promises';
import { basename } from 'node:path';
import ffmpeg from 'fluent-ffmpeg';
import { VideoError } from './errors';
import { readHead, sniffBytes } from './sniff';
import { readFrameTiming } from './timestamps';
import { configureFluentFfmpeg, ffmpegPath, ffprobePath, lastErrorLine, runTool, type RunResult } from './tools';
import type { ClipProbe, FrameSetProbe, MediaFormat, MediaSniff } from './types';

const CONTAINER_NAMES = 'MP4, MOV, MKV/WebM, AVI or MPEG-TS';

/**
 * Checks the first bytes of a file that should be a video (magic bytes only, no ffprobe), so that an upload
 * received in parts can be refused as soon as its start has arrived.
 * @param head the first bytes of the file (4 KiB are enough; `readHead` reads them).
 * @param path the file, named in the error's details only.
 * @returns the sniffed container.
 * @throws VideoError VIDEO_NOT_MEDIA, VIDEO_IS_IMAGE.
 */
export function checkVideoHead(head: Buffer, path: string): MediaSniff & { kind: 'video' } {
  const sniff = sniffBytes(head);
  if (!sniff) {
    throw new VideoError(
      'VIDEO_NOT_MEDIA',
      `This file is not a video: its first bytes are not those of ${CONTAINER_NAMES}, whatever its name says. ` +
        'Upload the clip as the camera or phone saved it, or export it as MP4.',
      { path },
    );
  }
  if (sniff.kind === 'image') {
    throw new VideoError(
      'VIDEO_IS_IMAGE',
      `This file is a single ${sniff.format.toUpperCase()} image, not a video. Upload a video, or upload all the frames together as a frame set with their capture rate.`,
      { path, format: sniff.format },
    );
  }
  return sniff as MediaSniff & { kind: 'video' };
}

/**
 * Probes a video file.
 * @param path a file on local disk.
 * @returns container, codec, displayed and coded size, rotation, playback frame rate, frame count,
 *   duration; see `ClipProbe`.
 * @throws VideoError VIDEO_FILE_UNREADABLE, VIDEO_EMPTY_FILE, VIDEO_NOT_MEDIA, VIDEO_IS_IMAGE,
 *   VIDEO_TRUNCATED, VIDEO_NO_DECODABLE_STREAM, VIDEO_DECODE_FAILED, VIDEO_TOOL_MISSING.
 */
export async function probeClip(path: string): Promise<ClipProbe> {
  const sniff = checkVideoHead(await readHead(path), path);
  const sizeBytes = (await stat(path)).size;
  // The three checks are independent; running them together saves a process start or two.
  // Note: a structural fault is reported first, since ffprobe's complaint about the same file is vaguer.
  const [structure, probed, decodable, timed] = await Promise.allSettled([
    checkStructure(path, sniff.format, sizeBytes),
    ffprobeJson(path),
    decodeFirstFrame(path),
    readFrameTiming(path),
  ]);
  if (structure.status === 'rejected') throw structure.reason;
  if (probed.status === 'rejected') throw probed.reason;
  const data = probed.value;
  const video = data.streams.find((s) => s.codec_type === 'video' && Number(s.disposition?.attached_pic ?? 0) !== 1);
  if (!video) {
    const hasAudio = data.streams.some((s) => s.codec_type === 'audio');
    throw new VideoError(
      'VIDEO_NO_DECODABLE_STREAM',
      hasAudio
        ? 'This file holds sound only, no picture. Upload the video file itself.'
        : 'This file holds no video stream. Upload the video file itself.',
      { path },
    );
  }
  if (decodable.status === 'rejected') throw decodable.reason;
  checkDecodable(path, String(video.codec_name ?? video.codec_tag_string ?? 'unknown'), decodable.value);
  if (timed.status === 'rejected') throw timed.reason;
  const timing = timed.value;

  const codedWidth = Number(video.width);
  const codedHeight = Number(video.height);
  if (!(codedWidth > 0 && codedHeight > 0)) {
    throw new VideoError('VIDEO_NO_DECODABLE_STREAM', 'The video stream states no picture size, so it cannot be read. Export the clip again as MP4.', { path });
  }
  const rotationDeg = rotationOf(video);
  const turned = rotationDeg === 90 || rotationDeg === 270;

  const avg = parseRate(video.avg_frame_rate);
  const nominal = parseRate(video.r_frame_rate);
  const rate = avg ?? nominal;
  if (!rate) {
    throw new VideoError('VIDEO_DECODE_FAILED', 'The video states no frame rate. Export the clip again as MP4, or upload its frames with their capture rate.', { path });
  }
  const constantFrameRate = (!avg || !nominal || Math.abs(avg.value - nominal.value) <= 1e-3 * nominal.value) && timing.constant;

  const streamDuration = Number(video.duration);
  const formatDuration = Number(data.format.duration);
  let frameCount = Number(video.nb_frames);
  let frameCountSource: ClipProbe['frameCountSource'] = 'header';
  if (!(Number.isInteger(frameCount) && frameCount > 0)) {
    frameCount = await countPackets(path);
    frameCountSource = 'counted';
  }
  const durationS =
    Number.isFinite(streamDuration) && streamDuration > 0
      ? streamDuration
      : Number.isFinite(formatDuration) && formatDuration > 0
        ? formatDuration
        : frameCount / rate.value;

  return {
    kind: 'video',
    path,
    sizeBytes,
    container: sniff.format,
    formatName: String(data.format.format_name ?? sniff.format),
    codec: String(video.codec_name),
    pixelFormat: String(video.pix_fmt ?? ''),
    width: turned ? codedHeight : codedWidth,
    height: turned ? codedWidth : codedHeight,
    codedWidth,
    codedHeight,
    rotationDeg,
    frameRate: rate.value,
    frameRateFraction: rate.text,
    nominalFrameRate: timing.constant ? rate.value : (nominal ?? rate).value,
    constantFrameRate,
    frameTimesS: timing.constant ? null : timing.timesS,
    timestampWarning: timing.warning,
    frameCount,
    frameCountSource,
    durationS,
    hasAudio: data.streams.some((s) => s.codec_type === 'audio'),
  };
}

interface ProbeStream {
  codec_type?: string;
  codec_name?: string;
  codec_tag_string?: string;
  pix_fmt?: string;
  width?: number | string;
  height?: number | string;
  avg_frame_rate?: string;
  r_frame_rate?: string;
  nb_frames?: number | string;
  duration?: number | string;
  rotation?: number | string;
  tags?: Record<string, string | number>;
  disposition?: Record<string, number | string>;
}

interface ProbeData {
  streams: ProbeStream[];
  format: { format_name?: string; duration?: number | string };
}

function ffprobeJson(path: string): Promise<ProbeData> {
  configureFluentFfmpeg();
  return new Promise((resolvePromise, reject) => {
    ffmpeg.ffprobe(path, ['-v', 'error'], (err, data) => {
      if (err) {
        reject(ffprobeError(path, String((err as Error).message ?? err)));
        return;
      }
      resolvePromise(data as unknown as ProbeData);
    });
  });
}

function ffprobeError(path: string, message: string): VideoError {
  if (/ENOENT|Cannot find ffprobe/.test(message)) {
    return new VideoError('VIDEO_TOOL_MISSING', `ffprobe was not found at ${ffprobePath()}. Install ffmpeg (Debian: apt-get install ffmpeg) or set FFPROBE_PATH.`, { path });
  }
  if (/moov atom not found|End of file|partial file|truncat/i.test(message)) {
    return truncated(path, lastErrorLine(message));
  }
  return new VideoError(
    'VIDEO_DECODE_FAILED',
    `The video could not be read (${lastErrorLine(message) || 'ffprobe failed'}). The file may be damaged: upload it again, or export it as MP4.`,
    { path, ffprobe: lastErrorLine(message) },
  );
}

function truncated(path: string, why: string): VideoError {
  return new VideoError(
    'VIDEO_TRUNCATED',
    'The video file is incomplete: it ends before its own contents say it should (the upload or the copy was cut short). Upload the whole file again.',
    { path, why },
  );
}

/** The clockwise turn from coded to displayed picture. */
function rotationOf(stream: ProbeStream): ClipProbe['rotationDeg'] {
  // ffprobe prints the display matrix's angle counter-clockwise (libavutil/display.h,
  // av_display_rotation_get); the legacy `rotate` tag is clockwise. The matrix wins when both exist.
  let clockwise = 0;
  const matrix = Number(stream.rotation);
  const tag = Number(stream.tags?.rotate);
  if (stream.rotation !== undefined && Number.isFinite(matrix)) clockwise = -matrix;
  else if (stream.tags?.rotate !== undefined && Number.isFinite(tag)) clockwise = tag;
  const quarter = ((Math.round(clockwise / 90) % 4) + 4) % 4;
  return (quarter * 90) as ClipProbe['rotationDeg'];
}

function parseRate(text: string | undefined): { value: number; text: string } | null {
  if (!text) return null;
  const m = /^(\d+)(?:\/(\d+))?$/.exec(String(text).trim());
  if (!m) return null;
  const num = Number(m[1]);
  const den = m[2] === undefined ? 1 : Number(m[2]);
  if (!(num > 0 && den > 0)) return null;
  return { value: num / den, text: m[2] === undefined ? `${num}/1` : `${num}/${den}` };
}

/** Counts the packets of the first video stream: reads the file but decodes nothing. */
async function countPackets(path: string): Promise<number> {
  const res = await runTool(ffprobePath(), [
    '-v', 'error', '-select_streams', 'v:0', '-count_packets',
    '-show_entries', 'stream=nb_read_packets', '-of', 'csv=p=0', path,
  ]);
  const n = Number(res.stdout.trim().split(/\s+/)[0]);
  if (res.code !== 0 || !(Number.isInteger(n) && n > 0)) {
    throw new VideoError('VIDEO_DECODE_FAILED', 'The number of frames in the video could not be counted. The file may be damaged: upload it again.', {
      path,
      ffprobe: lastErrorLine(res.stderr),
    });
  }
  return n;
}

/** Largest side and pixel count of an uploaded frame (8K UHD is 7680×4320, about 33 million pixels). */
export const MAX_FRAME_SIDE_PX = 8192;
export const MAX_FRAME_PIXELS = 40_000_000;

/** Decodes one still image with ffmpeg and refuses it when nothing comes out. */
async function checkImageDecodes(path: string, format: 'jpeg' | 'png'): Promise<void> {
  const res = await runTool(ffmpegPath(), ['-v', 'error', '-nostdin', '-i', path, '-frames:v', '1', '-f', 'framecrc', '-']);
  const decoded = res.stdout.split('\n').some((l) => l.length > 0 && !l.startsWith('#'));
  if (res.code === 0 && decoded) return;
  throw new VideoError(
    'VIDEO_NOT_MEDIA',
    `"${basename(path)}" starts like a ${format.toUpperCase()} but cannot be decoded as one: the file is damaged or not an image. Export the frame again.`,
    { file: path, ffmpeg: lastErrorLine(res.stderr) },
  );
}

/** Decodes the first video frame: the only sure test that this ffmpeg can read the codec. */
function decodeFirstFrame(path: string): Promise<RunResult> {
  return runTool(ffmpegPath(), ['-v', 'error', '-nostdin', '-i', path, '-map', '0:v:0', '-frames:v', '1', '-f', 'framecrc', '-']);
}

function checkDecodable(path: string, codec: string, res: RunResult): void {
  const decoded = res.stdout.split('\n').some((l) => l.length > 0 && !l.startsWith('#'));
  if (res.code === 0 && decoded) return;
  const why = lastErrorLine(res.stderr);
  if (/Decoder .* not found|unknown codec|Could not find codec|no decoder/i.test(why) || res.code === 0 || codec === 'none' || codec === 'unknown') {
    throw new VideoError(
      'VIDEO_NO_DECODABLE_STREAM',
      `The video is coded in a format this server cannot decode (${codec}). Export the clip as MP4 (H.264) and upload it again.`,
      { path, codec, ffmpeg: why },
    );
  }
  throw new VideoError(
    'VIDEO_DECODE_FAILED',
    `The first frame of the video could not be decoded (${why || 'ffmpeg failed'}). The file may be damaged: upload it again, or export it as MP4.`,
    { path, codec, ffmpeg: why },
  );
}

/**
 * Checks that the container's declared sizes fit in the file, so a cut-short upload is named as
 * such rather than failing later in the middle of extraction.
 */
async function checkStructure(path: string, format: MediaFormat, fileSize: number): Promise<void> {
  const handle = await open(path, 'r');
  try {
    const read = async (pos: number, len: number): Promise<Buffer> => {
      const buf = Buffer.alloc(len);
      const { bytesRead } = await handle.read(buf, 0, len, pos);
      return buf.subarray(0, bytesRead);
    };
    if (format === 'mp4' || format === 'mov') await checkIsoBoxes(path, read, fileSize);
    else if (format === 'matroska' || format === 'webm') await checkEbmlSegment(path, read, fileSize);
    else if (format === 'avi') {
      // RIFF: a 4-byte little-endian size after 'RIFF' covers the rest of the file (Microsoft RIFF spec).
      const h = await read(0, 8);
      const declared = h.readUInt32LE(4) + 8;
      if (declared > fileSize) throw truncated(path, `RIFF declares ${declared} bytes, file has ${fileSize}`);
    }
  } finally {
    await handle.close();
  }
}

/** ISO/IEC 14496-12 §4.2: top-level boxes are size (32-bit, or 1 then 64-bit, or 0 = to end) + type. */
async function checkIsoBoxes(path: string, read: (pos: number, len: number) => Promise<Buffer>, fileSize: number): Promise<void> {
  let pos = 0;
  let sawMovie = false;
  for (let i = 0; i < 100000 && pos < fileSize; i++) {
    const h = await read(pos, 16);
    if (h.length < 8) throw truncated(path, `box header cut at byte ${pos}`);
    let size = h.readUInt32BE(0);
    const type = h.toString('latin1', 4, 8);
    if (size === 1) {
      if (h.length < 16) throw truncated(path, `large box header cut at byte ${pos}`);
      size = Number(h.readBigUInt64BE(8));
    } else if (size === 0) {
      size = fileSize - pos;
    }
    if (size < 8) {
      throw new VideoError('VIDEO_DECODE_FAILED', `The video's structure is damaged (a box of ${size} bytes at byte ${pos}). Upload the original file again.`, { path });
    }
    if (type === 'moov') sawMovie = true;
    if (pos + size > fileSize) throw truncated(path, `box '${type}' at ${pos} needs ${size} bytes, file ends at ${fileSize}`);
    pos += size;
  }
  if (!sawMovie) throw truncated(path, 'no moov box (the recording was not finished or the file was cut)');
}

/** Matroska: EBML header element, then the Segment (ID 0x18538067) whose size must fit (RFC 8794 §4). */
async function checkEbmlSegment(path: string, read: (pos: number, len: number) => Promise<Buffer>, fileSize: number): Promise<void> {
  const h = await read(0, 64);
  const header = readVint(h, 4);
  if (!header) return;
  let pos = 4 + header.length + header.value;
  const seg = await read(pos, 12);
  if (seg.length < 4) throw truncated(path, 'no Segment element');
  if (seg.readUInt32BE(0) !== 0x18538067) return;
  const size = readVint(seg, 4);
  if (!size || size.unknown) return;
  pos += 4 + size.length;
  if (pos + size.value > fileSize) throw truncated(path, `Segment needs ${pos + size.value} bytes, file has ${fileSize}`);
}

function readVint(buf: Buffer, at: number): { value: number; length: number; unknown: boolean } | null {
  const first = buf[at];
  if (first === undefined || first === 0) return null;
  let length = 1;
  while (length <= 8 && !(first & (0x80 >> (length - 1)))) length++;
  if (at + length > buf.length) return null;
  let value = first & (0xff >> length);
  let allOnes = value === 0xff >> length;
  for (let i = 1; i < length; i++) {
    const b = buf[at + i]!;
    value = value * 256 + b;
    if (b !== 0xff) allOnes = false;
  }
  return { value, length, unknown: allOnes };
}

const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

/**
 * Probes an uploaded set of still frames.
 * @param paths the frame files, in any order; sorted here by natural filename order.
 * @param captureFps the rate the frames were captured at, frames per second (0 < captureFps ≤ 100000).
 * @throws VideoError FRAMES_INVALID (no frames, bad rate, mixed types or sizes), VIDEO_NOT_MEDIA
 *   (a file that is not JPEG/PNG by its bytes), VIDEO_EMPTY_FILE, VIDEO_FILE_UNREADABLE.
 */
export async function probeFrameSet(paths: string[], captureFps: number): Promise<FrameSetProbe> {
  if (!(Number.isFinite(captureFps) && captureFps > 0 && captureFps <= 100000)) {
    throw new VideoError('FRAMES_INVALID', `The capture rate must be a number of frames per second above 0 (got ${String(captureFps)}). State the rate the camera filmed at.`, {
      captureFps,
    });
  }
  if (paths.length < 2) {
    throw new VideoError('FRAMES_INVALID', `A frame set needs at least two frames (got ${paths.length}). Upload all the frames of the clip together.`, {
      count: paths.length,
    });
  }
  const files = [...paths].sort((a, b) => collator.compare(basename(a), basename(b)) || collator.compare(a, b));
  const infos = new Array<{ format: 'jpeg' | 'png'; width: number; height: number }>(files.length);
  // A bounded number of files open at once: sets can hold thousands of frames.
  let next = 0;
  const worker = async (): Promise<void> => {
    while (next < files.length) {
      const i = next++;
      infos[i] = await imageInfo(files[i]!);
    }
  };
  await Promise.all(Array.from({ length: Math.min(16, files.length) }, worker));

  const first = infos[0]!;
  for (let i = 1; i < files.length; i++) {
    const info = infos[i]!;
    if (info.format !== first.format) {
      throw new VideoError(
        'FRAMES_INVALID',
        `Frame "${basename(files[i]!)}" is a ${info.format.toUpperCase()} but "${basename(files[0]!)}" is a ${first.format.toUpperCase()}. All frames of a set must be of one type: export them again as all JPEG or all PNG.`,
        { file: files[i], format: info.format, firstFormat: first.format },
      );
    }
    if (info.width !== first.width || info.height !== first.height) {
      throw new VideoError(
        'FRAMES_INVALID',
        `Frame "${basename(files[i]!)}" is ${info.width}×${info.height} pixels but "${basename(files[0]!)}" is ${first.width}×${first.height}. All frames of a set must have one size: export them again at one size.`,
        { file: files[i], size: [info.width, info.height], firstSize: [first.width, first.height] },
      );
    }
  }
  // The same size for every frame, so checking the first caps them all; checked before any decoding, so a
  // header that claims 60000 × 60000 never makes a decoder allocate for it.
  if (first.width > MAX_FRAME_SIDE_PX || first.height > MAX_FRAME_SIDE_PX || first.width * first.height > MAX_FRAME_PIXELS) {
    throw new VideoError(
      'FRAME_TOO_LARGE',
      `The frames are ${first.width}×${first.height} pixels; this server takes frames of at most ${MAX_FRAME_SIDE_PX} pixels a side and ${MAX_FRAME_PIXELS / 1e6} million pixels. Export them smaller and upload them again.`,
      { size: [first.width, first.height], maxSide: MAX_FRAME_SIDE_PX, maxPixels: MAX_FRAME_PIXELS },
    );
  }
  // A valid header can still front anything (a JPEG header followed by markup): decode the first and last frame.
  for (const file of new Set([files[0]!, files[files.length - 1]!])) await checkImageDecodes(file, first.format);
  return {
    kind: 'frames',
    files,
    format: first.format,
    width: first.width,
    height: first.height,
    frameRate: captureFps,
    frameCount: files.length,
    durationS: files.length / captureFps,
    rotationDeg: 0,
  };
}

/** Size of a JPEG or PNG from its header bytes (PNG IHDR, ISO/IEC 15948 §11.2.2; JPEG SOFn, ITU-T T.81 §B.2.2). */
export async function imageInfo(path: string): Promise<{ format: 'jpeg' | 'png'; width: number; height: number }> {
  const head = await readHead(path, 64 * 1024);
  const sniff = sniffBytes(head);
  if (!sniff || sniff.kind !== 'image') {
    throw new VideoError('VIDEO_NOT_MEDIA', `"${basename(path)}" is not a JPEG or PNG image (judged by its bytes, not its name). A frame set may hold only JPEG or PNG frames.`, {
      file: path,
    });
  }
  const bad = (): VideoError =>
    new VideoError('VIDEO_NOT_MEDIA', `"${basename(path)}" is a damaged ${sniff.format.toUpperCase()}: its size cannot be read. Export the frame again.`, { file: path });
  if (sniff.format === 'png') {
    if (head.length < 24 || head.toString('latin1', 12, 16) !== 'IHDR') throw bad();
    return { format: 'png', width: head.readUInt32BE(16), height: head.readUInt32BE(20) };
  }
  const handle = await open(path, 'r');
  try {
    let pos = 2;
    const h = Buffer.alloc(9);
    for (let i = 0; i < 1000; i++) {
      const { bytesRead } = await handle.read(h, 0, 9, pos);
      if (bytesRead < 4 || h[0] !== 0xff) throw bad();
      const marker = h[1]!;
      if (marker === 0xff) {
        pos += 1;
        continue;
      }
      const isSof = marker >= 0xc0 && marker <= 0xcf && marker !== 0xc4 && marker !== 0xc8 && marker !== 0xcc;
      if (isSof) {
        if (bytesRead < 9) throw bad();
        const height = h.readUInt16BE(5);
        const width = h.readUInt16BE(7);
        if (width === 0 || height === 0) throw bad();
        return { format: 'jpeg', width, height };
      }
      if (marker === 0xd9 || marker === 0xda) throw bad();
      pos += 2 + h.readUInt16BE(2);
    }
    throw bad();
  } finally {
    await handle.close();
  }
}
