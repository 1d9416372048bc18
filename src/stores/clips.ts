import { defineStore } from 'pinia';
import { computed, ref, watch } from 'vue';
import { deleteClip, fetchClip, listClips, listSessionClips, updateClip, type Clip } from '@/api/clips';
import { isFinished, retryJob, watchJob, type Job } from '@/api/jobs';
import { loadErrorText } from '@/composables/use-loader';
import { useClubStore } from './club';

/**
 * Clips the coach has on screen, and the processing jobs being watched for them. Kept in a store so that an
 * upload's processing progress carries on while the coach moves between a session, the Clips list and back.
 */
export const useClipsStore = defineStore('clips', () => {
  const club = useClubStore();
  const byId = ref<Record<number, Clip>>({});
  /** The latest state of each clip's processing job, by clip id, while it is being watched. */
  const jobs = ref<Record<number, Job>>({});
  /** Why watching a clip's job stopped working (the job could not be read), by clip id. */
  const watchErrors = ref<Record<number, string>>({});
  const watchers = new Map<number, AbortController>();

  const all = computed(() => Object.values(byId.value).sort((a, b) => b.id - a.id));

  function forSession(sessionId: number): Clip[] {
    return all.value.filter((c) => c.sessionId === sessionId);
  }

  function put(clip: Clip): void {
    byId.value = { ...byId.value, [clip.id]: clip };
    if (clip.status === 'processing' && clip.job && !isFinished(clip.job)) watchProcessing(clip.id, clip.job.id);
  }

  async function loadSession(sessionId: number): Promise<Clip[]> {
    const clubId = club.clubId;
    if (clubId === null) return [];
    const answer = await listSessionClips(clubId, sessionId);
    // Clips deleted elsewhere since the last look go away.
    const kept = Object.values(byId.value).filter((c) => c.sessionId !== sessionId);
    byId.value = Object.fromEntries([...kept, ...answer.data].map((c) => [c.id, c]));
    answer.data.forEach(put);
    return answer.data;
  }

  async function loadAll(filters: Parameters<typeof listClips>[1] = {}): Promise<Clip[]> {
    const clubId = club.clubId;
    if (clubId === null) return [];
    const answer = await listClips(clubId, filters);
    answer.data.forEach(put);
    return answer.data;
  }

  async function refresh(clipId: number): Promise<Clip | null> {
    const clubId = club.clubId;
    if (clubId === null) return null;
    const clip = await fetchClip(clubId, clipId);
    put(clip);
    return clip;
  }

  /** Polls a clip's processing job until it ends, then reloads the clip (frame count, status, strip). */
  function watchProcessing(clipId: number, jobId: number): void {
    const clubId = club.clubId;
    if (clubId === null || watchers.has(clipId)) return;
    const stop = new AbortController();
    watchers.set(clipId, stop);
    const rest = { ...watchErrors.value };
    delete rest[clipId];
    watchErrors.value = rest;
    watchJob(
      clubId,
      jobId,
      (job) => {
        jobs.value = { ...jobs.value, [clipId]: job };
      },
      stop.signal,
    )
      .then(() => {
        watchers.delete(clipId);
        return refresh(clipId);
      })
      .catch((cause: unknown) => {
        watchers.delete(clipId);
        if (cause instanceof DOMException && cause.name === 'AbortError') return;
        watchErrors.value = { ...watchErrors.value, [clipId]: loadErrorText(cause) };
      });
  }

  /** Queues a failed processing job again and watches it. */
  async function retry(clip: Clip): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null || !clip.job) return;
    const job = await retryJob(clubId, clip.job.id);
    jobs.value = { ...jobs.value, [clip.id]: job };
    byId.value = {
      ...byId.value,
      [clip.id]: { ...clip, status: 'processing', failureReason: null, job: { id: job.id, type: job.type, status: job.status, progress: job.progress, error: job.error } },
    };
    watchProcessing(clip.id, job.id);
  }

  /** Adds a just-uploaded clip and starts watching its processing. */
  function added(clip: Clip, job: Job): void {
    jobs.value = { ...jobs.value, [clip.id]: job };
    put({ ...clip, job: clip.job ?? { id: job.id, type: job.type, status: job.status, progress: job.progress, error: job.error } });
    watchProcessing(clip.id, job.id);
  }

  async function correctRate(clip: Clip, captureFps: number): Promise<Clip | null> {
    const clubId = club.clubId;
    if (clubId === null) return null;
    const updated = await updateClip(clubId, clip.id, { captureFps });
    put(updated);
    return updated;
  }

  async function rename(clip: Clip, label: string): Promise<Clip | null> {
    const clubId = club.clubId;
    if (clubId === null) return null;
    const updated = await updateClip(clubId, clip.id, { label });
    put(updated);
    return updated;
  }

  async function remove(clip: Clip, confirm: boolean): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    await deleteClip(clubId, clip.id, confirm);
    watchers.get(clip.id)?.abort();
    watchers.delete(clip.id);
    const rest = { ...byId.value };
    delete rest[clip.id];
    byId.value = rest;
  }

  /** Per cent shown for a clip's processing: the watched job's, else the summary's. */
  function progressOf(clip: Clip): number {
    return jobs.value[clip.id]?.progress ?? clip.job?.progress ?? 0;
  }

  function stopAll(): void {
    watchers.forEach((c) => c.abort());
    watchers.clear();
  }

  watch(
    () => club.clubId,
    () => {
      stopAll();
      byId.value = {};
      jobs.value = {};
      watchErrors.value = {};
    },
  );

  return { byId, jobs, watchErrors, all, forSession, put, loadSession, loadAll, refresh, retry, added, correctRate, rename, remove, progressOf, stopAll, errorText: loadErrorText };
});
