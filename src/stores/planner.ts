import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import {
  bestAngle, isPhysicsError, planFlight, sensitivities, speedForCarry,
  type CarryGrid, type FitResult, type FlightSetup, type FlightSummary, type Sensitivities,
} from '@shared/physics';
import { fetchFlight, listFits, listFlights, type Fit, type Flight } from '@/api/flights';
import { fitResultOf } from '@/components/report/fit-result';
import { loadErrorText } from '@/composables/use-loader';
import {
  blankSetup, CARRY_MAP_ANGLES, carryMapSpeedAxis, DEFAULT_BLANK, hasCurrentFit, inputsFromSetup, setupFromInputs,
  type BlankStart, type InputKey, type PlannerInputs,
} from '@/components/planner/planner-model';
import { createCarryMapClient } from '@/components/planner/carry-map-client';
import { formatQuantity, type UnitSystem } from '@/utils/units';
import { useClubStore } from './club';
import { useUnitsStore } from './units';

/** Points of the path drawn for each flight on the trajectory chart. */
const PATH_POINTS = 90;
/** The carry map is asked for this long after the last change of what it depends on (ms); a Web Worker computes it. */
const GRID_DEBOUNCE_MS = 180;

/** A physics refusal as a sentence for the screen; anything else is a fault of the page. */
function physicsMessage(error: unknown): string {
  if (isPhysicsError(error)) return error.message;
  if (error instanceof Error) return error.message;
  return 'This launch cannot be flown: change the settings.';
}

/** A flight's current fit (`latestFit`), or its newest fit when that one is not listed, with the engine's result. */
function currentFitOf(flight: Flight, fits: readonly Fit[]): { fit: Fit; result: FitResult } | null {
  const fit = fits.find((f) => f.id === flight.latestFit?.id) ?? fits[0];
  const result = fitResultOf(fit);
  return fit && result ? { fit, result } : null;
}

type Outcome<T> = { ok: true; value: T } | { ok: false; message: string };

function attempt<T>(fn: () => T): Outcome<T> {
  try {
    return { ok: true, value: fn() };
  } catch (error) {
    return { ok: false, message: physicsMessage(error) };
  }
}

/**
 * The Planner: the flight it starts from (a fitted flight or a blank setup), the sliders' settings, and every
 * figure derived from them. Flights are computed in the browser with the same engine as the server's fits.
 */
export const usePlannerStore = defineStore('planner', () => {
  const club = useClubStore();

  const unitsStore = useUnitsStore();
  const units = computed<UnitSystem>(() => unitsStore.system);
  const flights = shallowRef<Flight[]>([]);
  const flightsLoading = ref(false);
  const flightsError = ref<string | null>(null);

  /** The flight in use (null: a blank setup). */
  const flight = shallowRef<Flight | null>(null);
  const fit = shallowRef<Fit | null>(null);
  const fitResult = shallowRef<FitResult | null>(null);
  const flightLoading = ref(false);
  const flightError = ref<string | null>(null);

  const blank = ref<BlankStart>({ ...DEFAULT_BLANK, launch: { ...DEFAULT_BLANK.launch } });
  /** The original: the fit's setup, or the blank start's. */
  const base = shallowRef<FlightSetup>(blankSetup(DEFAULT_BLANK));
  const start = shallowRef<PlannerInputs>(inputsFromSetup(base.value));
  const inputs = ref<PlannerInputs>({ ...start.value });

  let generation = 0;

  async function ensureUnits(): Promise<void> {
    await unitsStore.ensure();
  }

  async function loadFlights(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    flightsLoading.value = true;
    flightsError.value = null;
    try {
      const answer = await listFlights(clubId);
      flights.value = answer.data.filter(hasCurrentFit).sort((a, b) => b.createdAt.localeCompare(a.createdAt) || b.id - a.id);
    } catch (error) {
      flightsError.value = loadErrorText(error);
    } finally {
      flightsLoading.value = false;
    }
  }

  function startFrom(setup: FlightSetup): void {
    base.value = setup;
    start.value = inputsFromSetup(setup);
    inputs.value = { ...start.value };
  }

  /** Starts from a flight's current fit. */
  async function openFlight(flightId: number): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    const mine = ++generation;
    flightLoading.value = true;
    flightError.value = null;
    try {
      const found = flights.value.find((f) => f.id === flightId) ?? (await fetchFlight(clubId, flightId));
      if (!hasCurrentFit(found)) {
        throw new Error(`Flight ${flightId} has no current fit yet: fit it on the Trace screen, or pick another flight.`);
      }
      const current = currentFitOf(found, await listFits(clubId, found.id));
      if (mine !== generation) return;
      if (!current) throw new Error(`Flight ${flightId} has no fit yet: fit it on the Trace screen, or pick another flight.`);
      flight.value = found;
      fit.value = current.fit;
      fitResult.value = current.result;
      startFrom(current.result.setup);
    } catch (error) {
      if (mine !== generation) return;
      flight.value = null;
      fit.value = null;
      fitResult.value = null;
      flightError.value = error instanceof Error && !('code' in error) ? error.message : loadErrorText(error);
    } finally {
      if (mine === generation) flightLoading.value = false;
    }
  }

  /** Starts from a catalogue ball and a typed launch. */
  function openBlank(next: BlankStart = blank.value): Outcome<FlightSetup> {
    ++generation;
    const made = attempt(() => blankSetup(next));
    if (!made.ok) return made;
    blank.value = { ...next, launch: { ...next.launch } };
    flight.value = null;
    fit.value = null;
    fitResult.value = null;
    flightError.value = null;
    flightLoading.value = false;
    startFrom(made.value);
    return made;
  }

  function setInput(key: InputKey, si: number): void {
    if (!Number.isFinite(si) || inputs.value[key] === si) return;
    inputs.value = { ...inputs.value, [key]: si };
  }

  function reset(): void {
    inputs.value = { ...start.value };
  }

  const setup = computed<FlightSetup>(() => setupFromInputs(base.value, start.value, inputs.value));

  const original = computed<Outcome<FlightSummary>>(() => attempt(() => planFlight(base.value, PATH_POINTS)));
  const whatIf = computed<Outcome<FlightSummary>>(() => attempt(() => planFlight(setup.value, PATH_POINTS)));
  const best = computed<Outcome<{ angleDeg: number; carry: number }>>(() => attempt(() => bestAngle(setup.value)));
  const sens = computed<Outcome<Sensitivities>>(() => attempt(() => sensitivities(setup.value)));

  /** Target carry (m) typed by the coach, and the speeds that reach it at the current and the best angle. */
  const targetCarry = ref<number | null>(null);
  const target = computed(() => {
    const goal = targetCarry.value;
    if (goal === null) return null;
    const speedAt = (angleDeg: number): Outcome<{ speed: number; flight: FlightSummary }> => {
      try {
        return { ok: true, value: speedForCarry(setup.value, goal, { angleDeg }) };
      } catch (error) {
        if (isPhysicsError(error) && error.code === 'TARGET_OUT_OF_REACH') {
          const u = units.value;
          return { ok: false, message: `${formatQuantity(goal, 'length', u)} is out of reach at ${angleDeg.toFixed(1)}°, even at ${formatQuantity(150, 'speed', u, { digits: 0 })}.` };
        }
        return { ok: false, message: physicsMessage(error) };
      }
    };
    const atCurrent = speedAt(setup.value.launch.angleDeg);
    const bestNow = best.value;
    const atBest = bestNow.ok ? speedAt(bestNow.value.angleDeg) : bestNow;
    return { goal, atCurrent, atBest };
  });

  // The carry map: fitted flights of the same athlete as points, the grid recomputed off the input events.
  const mapFlights = computed<Flight[]>(() => {
    const current = flight.value;
    if (!current) return [];
    return flights.value.filter((f) => f.athleteId === current.athleteId && f.latestFit?.launchSpeedMps != null && f.latestFit.launchAngleDeg != null);
  });
  const grid = shallowRef<CarryGrid | null>(null);
  const gridError = ref<string | null>(null);
  const gridComputing = ref(false);
  /** The grid depends on everything but the launch speed and angle (they only move the marker). */
  const gridKey = computed(() => {
    const s = setup.value;
    const speeds = [base.value.launch.speed, s.launch.speed, ...mapFlights.value.map((f) => f.latestFit?.launchSpeedMps ?? NaN)];
    const axis = carryMapSpeedAxis(speeds);
    return JSON.stringify({ h: s.launch.height, w: s.windSpeed, air: s.air, ball: s.ball, aero: s.aero, g: s.gravity, axis });
  });
  let gridTimer: ReturnType<typeof setTimeout> | undefined;

  const carryMap = createCarryMapClient();

  /** Asks the worker for the grid of the current setup; an answer overtaken by a newer setting is dropped. */
  async function computeGrid(): Promise<void> {
    const s = setup.value;
    const speeds = [base.value.launch.speed, s.launch.speed, ...mapFlights.value.map((f) => f.latestFit?.launchSpeedMps ?? NaN)];
    const axis = carryMapSpeedAxis(speeds);
    const made = await carryMap.compute(s, { ...axis, steps: 61 }, { ...CARRY_MAP_ANGLES });
    if (made === null) return;
    gridComputing.value = false;
    if (made.ok) {
      grid.value = made.grid;
      gridError.value = null;
    } else {
      gridError.value = made.message;
    }
  }

  watch(gridKey, () => {
    clearTimeout(gridTimer);
    gridComputing.value = true;
    gridTimer = setTimeout(() => void computeGrid(), GRID_DEBOUNCE_MS);
  }, { immediate: true });

  // Another club in view: nothing of the previous club may stay.
  watch(
    () => club.clubId,
    () => {
      flights.value = [];
      flight.value = null;
      fit.value = null;
      fitResult.value = null;
      openBlank({ ...DEFAULT_BLANK, launch: { ...DEFAULT_BLANK.launch } });
    },
  );

  return {
    units, flights, flightsLoading, flightsError, flight, fit, fitResult, flightLoading, flightError, blank, base, start, inputs,
    setup, original, whatIf, best, sens, targetCarry, target, mapFlights, grid, gridError, gridComputing,
    ensureUnits, loadFlights, openFlight, openBlank, setInput, reset,
  };
});
