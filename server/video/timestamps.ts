/**
 * Frame times from a clip's own presentation timestamps. Phones record with variable frame rates,
 * so frame i is not at i / rate: the follower's times come from each frame's timestamp whenever the
 * intervals are not all equal. Timestamps are read from the container's packets by ffprobe (no
 * decoding), in decode order; frames are numbered in presentation order, which is the sorted order
 * of the timestamps.
 */
import { VideoError } from './errors';
import { ffprobePath, lastErrorLine, runTool } from './tools';

export interface PacketTimes {
  /** Presentation and decode timestamps, seconds at the playback rate; null when the packet has none. */
  pts: number | null;
  dts: number | null;
}

export interface FrameTiming {
  /**
   * Presentation time of each frame, in frame order, seconds at the playback rate from frame 0;
   * null when some frames have no timestamp (their place is unknown: times come from the rate).
   */
  timesS: number[] | null;
  /** All intervals equal within the rounding of the container's clock. */
  constant: boolean;
  /** What is odd about the timestamps (jumps, repeats), in words for the coach; null when nothing is. */
  warning: string | null;
}

/**
 * A codec may show a frame up to 16 frames after it decodes it (the largest H.264/HEVC reorder
 * window): a timestamp further behind the latest one seen cannot be reordering.
 */
const MAX_REORDER_FRAMES = 16;

const ms = (s: number): string => `${+(s * 1000).toFixed(1)} ms`;

/**
 * Checks the timestamps of a clip's video packets and turns them into frame times.
 * @param packets one entry per video packet, in decode (file) order.
 * @throws VideoError VIDEO_TIMESTAMPS_BACKWARDS when a timestamp goes back in time.
 */
export function analyseTimestamps(packets: PacketTimes[]): FrameTiming {
  const stamps = packets.map((p) => p.pts ?? p.dts);
  const known = stamps.filter((s): s is number => s !== null && Number.isFinite(s));
  const sorted = [...known].sort((a, b) => a - b);
  const diffs = sorted.slice(1).map((s, i) => s - sorted[i]!);
  const positive = diffs.filter((d) => d > 0).sort((a, b) => a - b);
  const step = positive[positive.length >> 1] ?? 0;

  let latest = -Infinity;
  let lastDts = -Infinity;
  for (let i = 0; i < packets.length; i++) {
    const { dts } = packets[i]!;
    const s = stamps[i];
    if (dts !== null && dts < lastDts - 1e-6) throw backwards(i, dts, lastDts);
    if (dts !== null) lastDts = dts;
    if (s === null || s === undefined) continue;
    if (s < latest - MAX_REORDER_FRAMES * step - 1e-6) throw backwards(i, s, latest);
    latest = Math.max(latest, s);
  }

  const missing = packets.length - known.length;
  const timesS = missing > 0 ? null : sorted.map((s) => s - sorted[0]!);
  // Containers round timestamps to their clock (Matroska to the millisecond): allow for that.
  const tolerance = Math.max(0.01 * step, 1.1e-3);
  const constant = diffs.every((d) => Math.abs(d - step) <= tolerance);
  const notes: string[] = [];
  if (missing > 0) notes.push(`${missing} frame${missing === 1 ? ' has' : 's have'} no timestamp, so times come from the frame rate instead.`);
  const repeats = diffs.map((d, i) => [d, i + 1] as const).filter(([d]) => d < 0.1 * step);
  if (repeats.length > 0) {
    notes.push(
      `${repeats.length} frame${repeats.length === 1 ? ' repeats' : 's repeat'} the timestamp of the frame before (the first is frame ${repeats[0]![1]}); times there are uncertain.`,
    );
  }
  const jumps = diffs.map((d, i) => [d, i + 1] as const).filter(([d]) => d > 1.8 * step);
  if (jumps.length > 0) {
    const largest = Math.max(...jumps.map(([d]) => d));
    notes.push(
      `The timestamps jump ${jumps.length} time${jumps.length === 1 ? '' : 's'} (the first before frame ${jumps[0]![1]}, the largest gap ${ms(largest)} where frames are ${ms(step)} apart): the camera may have dropped frames there. Times still come from the timestamps; check the flight around those frames.`,
    );
  }
  return { timesS, constant, warning: notes.length > 0 ? notes.join(' ') : null };
}

function backwards(index: number, stamp: number, before: number): VideoError {
  return new VideoError(
    'VIDEO_TIMESTAMPS_BACKWARDS',
    `The clip's timestamps go backwards: frame ${index} in the file is stamped ${stamp.toFixed(3)} s, before the ${before.toFixed(3)} s of a frame that comes earlier in the file, so the order and times of its frames cannot be known. Save or export the clip again from the phone or an editor and upload that, or upload its frames with their capture rate.`,
    { index, stamp, before },
  );
}

/** Reads the timestamps of the first video stream's packets (no decoding) and analyses them. */
export async function readFrameTiming(path: string): Promise<FrameTiming> {
  const res = await runTool(ffprobePath(), ['-v', 'error', '-select_streams', 'v:0', '-show_entries', 'packet=pts_time,dts_time', '-of', 'csv=p=0', path]);
  if (res.code !== 0) {
    throw new VideoError('VIDEO_DECODE_FAILED', 'The timestamps of the video could not be read. The file may be damaged: upload it again.', {
      path,
      ffprobe: lastErrorLine(res.stderr),
    });
  }
  const num = (v: string | undefined): number | null => {
    const n = Number(v);
    return v === undefined || v === '' || v === 'N/A' || !Number.isFinite(n) ? null : n;
  };
  const packets = res.stdout
    .split('\n')
    .filter((l) => l.trim().length > 0)
    .map((l) => {
      const [pts, dts] = l.split(',');
      return { pts: num(pts), dts: num(dts) };
    });
  return analyseTimestamps(packets);
}
