import { defineStore } from 'pinia';
import { shallowRef, watch } from 'vue';
import { listFlightActions, listFlights, type Flight, type FlightAction } from '@/api/flights';
import { fetchSession, type Session } from '@/api/sessions';
import { useLatestLoad } from '@/composables/use-latest-load';
import { useClubStore } from './club';

/**
 * The Session report: one session with every flight of it and the club's action labels. The server scopes the
 * flights: an athlete's answer holds only her own, and a session without them answers 404 NOT_FOUND.
 */
export const useSessionReportStore = defineStore('session-report', () => {
  const club = useClubStore();
  const session = shallowRef<Session | null>(null);
  const flights = shallowRef<Flight[]>([]);
  const actions = shallowRef<FlightAction[]>([]);
  const { loading, error, notFound, run, reset } = useLatestLoad({ notFound: true });

  function labelOfAction(key: string): string {
    return actions.value.find((a) => a.key === key)?.label ?? key.replace(/_/g, ' ');
  }

  function clear(): void {
    session.value = null;
    flights.value = [];
    actions.value = [];
  }

  /** Loads a session's report; `alongside` is what the page must have before it shows the session (the club's units). */
  async function load(sessionId: number, alongside?: Promise<unknown>): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    if (session.value?.id !== sessionId) clear();
    await run(async (isCurrent) => {
      const [found, list, actionList] = await Promise.all([
        fetchSession(clubId, sessionId),
        listFlights(clubId, { sessionId }),
        // Labels only: without them the keys are shown in words.
        listFlightActions(clubId).catch(() => [] as FlightAction[]),
        alongside,
      ]);
      if (!isCurrent()) return;
      session.value = found;
      flights.value = list.data;
      actions.value = actionList;
    });
  }

  // Another club in view: nothing of the previous club may stay.
  watch(
    () => club.clubId,
    () => {
      reset();
      clear();
    },
  );

  return { session, flights, actions, loading, error, notFound, labelOfAction, load };
});
