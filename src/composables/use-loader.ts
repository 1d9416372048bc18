import { shallowRef, type ShallowRef } from 'vue';
import { ApiRequestError } from '@/api/errors';

export interface Loader<T> {
  data: ShallowRef<T | null>;
  loading: ShallowRef<boolean>;
  /** The failure of the last load, as text a coach can act on; null while loading or after success. */
  error: ShallowRef<string | null>;
  /** Runs the load again (the retry button of the error state). Concurrent calls keep only the newest answer. */
  load: () => Promise<void>;
}

/** Text for a failed load, shown inline next to a retry button. */
export function loadErrorText(error: unknown): string {
  if (error instanceof ApiRequestError) return error.message;
  return 'The page could not be loaded. Check your connection and try again.';
}

/**
 * Loading and error state around one read from the API, for views that show a skeleton while loading
 * and an inline message with a retry when it fails.
 */
export function useLoader<T>(fetcher: () => Promise<T>, options: { immediate?: boolean } = {}): Loader<T> {
  const data = shallowRef<T | null>(null);
  const loading = shallowRef(false);
  const error = shallowRef<string | null>(null);
  let generation = 0;

  async function load(): Promise<void> {
    const mine = ++generation;
    loading.value = true;
    error.value = null;
    try {
      const answer = await fetcher();
      if (mine === generation) data.value = answer;
    } catch (cause) {
      if (mine === generation) error.value = loadErrorText(cause);
    } finally {
      if (mine === generation) loading.value = false;
    }
  }

  if (options.immediate ?? true) void load();
  return { data, loading, error, load };
}
