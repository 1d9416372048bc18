import { defineStore } from 'pinia';
import { ref, shallowRef, watch } from 'vue';
import { fetchAthlete, type AthleteProfileSummary } from '@/api/athletes';
import { fetchFlight, listFits, listFlightActions, setFlightReviewed, type Fit, type FlightDetail } from '@/api/flights';
import { fetchSession, type Session } from '@/api/sessions';
import { useLatestLoad } from '@/composables/use-latest-load';
import { useClubStore } from './club';
import { useReportStore } from './report';

/**
 * The Flight report: one flight with its points, every fit of it, and what titles it (session, athlete, action
 * label). Another athlete's flight, another club's or a deleted one answers 404 NOT_FOUND.
 */
export const useFlightReportStore = defineStore('flight-report', () => {
  const club = useClubStore();
  const flightList = useReportStore();
  const flight = shallowRef<FlightDetail | null>(null);
  const fits = shallowRef<Fit[]>([]);
  const session = shallowRef<Session | null>(null);
  const athlete = shallowRef<AthleteProfileSummary | null>(null);
  const actionLabel = ref<string | null>(null);
  const { loading, error, notFound, run, reset } = useLatestLoad({ notFound: true });
  const reviewing = ref(false);

  function clear(): void {
    flight.value = null;
    fits.value = [];
    session.value = null;
    athlete.value = null;
    actionLabel.value = null;
  }

  /** Loads a flight's report; `alongside` is what the page must have before it shows the flight (the club's units). */
  async function load(flightId: number, alongside?: Promise<unknown>): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    if (flight.value?.id !== flightId) clear();
    await run(async (isCurrent) => {
      const [detail, history] = await Promise.all([fetchFlight(clubId, flightId), listFits(clubId, flightId), alongside]);
      if (!isCurrent()) return;
      flight.value = detail;
      fits.value = history;
      // Titles and cautions: a failed read leaves the report usable without them.
      const [s, a, actions] = await Promise.all([
        fetchSession(clubId, detail.sessionId).catch(() => null),
        fetchAthlete(clubId, detail.athleteId).catch(() => null),
        listFlightActions(clubId).catch(() => []),
      ]);
      if (!isCurrent()) return;
      session.value = s;
      athlete.value = a;
      actionLabel.value = actions.find((x) => x.key === detail.action)?.label ?? null;
    });
  }

  /** Marks the flight reviewed; a refusal has been shown in a toast and the report stays as it was. */
  async function markReviewed(): Promise<void> {
    const clubId = club.clubId;
    const current = flight.value;
    if (clubId === null || !current) return;
    reviewing.value = true;
    try {
      const changed = await setFlightReviewed(clubId, current.id, true);
      if (flight.value?.id === current.id) flight.value = { ...flight.value, ...changed };
      flightList.upsert(changed);
    } catch {
      // The request wrapper has shown the reason in a toast.
    } finally {
      reviewing.value = false;
    }
  }

  // Another club in view: nothing of the previous club may stay.
  watch(
    () => club.clubId,
    () => {
      reset();
      clear();
    },
  );

  return { flight, fits, session, athlete, actionLabel, loading, error, notFound, reviewing, load, markReviewed };
});
