import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import type { Session } from '@shared/schemas/session';
import type { FlightStatus } from '@shared/schemas/flight';
import { actionKeyWords, flightCsvRow, type FlightCsvRow } from '@shared/exports/flights';
import { listSessions } from '@/api/sessions';
import { listFlightActions, listFlights, type Flight, type FlightAction } from '@/api/flights';
import { ballName } from '@/components/trace/balls';
import { useLatestLoad } from '@/composables/use-latest-load';
import { useClubStore } from './club';

export interface FlightFilters {
  sessionId: number | null;
  athleteId: number | null;
  action: string | null;
  ballId: string | null;
  status: FlightStatus | null;
}

/** One row of the Flights table: the flight, its session and the latest fit's figures. */
export interface FlightRow extends FlightCsvRow {
  flight: Flight;
  status: FlightStatus;
}

/**
 * The Flights list: every flight of the club in view (an athlete's own only), the filters (kept while the coach
 * opens a report and comes back) and, per flight, the latest fit's summary (launch, carry, C_d, standard-conditions carry).
 */
export const useReportStore = defineStore('report', () => {
  const club = useClubStore();
  const flights = shallowRef<Flight[]>([]);
  const sessions = shallowRef<Session[]>([]);
  const actions = shallowRef<FlightAction[]>([]);
  const { loading, error, run, reset } = useLatestLoad();
  const filters = ref<FlightFilters>({ sessionId: null, athleteId: null, action: null, ballId: null, status: null });

  const sessionById = computed(() => new Map(sessions.value.map((s) => [s.id, s])));
  const actionLabel = computed(() => new Map(actions.value.map((a) => [a.key, a.label])));

  function labelOfAction(key: string): string {
    return actionLabel.value.get(key) ?? actionKeyWords(key);
  }

  const rows = computed<FlightRow[]>(() =>
    flights.value.map((flight) => ({
      ...flightCsvRow(flight, { session: sessionById.value.get(flight.sessionId) ?? null, actionLabel: labelOfAction(flight.action) }),
      flight,
      status: flight.status,
    })),
  );

  const filtered = computed<FlightRow[]>(() => {
    const f = filters.value;
    return rows.value.filter(
      (r) =>
        (f.sessionId === null || r.flight.sessionId === f.sessionId) &&
        (f.athleteId === null || r.flight.athleteId === f.athleteId) &&
        (f.action === null || r.flight.action === f.action) &&
        (f.ballId === null || r.flight.ballId === f.ballId) &&
        (f.status === null || r.flight.status === f.status),
    );
  });

  /** Filter choices from what the list holds, so an athlete never sees another athlete's name. */
  const athleteOptions = computed(() => {
    const names = new Map<number, string>();
    for (const f of flights.value) names.set(f.athleteId, f.athleteName);
    return [...names].map(([value, label]) => ({ value, label })).sort((a, b) => a.label.localeCompare(b.label));
  });
  const actionOptions = computed(() => {
    const keys = new Set(flights.value.map((f) => f.action));
    return [...keys].map((value) => ({ value, label: labelOfAction(value) })).sort((a, b) => a.label.localeCompare(b.label));
  });
  const ballOptions = computed(() => {
    const ids = new Set(flights.value.map((f) => f.ballId));
    return [...ids].map((value) => ({ value, label: ballName(value) })).sort((a, b) => a.label.localeCompare(b.label));
  });

  async function load(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    await run(async (isCurrent) => {
      const [list, sessionList, actionList] = await Promise.all([
        listFlights(clubId),
        listSessions(clubId).then((a) => a.data).catch(() => [] as Session[]),
        listFlightActions(clubId).catch(() => [] as FlightAction[]),
      ]);
      if (!isCurrent()) return;
      flights.value = list.data;
      sessions.value = sessionList;
      actions.value = actionList;
    });
  }

  /** Puts a changed flight (e.g. just reviewed) into the list without a reload. */
  function upsert(flight: Flight): void {
    const exists = flights.value.some((f) => f.id === flight.id);
    flights.value = exists ? flights.value.map((f) => (f.id === flight.id ? flight : f)) : [flight, ...flights.value];
  }

  function clearFilters(): void {
    filters.value = { sessionId: null, athleteId: null, action: null, ballId: null, status: null };
  }

  // Another club in view: nothing of the previous club may stay.
  watch(
    () => club.clubId,
    () => {
      reset();
      flights.value = [];
      sessions.value = [];
      actions.value = [];
      clearFilters();
    },
  );

  return {
    flights, sessions, actions, loading, error, filters, rows, filtered, sessionById,
    athleteOptions, actionOptions, ballOptions, labelOfAction, load, upsert, clearFilters,
  };
});
