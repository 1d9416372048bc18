import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import { deleteSession, listSessions, type Session, type SessionFilters } from '@/api/sessions';
import { useLatestLoad } from '@/composables/use-latest-load';
import type { UnitSystem } from '@/utils/units';
import { useClubStore } from './club';
import { useUnitsStore } from './units';

/**
 * The Sessions list with its filters (kept while the coach opens a session and comes back), and the member's
 * display units (see the units store), which the screens of sessions, clips, tracing and reports show quantities in.
 */
export const useSessionsStore = defineStore('sessions', () => {
  const club = useClubStore();
  const items = shallowRef<Session[]>([]);
  const total = ref(0);
  const { loading, error, run } = useLatestLoad();
  const filters = ref<SessionFilters>({ from: null, to: null, venue: null });
  const unitsStore = useUnitsStore();
  const units = computed<UnitSystem>(() => unitsStore.system);

  async function load(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    await run(async (isCurrent) => {
      const answer = await listSessions(clubId, filters.value);
      if (!isCurrent()) return;
      items.value = answer.data;
      total.value = answer.meta.total;
    });
  }

  /** Resolves with the member's display units once the club's setting is known. */
  function ensureUnits(): Promise<UnitSystem> {
    return unitsStore.ensure();
  }

  /** Replaces one session in the list after an edit, or adds a new one. */
  function upsert(session: Session): void {
    const isNew = !items.value.some((s) => s.id === session.id);
    const rest = items.value.filter((s) => s.id !== session.id);
    // Same order as the server: newest date first.
    items.value = [session, ...rest].sort((a, b) => (a.date === b.date ? b.id - a.id : b.date.localeCompare(a.date)));
    if (isNew) total.value += 1;
  }

  async function remove(session: Session, confirm: boolean): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    await deleteSession(clubId, session.id, confirm);
    items.value = items.value.filter((s) => s.id !== session.id);
    total.value = Math.max(0, total.value - 1);
  }

  // Another club in view: nothing of the previous club may stay.
  watch(
    () => club.clubId,
    () => {
      items.value = [];
      total.value = 0;
    },
  );

  return { items, total, loading, error, filters, units, load, ensureUnits, upsert, remove };
});
