/**
 * `flight.follow`: auto-follow the ball from a clicked point through the flight's frames, then store the
 * followed points (replacing the flight's points from the start frame on) with the camera motion found, in
 * the pixels of the frame the calibration was marked on. Nothing is written until the follower has finished,
 * so a failed or stopped run leaves the flight as it was (and a restarted job runs again from the start).
 */
import { Clip, Flight } from '../../models';
import type { CameraMode } from '../../../shared/schemas/camera-motion';
import { currentCalibration } from '../../services/calibration';
import { storedMotion } from '../../services/camera-motion';
import { storeFollowedPoints } from '../../services/tracks';
import { storage } from '../../storage';
import { followBall, probeClip, probeFrameSet, type MediaProbe } from '../../video';
import { JobFailure, type JobHandler } from '../types';

export const flightFollowHandler: JobHandler = {
  type: 'flight.follow',

  async run({ job, signal, progress }) {
    const { flightId, frame, xPx, yPx, radiusPx, camera } = job.payload as {
      flightId: number;
      frame: number;
      xPx: number;
      yPx: number;
      radiusPx: number | null;
      camera?: CameraMode;
    };
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
      // A job queued before the camera option existed followed a still camera.
      const moving = camera === 'moving';
      const cal = moving ? await currentCalibration(clip.id) : null;
      const calFrame = cal?.input.frame;
      const referenceFrame = calFrame !== null && calFrame !== undefined && calFrame < probe.frameCount ? calFrame : frame;
      const result = await followBall(
        probe,
        { frame, x: xPx, y: yPx, ...(radiusPx ? { radius: radiusPx } : {}) },
        {
          captureFps: clip.captureFps,
          endFrame: flight.frameEnd,
          camera: moving ? 'moving' : 'still',
          ...(moving ? { referenceFrame } : {}),
          signal,
          onProgress: (info) => progress((95 * (info.frame - frame)) / span),
        },
      );
      if (signal.aborted) throw signal.reason;
      const stored = await storeFollowedPoints(
        flight.id,
        frame,
        result.points.map((p) => ({ frame: p.frame, xPx: p.x, yPx: p.y, radiusPx: result.radiusPx, confidence: p.confidence, source: 'auto' as const })),
        result.camera ? storedMotion({ referenceFrame: result.referenceFrame, maps: result.camera }, clip) : null,
      );
      const last = result.points.at(-1);
      return {
        pointCount: stored,
        stoppedBecause: result.stoppedBecause,
        lastFrame: last ? last.frame : frame,
        radiusPx: result.radiusPx,
        camera: moving ? 'moving' : 'still',
      };
    } finally {
      for (const h of held) await h.release();
    }
  },
};
