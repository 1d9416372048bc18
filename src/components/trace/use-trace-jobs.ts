import { computed, ref, shallowRef, type ComputedRef, type Ref } from 'vue';
import { fetchPoints, startFit, startFollow, type Flight } from '@/api/flights';
import { watchJob, type Job } from '@/api/jobs';
import { loadErrorText } from '@/composables/use-loader';
import type { TracePoint } from './track-edit';
import { fromTrackPoint } from './use-track-editing';

/** What the Trace screen's jobs need of the rest of its state. */
export interface TraceJobsContext {
  clubId: Ref<number | null>;
  flightId: Ref<number | null>;
  flight: ComputedRef<Flight | null>;
  currentPoint: ComputedRef<TracePoint | undefined>;
  readOnly: ComputedRef<boolean>;
  dirty: ComputedRef<boolean>;
  save: () => Promise<boolean>;
  adopt: (list: TracePoint[], label: string) => void;
  refreshFlight: (id: number) => Promise<void>;
}

function isAbort(cause: unknown): boolean {
  return cause instanceof DOMException && cause.name === 'AbortError';
}

/**
 * The two server jobs started from the Trace screen, each watched until it ends: auto-follow from a mark, and the
 * fit of the flight. A failed job's reason is kept for the screen; leaving stops the watching, not the jobs.
 */
export function useTraceJobs(ctx: TraceJobsContext) {
  const followJob = shallowRef<Job | null>(null);
  const followError = ref<string | null>(null);
  const fitJob = shallowRef<Job | null>(null);
  const fitError = ref<string | null>(null);
  let jobsStop = new AbortController();

  const running = (job: Job | null) => job !== null && (job.status === 'queued' || job.status === 'running');
  const following = computed(() => running(followJob.value));
  const fitting = computed(() => running(fitJob.value));

  function stopJobs(): void {
    jobsStop.abort();
    jobsStop = new AbortController();
  }

  /** Forgets the jobs shown and their errors (another clip or flight is in view). */
  function clearJobs(): void {
    followJob.value = null;
    fitJob.value = null;
    clearErrors();
  }

  function clearErrors(): void {
    followError.value = null;
    fitError.value = null;
  }

  /**
   * Follows the ball from the mark on the frame in view. Unsaved marks are saved first, because the follower
   * starts from the stored track and keeps the points before the start frame.
   */
  async function follow(): Promise<void> {
    const f = ctx.flight.value;
    const start = ctx.currentPoint.value;
    const id = ctx.clubId.value;
    if (!f || !start || id === null || ctx.readOnly.value) return;
    followError.value = null;
    if (ctx.dirty.value) await ctx.save();
    const job = await startFollow(id, f.id, { frame: start.frame, xPx: start.x, yPx: start.y, radiusPx: start.radius });
    followJob.value = job;
    try {
      const last = await watchJob(id, job.id, (j) => (followJob.value = j), jobsStop.signal);
      if (last.status === 'failed') {
        followError.value = last.error ?? 'The follower stopped without a reason. Try again from another mark.';
        return;
      }
      if (ctx.flightId.value !== f.id) return;
      ctx.adopt((await fetchPoints(id, f.id)).map(fromTrackPoint), 'auto-follow');
      await ctx.refreshFlight(f.id);
    } catch (cause) {
      if (isAbort(cause)) return;
      followError.value = loadErrorText(cause);
    }
  }

  /** Fits the flight (its unsaved marks saved first) and puts the new fit into the flight. */
  async function fit(): Promise<void> {
    const f = ctx.flight.value;
    const id = ctx.clubId.value;
    if (!f || id === null || ctx.readOnly.value) return;
    fitError.value = null;
    if (ctx.dirty.value) await ctx.save();
    try {
      const job = await startFit(id, f.id);
      fitJob.value = job;
      const last = await watchJob(id, job.id, (j) => (fitJob.value = j), jobsStop.signal);
      if (last.status === 'failed') fitError.value = last.error ?? 'The fit stopped without a reason.';
      await ctx.refreshFlight(f.id);
    } catch (cause) {
      if (isAbort(cause)) return;
      fitError.value = loadErrorText(cause);
    }
  }

  return { followJob, followError, fitJob, fitError, following, fitting, follow, fit, stopJobs, clearJobs, clearErrors };
}
