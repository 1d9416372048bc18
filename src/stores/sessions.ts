import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import { deleteSession, listSessionsPage, type Session, type SessionFilters } from '@/api/sessions';
import { useLatestLoad } from '@/composables/use-latest-load';
import type { UnitSystem } from '@/utils/units';
import { useClubStore } from './club';
import { useUnitsStore } from './units';

/** Rows per page of the Sessions table, and the sizes it offers. */
export const SESSION_PAGE_SIZES = [20, 50, 100];

/**
 * The Sessions list, one page at a time from the server (newest first), with its filters and page (kept while
 * the coach opens a session and comes back), and the member's display units (see the units store), which the
 * screens of sessions, clips, tracing and reports show quantities in.
 */
export const useSessionsStore = defineStore('sessions', () => {
  const club = useClubStore();
  const items = shallowRef<Session[]>([]);
  const total = ref(0);
  const { loading, error, run } = useLatestLoad();
  const filters = ref<SessionFilters>({ from: null, to: null, venue: null });
  /** Index of the first row of the page in view, and the page size. */
  const first = ref(0);
  const rows = ref(SESSION_PAGE_SIZES[0]!);
  const unitsStore = useUnitsStore();
  const units = computed<UnitSystem>(() => unitsStore.system);

  async function load(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    await run(async (isCurrent) => {
      const answer = await listSessionsPage(clubId, filters.value, { page: Math.floor(first.value / rows.value) + 1, pageSize: rows.value });
      if (!isCurrent()) return;
      items.value = answer.data;
      total.value = answer.meta.total;
    });
  }

  /** Resolves with the member's display units once the club's setting is known. */
  function ensureUnits(): Promise<UnitSystem> {
    return unitsStore.ensure();
  }

  /** Shows another page (the table's paginator). */
  function setPage(nextFirst: number, nextRows: number): void {
    first.value = nextFirst;
    rows.value = nextRows;
    void load();
  }

  /** Filters changed: back to the first page. */
  function applyFilters(next: SessionFilters): void {
    filters.value = next;
    first.value = 0;
    void load();
  }

  /** Replaces one session in the page after an edit; a new one (or a changed date) reloads the page from the server. */
  function upsert(session: Session): void {
    const current = items.value.find((s) => s.id === session.id);
    if (current && current.date === session.date) items.value = items.value.map((s) => (s.id === session.id ? session : s));
    else void load();
  }

  async function remove(session: Session, confirm: boolean): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    await deleteSession(clubId, session.id, confirm);
    items.value = items.value.filter((s) => s.id !== session.id);
    total.value = Math.max(0, total.value - 1);
    // The next page's first session moves up into this one.
    void load();
  }

  // Another club in view: nothing of the previous club may stay.
  watch(
    () => club.clubId,
    () => {
      items.value = [];
      total.value = 0;
      first.value = 0;
    },
  );

  return { items, total, loading, error, filters, first, rows, units, load, ensureUnits, setPage, applyFilters, upsert, remove };
});
