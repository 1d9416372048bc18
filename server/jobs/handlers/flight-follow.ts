/**
 * `flight.follow`: auto-follow the ball from a clicked point through the flight's frames, then store the
 * followed points (replacing the flight's points from the start frame on). Nothing is written until the
 * follower has finished, so a failed or stopped run leaves the flight as it was.
 */
import { Clip, Flight } from '../../models';
import { storeFollowedPoints } from '../../services/tracks';
import { storage } from '../../storage';
import { followBall, probeClip, probeFrameSet, type MediaProbe } from '../../video';
import { JobFailure, type JobHandler } from '../types';

export const flightFollowHandler: JobHandler = {
  type: 'flight.follow',

  async run({ job, signal, progress }) {
    const { flightId, frame, xPx, yPx, radiusPx } = job.payload as { flightId: number; frame: number; xPx: number; yPx: number; radiusPx: number | null };
    const flight = await Flight.findByPk(flightId);
    const clip = flight ? await Clip.findByPk(flight.clipId) : null;
    if (!flight || !clip) throw new JobFailure('The flight was deleted before the ball could be followed.', 'FLIGHT_GONE');

    const keys = clip.kind === 'video' ? [clip.sourceKey] : await storage().list(clip.sourceKey);
    const held: { path: string; release: () => Promise<void> }[] = [];
    try {
      for (const key of keys) {
        const local = await storage().localPath(key);
        if (!local) throw new JobFailure('The uploaded file of this clip is missing from storage. Delete the clip and upload it again.', 'CLIP_SOURCE_MISSING');
        held.push(local);
      }
      const paths = held.map((h) => h.path);
      const probe: MediaProbe = clip.kind === 'video' ? await probeClip(paths[0]!) : await probeFrameSet(paths, clip.captureFps);
      const span = Math.max(1, flight.frameEnd - frame);
      const result = await followBall(
        probe,
        { frame, x: xPx, y: yPx, ...(radiusPx ? { radius: radiusPx } : {}) },
        {
          captureFps: clip.captureFps,
          endFrame: flight.frameEnd,
          signal,
          onProgress: (info) => progress((95 * (info.frame - frame)) / span),
        },
      );
      if (signal.aborted) throw signal.reason;
      const stored = await storeFollowedPoints(
        flight.id,
        frame,
        result.points.map((p) => ({ frame: p.frame, xPx: p.x, yPx: p.y, radiusPx: result.radiusPx, confidence: p.confidence, source: 'auto' as const })),
      );
      const last = result.points.at(-1);
      return { pointCount: stored, stoppedBecause: result.stoppedBecause, lastFrame: last ? last.frame : frame, radiusPx: result.radiusPx };
    } finally {
      for (const h of held) await h.release();
    }
  },
};
