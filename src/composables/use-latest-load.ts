import { ref } from 'vue';
import { ApiRequestError } from '@/api/errors';
import { loadErrorText } from './use-loader';

/**
 * Loading state of a store's read: a newer load supersedes an older one (its answers are dropped), and a failure
 * becomes text for the inline error with its retry. With `notFound` (a page about one record named in its
 * address: a flight, a session) a 404 NOT_FOUND is kept apart instead, and the page shows the not-found screen.
 */
export function useLatestLoad(options: { notFound?: boolean } = {}) {
  const loading = ref(false);
  const error = ref<string | null>(null);
  const notFound = ref(false);
  let generation = 0;

  /** Runs `read`; it writes its answers only while `isCurrent()` holds. */
  async function run(read: (isCurrent: () => boolean) => Promise<void>): Promise<void> {
    const mine = ++generation;
    const isCurrent = () => mine === generation;
    loading.value = true;
    error.value = null;
    notFound.value = false;
    try {
      await read(isCurrent);
    } catch (cause) {
      if (!isCurrent()) return;
      if (options.notFound && cause instanceof ApiRequestError && cause.code === 'NOT_FOUND') notFound.value = true;
      else error.value = loadErrorText(cause);
    } finally {
      if (isCurrent()) loading.value = false;
    }
  }

  /** Drops any load under way: its answer, if it still comes, is ignored. */
  function cancel(): void {
    generation++;
    loading.value = false;
  }

  /** Drops any load under way and its error (another club came into view). */
  function reset(): void {
    cancel();
    error.value = null;
    notFound.value = false;
  }

  return { loading, error, notFound, run, cancel, reset };
}
