import { computed } from 'vue';
import { useToast } from 'primevue/usetoast';
import type { useTraceStore } from '@/stores/trace';

/** Why the follower stopped, in words (the job's `stoppedBecause`). */
const STOP_WORDS: Record<string, string> = {
  lost: 'it lost the ball',
  'left-frame': 'the ball left the picture',
  landed: 'the ball landed',
  'end-of-clip': 'the clip ended',
};

/**
 * The Trace screen's two jobs as the coach starts them: auto-follow from the mark in view (with a toast saying
 * how far it got and why it stopped) and the fit of the flight, whose latest result the Measurement panel shows.
 * A refused start is shown by the request wrapper; a failed job's reason stays in the store for its panel.
 */
export function useTraceFitting(trace: ReturnType<typeof useTraceStore>) {
  const toast = useToast();
  const latestFit = computed(() => trace.flight?.latestFit ?? null);

  async function follow(): Promise<void> {
    try {
      await trace.follow();
      const job = trace.followJob;
      if (job?.status === 'done') {
        const result = (job.result ?? {}) as { pointCount?: number; stoppedBecause?: string; lastFrame?: number };
        toast.add({
          severity: 'success',
          summary: 'Auto-follow finished',
          detail: `${result.pointCount ?? trace.points.length} marks${result.lastFrame !== undefined ? ` up to frame ${result.lastFrame}` : ''}${
            result.stoppedBecause ? `; it stopped because ${STOP_WORDS[result.stoppedBecause] ?? result.stoppedBecause}` : ''
          }. Review them frame by frame.`,
          life: 6000,
        });
      }
    } catch {
      // Shown by http.ts (start refused) or in followError (job failed).
    }
  }

  async function fit(): Promise<void> {
    try {
      await trace.fit();
    } catch {
      // 409 CALIBRATION_REQUIRED and others: shown by http.ts.
    }
  }

  return { latestFit, follow, fit };
}
