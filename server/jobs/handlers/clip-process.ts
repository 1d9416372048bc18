/**
 * `clip.process`: probe the stored clip, cut it into frames for tracing and a thumbnail strip, and mark
 * the clip ready. On failure nothing of the frames stays and the clip shows the reason.
 */
import { rm } from 'node:fs/promises';
import { join } from 'node:path';
import { Clip } from '../../models';
import { clipKeys, storage } from '../../storage';
import { jobWorkPurpose } from '../../storage/work-names';
import { extractFrames, probeClip, probeFrameSet, type MediaProbe } from '../../video';
import { JobFailure, type JobHandler } from '../types';

const STRIP_HEIGHT_PX = 90;
const STRIP_TILES = 12;

async function loadClip(clipId: unknown): Promise<Clip> {
  const clip = typeof clipId === 'number' ? await Clip.findByPk(clipId) : null;
  if (!clip) throw new JobFailure('The clip was deleted before it could be processed.', 'CLIP_GONE');
  return clip;
}

/** Local paths of the clip's source (a video file, or the uploaded frames in order), released after use. */
async function localSource(clip: Clip): Promise<{ paths: string[]; release: () => Promise<void> }> {
  const keys = clip.kind === 'video' ? [clip.sourceKey] : await storage().list(clip.sourceKey);
  const held: { path: string; release: () => Promise<void> }[] = [];
  const release = async () => {
    for (const h of held) await h.release();
  };
  for (const key of keys) {
    const local = await storage().localPath(key);
    if (!local) {
      await release();
      throw new JobFailure('The uploaded file of this clip is missing from storage. Delete the clip and upload it again.', 'CLIP_SOURCE_MISSING');
    }
    held.push(local);
  }
  if (held.length === 0) throw new JobFailure('The uploaded frames of this clip are missing from storage. Delete the clip and upload them again.', 'CLIP_SOURCE_MISSING');
  return { paths: held.map((h) => h.path), release };
}

export const clipProcessHandler: JobHandler = {
  type: 'clip.process',

  async run({ job, signal, progress }) {
    const clip = await loadClip(job.payload.clipId);
    const framesKey = clipKeys.frames(clip.clubId, clip.id);
    // A previous attempt whose worker died may have left frames: start clean.
    await storage().removePrefix(framesKey);
    const source = await localSource(clip);
    const work = await storage().workDir(jobWorkPurpose(job));
    try {
      const probe: MediaProbe = clip.kind === 'video' ? await probeClip(source.paths[0]!) : await probeFrameSet(source.paths, clip.captureFps);
      progress(2);
      const extracted = await extractFrames(probe, join(work, 'frames'), {
        signal,
        stripTiles: STRIP_TILES,
        stripHeight: STRIP_HEIGHT_PX,
        onProgress: (p) => progress(2 + p * 0.95),
      });
      if (signal.aborted) throw signal.reason;
      await storage().importDir(framesKey, extracted.dir);
      const fresh = await Clip.findByPk(clip.id);
      if (!fresh) {
        // Deleted while we worked: its files must not come back.
        await storage().removePrefix(clipKeys.prefix(clip.clubId, clip.id));
        throw new JobFailure('The clip was deleted while it was being processed.', 'CLIP_GONE');
      }
      const tileWidth = 2 * Math.round((STRIP_HEIGHT_PX * extracted.width) / extracted.height / 2);
      await fresh.update({
        framesReady: true,
        frameCount: extracted.frameCount,
        frameWidth: extracted.width,
        frameHeight: extracted.height,
        frameNamePattern: extracted.pattern,
        strip: { tileCount: extracted.stripTiles, tileWidth, tileHeight: STRIP_HEIGHT_PX, frames: extracted.stripFrames },
        status: 'ready',
        failureReason: null,
      });
      return { frameCount: extracted.frameCount, frameWidth: extracted.width, frameHeight: extracted.height };
    } finally {
      await rm(work, { recursive: true, force: true });
      await source.release();
    }
  },

  async cleanup(job) {
    const clip = typeof job.payload.clipId === 'number' ? await Clip.findByPk(job.payload.clipId) : null;
    if (!clip) return;
    await storage().removePrefix(clipKeys.frames(clip.clubId, clip.id));
    if (clip.framesReady) await clip.update({ framesReady: false, frameNamePattern: null, strip: null, frameWidth: null, frameHeight: null });
  },

  async onFailed(job, reason) {
    if (typeof job.payload.clipId !== 'number') return;
    await Clip.update({ status: 'failed', failureReason: reason }, { where: { id: job.payload.clipId } });
  },
};
