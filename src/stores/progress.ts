import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import { fetchAthletes, type AthleteProfileSummary } from '@/api/athletes';
import { listFlightActions, listFlights, type Flight, type FlightAction } from '@/api/flights';
import { listSessions, type Session } from '@/api/sessions';
import { measuredFlights, progressSummary, type MeasuredFlight } from '@/components/progress/progress-stats';
import { loadErrorText } from '@/composables/use-loader';
import { useLatestLoad } from '@/composables/use-latest-load';
import { useClubStore } from './club';

/**
 * Progress: the athlete in view (a coach or admin picks one; an athlete always sees her own), her flights and the
 * sessions that date them. The pick is kept while the coach opens a Flight report and comes back.
 */
export const useProgressStore = defineStore('progress', () => {
  const club = useClubStore();
  const athletes = shallowRef<AthleteProfileSummary[]>([]);
  const athleteId = ref<number | null>(null);
  const flights = shallowRef<Flight[]>([]);
  const sessions = shallowRef<Session[]>([]);
  const actions = shallowRef<FlightAction[]>([]);
  const { loading, error, run, cancel, reset } = useLatestLoad();
  /** True once flights of the current pick have arrived (distinguishes "none yet" from "not loaded"). */
  const loaded = ref(false);

  const isStaff = computed(() => club.hasRole(['admin', 'coach']));
  const sessionDate = computed(() => new Map(sessions.value.map((s) => [s.id, s.date])));
  const measured = computed<MeasuredFlight[]>(() => measuredFlights(flights.value, (id) => sessionDate.value.get(id) ?? null));
  const summary = computed(() => progressSummary(measured.value));
  const athleteOptions = computed(() =>
    athletes.value.map((a) => ({ value: a.id, label: a.displayName })).sort((a, b) => a.label.localeCompare(b.label)),
  );

  function labelOfAction(key: string): string {
    return actions.value.find((a) => a.key === key)?.label ?? key.replace(/_/g, ' ');
  }

  /** Loads the athletes a coach can pick (an athlete has no picker). */
  async function loadAthletes(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null || !isStaff.value) return;
    try {
      athletes.value = await fetchAthletes(clubId);
    } catch (cause) {
      error.value = loadErrorText(cause);
    }
  }

  /** Loads the flights of the athlete in view: the pick for staff, the signed-in athlete herself otherwise. */
  async function load(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    if (isStaff.value && athleteId.value === null) {
      cancel();
      flights.value = [];
      loaded.value = false;
      return;
    }
    await run(async (isCurrent) => {
      // Note: an athlete's list is scoped by the server; passing her id too would only repeat it.
      const [list, sessionList, actionList] = await Promise.all([
        listFlights(clubId, { athleteId: isStaff.value ? athleteId.value : null }),
        listSessions(clubId),
        // Labels only: without them the keys are shown in words.
        listFlightActions(clubId).catch(() => [] as FlightAction[]),
      ]);
      if (!isCurrent()) return;
      flights.value = list.data;
      sessions.value = sessionList.data;
      actions.value = actionList;
      loaded.value = true;
    });
  }

  async function pick(id: number | null): Promise<void> {
    if (athleteId.value === id && loaded.value) return;
    athleteId.value = id;
    await load();
  }

  // Another club in view: nothing of the previous club may stay.
  watch(
    () => club.clubId,
    () => {
      reset();
      athletes.value = [];
      athleteId.value = null;
      flights.value = [];
      sessions.value = [];
      actions.value = [];
      loaded.value = false;
    },
  );

  return {
    athletes, athleteId, flights, sessions, actions, loading, error, loaded, isStaff, measured, summary, athleteOptions,
    labelOfAction, loadAthletes, load, pick,
  };
});
