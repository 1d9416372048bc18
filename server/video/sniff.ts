/**
 * Recognises a media file by its first bytes, never by its name: a text file called `throw.mp4` is
 * refused here before ffprobe ever sees it.
 *
 * Signatures: ISO base media / QuickTime — a box whose type is `ftyp` at offset 4 (ISO/IEC 14496-12
 * §4.3), or a bare QuickTime atom (`moov`, `mdat`, `wide`, `free`, `skip`, `pnot`) in old MOV files;
 * EBML magic 1A 45 DF A3 with DocType `webm` or `matroska` (RFC 8794 §8, Matroska spec); RIFF with
 * form type `AVI ` (Microsoft RIFF); MPEG transport stream — sync byte 0x47 every 188 bytes (ISO/IEC
 * 13818-1 §2.4.3), or every 192 bytes after a 4-byte timestamp (M2TS); JPEG SOI FF D8 FF (ITU-T T.81);
 * PNG's 8-byte signature (ISO/IEC 15948 §5.2).
 */
import { open } from 'node:fs/promises';
import { VideoError } from './errors';
import type { MediaSniff } from './types';

const HEAD_BYTES = 4096;
const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
const QUICKTIME_ATOMS = new Set(['moov', 'mdat', 'wide', 'free', 'skip', 'pnot']);

/** Reads up to `length` bytes from the start of a file; throws the engine's errors for missing and empty files. */
export async function readHead(path: string, length = HEAD_BYTES): Promise<Buffer> {
  let handle;
  try {
    handle = await open(path, 'r');
  } catch (err) {
    throw unreadable(path, err);
  }
  try {
    const stat = await handle.stat();
    if (!stat.isFile()) {
      throw new VideoError('VIDEO_FILE_UNREADABLE', `${path} is not a file. Choose a video file or a set of frames.`, { path });
    }
    if (stat.size === 0) {
      throw new VideoError('VIDEO_EMPTY_FILE', 'The file is empty (0 bytes). The upload may have failed: upload the clip again.', { path });
    }
    const buf = Buffer.alloc(Math.min(length, stat.size));
    const { bytesRead } = await handle.read(buf, 0, buf.length, 0);
    return buf.subarray(0, bytesRead);
  } catch (err) {
    if (err instanceof VideoError) throw err;
    throw unreadable(path, err);
  } finally {
    await handle.close();
  }
}

function unreadable(path: string, err: unknown): VideoError {
  const code = (err as NodeJS.ErrnoException | undefined)?.code;
  const why = code === 'ENOENT' ? 'does not exist' : code === 'EACCES' ? 'cannot be read (permission denied)' : 'cannot be read';
  return new VideoError('VIDEO_FILE_UNREADABLE', `The file ${path} ${why}.`, { path, errno: code });
}

/** Identifies a buffer holding the first bytes of a file; `null` when it is no format we accept. */
export function sniffBytes(head: Buffer): MediaSniff | null {
  const ascii = (from: number, to: number): string => (head.length >= to ? head.toString('latin1', from, to) : '');

  if (head.length >= 8 && PNG_SIGNATURE.every((b, i) => head[i] === b)) {
    return { format: 'png', kind: 'image', mime: 'image/png' };
  }
  if (head.length >= 3 && head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) {
    return { format: 'jpeg', kind: 'image', mime: 'image/jpeg' };
  }
  if (ascii(4, 8) === 'ftyp') {
    const brand = ascii(8, 12);
    return brand === 'qt  '
      ? { format: 'mov', kind: 'video', mime: 'video/quicktime' }
      : { format: 'mp4', kind: 'video', mime: 'video/mp4' };
  }
  if (head.length >= 8 && QUICKTIME_ATOMS.has(ascii(4, 8)) && head.readUInt32BE(0) >= 8) {
    return { format: 'mov', kind: 'video', mime: 'video/quicktime' };
  }
  if (head.length >= 4 && head.readUInt32BE(0) === 0x1a45dfa3) {
    // The DocType element (ID 0x4282) sits in the EBML header, well inside the first bytes.
    const header = head.toString('latin1', 0, Math.min(head.length, 64));
    return header.includes('webm')
      ? { format: 'webm', kind: 'video', mime: 'video/webm' }
      : { format: 'matroska', kind: 'video', mime: 'video/x-matroska' };
  }
  if (ascii(0, 4) === 'RIFF' && ascii(8, 12) === 'AVI ') {
    return { format: 'avi', kind: 'video', mime: 'video/x-msvideo' };
  }
  if (isTransportStream(head, 0, 188) || isTransportStream(head, 4, 192)) {
    return { format: 'mpegts', kind: 'video', mime: 'video/mp2t' };
  }
  return null;
}

function isTransportStream(head: Buffer, offset: number, packet: number): boolean {
  // Three sync bytes in a row when the file is long enough, else the ones that fit (at least two).
  const positions = [offset, offset + packet, offset + 2 * packet].filter((p) => p < head.length);
  return positions.length >= 2 && positions.every((p) => head[p] === 0x47);
}

/**
 * Identifies a file by its first bytes.
 * @returns the format, or `null` when the bytes are no accepted video container or image.
 * @throws VideoError `VIDEO_EMPTY_FILE` for 0 bytes, `VIDEO_FILE_UNREADABLE` when missing or unreadable.
 */
export async function sniffMedia(path: string): Promise<MediaSniff | null> {
  return sniffBytes(await readHead(path));
}
