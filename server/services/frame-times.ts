import type { Clip } from '../models/clip';

/**
 * Real time of each frame of a clip, seconds from frame 0: frame / captureFps for a constant rate;
 * for a variable-rate clip the frame's own presentation time, scaled by the rate its timestamps
 * count in over the capture rate (slow motion). The one place a frame number becomes a time.
 */
export function frameTimer(clip: Pick<Clip, 'captureFps' | 'frameTimes' | 'timestampRate'>): (frame: number) => number {
  const times = clip.frameTimes;
  if (!times || times.length === 0) return (frame) => frame / clip.captureFps;
  const scale = (clip.timestampRate ?? clip.captureFps) / clip.captureFps;
  const last = times.length - 1;
  const step = last > 0 ? (times[last]! - times[0]!) / last : 1 / clip.captureFps;
  return (frame) => {
    // Frames past the stored times (none in a consistent clip) continue at the mean interval.
    const s = frame <= last ? times[frame]! : times[last]! + (frame - last) * step;
    return (s - times[0]!) * scale;
  };
}

/** The frame whose time is nearest to t (the inverse of `frameTimer`), for tracks imported in seconds. */
export function frameAtTime(clip: Pick<Clip, 'captureFps' | 'frameTimes' | 'timestampRate'>, tS: number): number {
  const times = clip.frameTimes;
  if (!times || times.length === 0) return Math.round(tS * clip.captureFps);
  const at = frameTimer(clip);
  let lo = 0;
  let hi = times.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (at(mid) <= tS) lo = mid;
    else hi = mid;
  }
  return Math.abs(at(lo) - tS) <= Math.abs(at(hi) - tS) ? lo : hi;
}
