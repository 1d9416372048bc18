import { onBeforeUnmount, shallowRef, toValue, watchEffect, type MaybeRefOrGetter } from 'vue';

/** The one primary action a page offers; the layout shows it beside the page title. */
export interface PageAction {
  label: string;
  /** A PrimeIcons class, e.g. `pi pi-plus`. */
  icon?: string;
  onClick: () => void;
  disabled?: boolean;
  loading?: boolean;
}

interface PageHeaderState {
  /** Overrides the route's `meta.title` (detail pages name the thing shown). */
  title: string | null;
  subtitle: string | null;
  action: PageAction | null;
}

const EMPTY: PageHeaderState = { title: null, subtitle: null, action: null };

/** Read by AppLayout; written only through `usePageHeader`. */
export const pageHeader = shallowRef<PageHeaderState>(EMPTY);

/**
 * Lets a routed view set its title, subtitle and primary action in the layout's header.
 * The values may be refs or getters; they are cleared when the view unmounts.
 *
 * @example usePageHeader({ action: () => ({ label: 'New session', icon: 'pi pi-plus', onClick: openDialog }) })
 */
export function usePageHeader(options: {
  title?: MaybeRefOrGetter<string | null>;
  subtitle?: MaybeRefOrGetter<string | null>;
  action?: MaybeRefOrGetter<PageAction | null>;
}): void {
  let mine: PageHeaderState | null = null;
  const stop = watchEffect(() => {
    mine = {
      title: toValue(options.title) ?? null,
      subtitle: toValue(options.subtitle) ?? null,
      action: toValue(options.action) ?? null,
    };
    pageHeader.value = mine;
  });
  onBeforeUnmount(() => {
    stop();
    // Note: the next view may already have set its header (route transitions mount before unmounting): keep it.
    if (pageHeader.value === mine) pageHeader.value = EMPTY;
  });
}
