import type { App } from 'vue';
import { describeError } from './errors';
import { setErrorReporter } from './http';

/** How long an error toast stays, in milliseconds: long enough to read two lines. */
const TOAST_LIFE_MS = 7000;

/**
 * The one place where an API error becomes a toast. Called once in main.ts after ToastService is installed;
 * the `<Toast/>` that shows it lives in the signed-in layout.
 */
export function installErrorToasts(app: App): void {
  const toast = app.config.globalProperties.$toast;
  setErrorReporter((error) => {
    toast.add({ ...describeError(error), life: TOAST_LIFE_MS });
  });
}
