import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import type { Session } from '@shared/schemas/session';
import type { FlightSort, FlightStatus } from '@shared/schemas/flight';
import { actionKeyWords, flightCsvRow, type FlightCsvRow } from '@shared/exports/flights';
import { fetchAthletes } from '@/api/athletes';
import { listSessions } from '@/api/sessions';
import { listFlightActions, listFlights, listFlightsPage, type Flight, type FlightAction } from '@/api/flights';
import { ballName, groupedBallOptions } from '@/components/trace/balls';
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

/** Which page of the Flights table is in view and its order, as the table's lazy mode reports them. */
export interface FlightPaging {
  /** Index of the page's first row. */
  first: number;
  rows: number;
  sort: FlightSort;
  order: 'asc' | 'desc';
}

export const FLIGHT_PAGE_SIZES = [25, 50, 100];

/** The table column a server sort belongs to, and back. */
export const SORT_OF_FIELD: Record<string, FlightSort> = {
  sessionDate: 'date',
  athleteName: 'athlete',
  actionLabel: 'action',
  ballName: 'ball',
  statusLabel: 'status',
  launchSpeedMps: 'launchSpeed',
  launchAngleDeg: 'launchAngle',
  carryM: 'carry',
  standardCarryM: 'standardCarry',
};
export const FIELD_OF_SORT = Object.fromEntries(Object.entries(SORT_OF_FIELD).map(([field, sort]) => [sort, field])) as Partial<Record<FlightSort, string>>;

const NO_FILTERS: FlightFilters = { sessionId: null, athleteId: null, action: null, ballId: null, status: null };
/** Newest recorded first until the coach sorts by a column. */
const FIRST_PAGE: FlightPaging = { first: 0, rows: FLIGHT_PAGE_SIZES[0]!, sort: 'recent', order: 'desc' };

/**
 * The Flights list: one page of the club's flights in view (an athlete's own only), filtered, sorted and paged
 * on the server; the filters and the page are kept while the coach opens a report and comes back. Per flight,
 * the latest fit's summary (launch, carry, C_d, standard-conditions carry).
 */
export const useReportStore = defineStore('report', () => {
  const club = useClubStore();
  const flights = shallowRef<Flight[]>([]);
  const total = ref(0);
  const sessions = shallowRef<Session[]>([]);
  const actions = shallowRef<FlightAction[]>([]);
  const athletes = shallowRef<{ id: number; displayName: string }[]>([]);
  const { loading, error, run, reset } = useLatestLoad();
  const page = useLatestLoad();
  const filters = ref<FlightFilters>({ ...NO_FILTERS });
  const paging = ref<FlightPaging>({ ...FIRST_PAGE });
  /** Set once the first load answered: later changes of filter or page load only the page. */
  const loaded = ref(false);

  const sessionById = computed(() => new Map(sessions.value.map((s) => [s.id, s])));
  const actionLabel = computed(() => new Map(actions.value.map((a) => [a.key, a.label])));

  function labelOfAction(key: string): string {
    return actionLabel.value.get(key) ?? actionKeyWords(key);
  }

  function toRow(flight: Flight): FlightRow {
    return {
      ...flightCsvRow(flight, {
        session: sessionById.value.get(flight.sessionId) ?? null,
        actionLabel: labelOfAction(flight.action),
        ballName: ballName(flight.ballId),
      }),
      flight,
      status: flight.status,
    };
  }

  const rows = computed<FlightRow[]>(() => flights.value.map(toRow));

  /** Filter choices from the club's lists (an athlete gets no athlete choice: the view hides it). */
  const athleteOptions = computed(() =>
    athletes.value.map((a) => ({ value: a.id, label: a.displayName })).sort((a, b) => a.label.localeCompare(b.label)),
  );
  const actionOptions = computed(() =>
    actions.value.filter((a) => !a.archived || a.key === filters.value.action).map((a) => ({ value: a.key, label: a.label })),
  );
  const ballOptions = computed(() => groupedBallOptions().flatMap((g) => g.items).sort((a, b) => a.label.localeCompare(b.label)));

  function serverFilters() {
    return { ...filters.value };
  }

  async function readPage(clubId: number): Promise<{ data: Flight[]; total: number }> {
    const p = paging.value;
    const answer = await listFlightsPage(clubId, serverFilters(), {
      page: Math.floor(p.first / p.rows) + 1,
      pageSize: p.rows,
      sort: p.sort,
      order: p.order,
    });
    return { data: answer.data, total: answer.meta.total };
  }

  /** First load: the page with the sessions, actions and athletes the filters and rows need. */
  async function load(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    const staff = club.hasRole(['admin', 'coach']);
    await run(async (isCurrent) => {
      const [answer, sessionList, actionList, athleteList] = await Promise.all([
        readPage(clubId),
        listSessions(clubId).then((a) => a.data).catch(() => [] as Session[]),
        listFlightActions(clubId).catch(() => [] as FlightAction[]),
        staff ? fetchAthletes(clubId).catch(() => []) : Promise.resolve([]),
      ]);
      if (!isCurrent()) return;
      flights.value = answer.data;
      total.value = answer.total;
      sessions.value = sessionList;
      actions.value = actionList;
      athletes.value = athleteList.map((a) => ({ id: a.id, displayName: a.displayName }));
      loaded.value = true;
    });
  }

  /** Reads the page in view again (after a change of page, order or filter). */
  async function loadPage(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    if (!loaded.value) return load();
    await page.run(async (isCurrent) => {
      const answer = await readPage(clubId);
      if (!isCurrent()) return;
      flights.value = answer.data;
      total.value = answer.total;
    });
  }

  function setPage(next: Partial<FlightPaging>): void {
    paging.value = { ...paging.value, ...next };
    void loadPage();
  }

  /** Every flight that passes the filters (for the CSV export), in the table's order. */
  async function allFiltered(): Promise<FlightRow[]> {
    const clubId = club.clubId;
    if (clubId === null) return [];
    const answer = await listFlights(clubId, serverFilters(), {}, { sort: paging.value.sort, order: paging.value.order });
    return answer.data.map(toRow);
  }

  /** Puts a changed flight (e.g. just reviewed) into the page in view without a reload. */
  function upsert(flight: Flight): void {
    if (flights.value.some((f) => f.id === flight.id)) flights.value = flights.value.map((f) => (f.id === flight.id ? flight : f));
  }

  function clearFilters(): void {
    filters.value = { ...NO_FILTERS };
  }

  // A changed filter starts again at the first page.
  watch(
    filters,
    () => {
      if (!loaded.value) return;
      paging.value = { ...paging.value, first: 0 };
      void loadPage();
    },
    { deep: true },
  );

  // Another club in view: nothing of the previous club may stay.
  watch(
    () => club.clubId,
    () => {
      reset();
      page.reset();
      loaded.value = false;
      flights.value = [];
      total.value = 0;
      sessions.value = [];
      actions.value = [];
      athletes.value = [];
      filters.value = { ...NO_FILTERS };
      paging.value = { ...FIRST_PAGE };
    },
  );

  return {
    flights, total, sessions, actions, loading, error, pageLoading: page.loading, pageError: page.error, filters, paging, rows,
    sessionById, athleteOptions, actionOptions, ballOptions, labelOfAction, load, loadPage, setPage, allFiltered, upsert, clearFilters,
  };
});
