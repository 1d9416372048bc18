/**
 * The Planner's view-model: the slider settings (SI inside, the club's units on screen), the what-if setup
 * built from them, the change against the fitted original, the no-air parabola, equal-scale chart extents,
 * and the carry map's series (heatmap cells and the best-angle ridge). Pure TypeScript: no Vue, no DOM.
 */
import {
  airFromConditions, ballProps, BALLS, CELSIUS_ZERO_K, standardAtmosphere, STANDARD_GRAVITY,
  type Air, type CarryGrid, type FlightSetup, type Launch, type Sensitivities,
} from '@shared/physics';
import type { Flight } from '@shared/schemas/flight';
import { displayUnit, fromSi, toSi, type Quantity, type UnitSystem } from '@/utils/units';

/** Statuses whose latest fit is current (a `traced` flight's old fit is stale: its points changed since). */
const CURRENT_FIT_STATUSES: readonly Flight['status'][] = ['fitted', 'reviewed', 'needs_attention'];

/** Whether the Planner can start from a flight: it has a fit that matches its points. */
export function hasCurrentFit(flight: Pick<Flight, 'latestFit' | 'status'>): boolean {
  return flight.latestFit !== null && CURRENT_FIT_STATUSES.includes(flight.status);
}


/** Everything the sliders set, in SI (temperature in kelvin, altitude in m, humidity in %). */
export interface PlannerInputs {
  speed: number;
  angleDeg: number;
  height: number;
  /** Wind along the flight (m/s), positive = tailwind. */
  windSpeed: number;
  temperatureK: number;
  altitudeM: number;
  humidityPct: number;
}

export type InputKey = keyof PlannerInputs;

/** One slider: what it measures (null = shown as is, e.g. degrees, %), its range and step in SI. */
export interface SliderSpec {
  key: InputKey;
  label: string;
  quantity: Quantity | null;
  /** Symbol when `quantity` is null. */
  symbol?: string;
  min: number;
  max: number;
  /** Step of the slider in display units (arrow keys move by it). */
  step: number;
  help?: string;
}

/**
 * The ranges the sliders cover; number inputs may go further, up to the engine's limits in {@link INPUT_LIMITS}.
 * Speeds and heights widen with the starting launch (see {@link sliderSpecs}).
 */
export function sliderSpecs(start: PlannerInputs): SliderSpec[] {
  const speedMax = Math.min(150, Math.max(60, Math.ceil(start.speed * 1.6)));
  const heightMax = Math.min(20, Math.max(4, Math.ceil(start.height * 1.5)));
  return [
    { key: 'speed', label: 'Launch speed', quantity: 'speed', min: 1, max: speedMax, step: 0.1 },
    { key: 'angleDeg', label: 'Launch angle', quantity: null, symbol: '°', min: -10, max: 80, step: 0.5 },
    { key: 'height', label: 'Launch height', quantity: 'length', min: 0, max: heightMax, step: 0.05 },
    { key: 'windSpeed', label: 'Wind along the flight', quantity: 'speed', min: -15, max: 15, step: 0.1, help: 'Positive is a tailwind, negative a headwind.' },
    { key: 'temperatureK', label: 'Air temperature', quantity: 'temperature', min: -10 + CELSIUS_ZERO_K, max: 45 + CELSIUS_ZERO_K, step: 0.5 },
    { key: 'altitudeM', label: 'Altitude of the field', quantity: 'altitude', min: 0, max: 3000, step: 10 },
    { key: 'humidityPct', label: 'Relative humidity', quantity: null, symbol: '%', min: 0, max: 100, step: 1 },
  ];
}

/** What the engine accepts (SI): typed values outside are refused with {@link checkInput}'s message. */
export const INPUT_LIMITS: Record<InputKey, { min: number; max: number }> = {
  speed: { min: 0.1, max: 150 },
  angleDeg: { min: -89, max: 89 },
  height: { min: 0, max: 100 },
  windSpeed: { min: -40, max: 40 },
  temperatureK: { min: -40 + CELSIUS_ZERO_K, max: 60 + CELSIUS_ZERO_K },
  altitudeM: { min: -500, max: 10000 },
  humidityPct: { min: 0, max: 100 },
};

/** SI value → the number a slider or input shows. */
export function toShown(si: number, spec: Pick<SliderSpec, 'quantity'>, units: UnitSystem): number {
  return spec.quantity === null ? si : fromSi(si, spec.quantity, units);
}

/** The number a slider or input shows → SI. */
export function toSiValue(shown: number, spec: Pick<SliderSpec, 'quantity'>, units: UnitSystem): number {
  return spec.quantity === null ? shown : toSi(shown, spec.quantity, units);
}

/** The unit symbol a slider shows. */
export function specSymbol(spec: Pick<SliderSpec, 'quantity' | 'symbol'>, units: UnitSystem): string {
  return spec.quantity === null ? (spec.symbol ?? '') : displayUnit(spec.quantity, units).symbol;
}

/**
 * A slider's range and step in display units. The ends are rounded outwards to the step so that the
 * slider can reach every value of the SI range.
 */
export function shownRange(spec: SliderSpec, units: UnitSystem): { min: number; max: number; step: number } {
  const a = toShown(spec.min, spec, units);
  const b = toShown(spec.max, spec, units);
  const lo = Math.min(a, b), hi = Math.max(a, b);
  const step = spec.step;
  return { min: roundTo(Math.floor(lo / step) * step, step), max: roundTo(Math.ceil(hi / step) * step, step), step };
}

/** Rounds to the decimals of a step (0.05 → 2), folding floating-point dust such as 12.300000000000001. */
export function roundTo(value: number, step: number): number {
  const decimals = Math.max(0, Math.ceil(-Math.log10(step) - 1e-9));
  return Number(value.toFixed(decimals)) + 0;
}

/** Why a typed SI value cannot be used, or null when it can. */
export function checkInput(key: InputKey, si: number, spec: Pick<SliderSpec, 'label' | 'quantity' | 'symbol'>, units: UnitSystem): string | null {
  const limits = INPUT_LIMITS[key];
  if (!Number.isFinite(si)) return `${spec.label} needs a number.`;
  if (si < limits.min || si > limits.max) {
    const lo = toShown(limits.min, spec, units), hi = toShown(limits.max, spec, units);
    const sym = specSymbol(spec, units);
    return `${spec.label} must lie between ${Number(lo.toFixed(1))} and ${Number(hi.toFixed(1))} ${sym}.`;
  }
  return null;
}

/**
 * Altitude (m) of the standard atmosphere at which the pressure is `pressurePa`: the inverse of
 * {@link standardAtmosphere} (ISO 2533) by bisection, so that flying the inputs back gives the same pressure.
 */
export function altitudeForPressure(pressurePa: number): number {
  let lo = -500, hi = 10000;
  if (pressurePa >= standardAtmosphere(lo).pressurePa) return lo;
  if (pressurePa <= standardAtmosphere(hi).pressurePa) return hi;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    if (standardAtmosphere(mid).pressurePa > pressurePa) lo = mid; else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** The slider settings of a setup (a fit's `setup`, or a blank one). */
export function inputsFromSetup(setup: FlightSetup): PlannerInputs {
  const air = setup.air;
  return {
    speed: setup.launch.speed,
    angleDeg: setup.launch.angleDeg,
    height: setup.launch.height,
    windSpeed: setup.windSpeed ?? 0,
    temperatureK: air.temperatureK ?? 15 + CELSIUS_ZERO_K,
    altitudeM: air.pressurePa === undefined ? 0 : altitudeForPressure(air.pressurePa),
    humidityPct: air.relativeHumidityPct ?? 0,
  };
}

/** Whether the weather sliders moved away from the starting ones (then the air is recomputed from them). */
export function conditionsChanged(start: PlannerInputs, now: PlannerInputs): boolean {
  return now.temperatureK !== start.temperatureK || now.altitudeM !== start.altitudeM || now.humidityPct !== start.humidityPct;
}

/** The air of the what-if: the original air until a weather slider moves, then CIPM-2007 air from the sliders. */
export function whatIfAir(base: FlightSetup, start: PlannerInputs, now: PlannerInputs): Air {
  if (!conditionsChanged(start, now)) return base.air;
  return airFromConditions({
    airTemperatureK: now.temperatureK,
    altitudeM: now.altitudeM,
    relativeHumidityPct: now.humidityPct,
  });
}

/** The what-if setup: the original ball and aerodynamics with the sliders' launch, wind and air. */
export function setupFromInputs(base: FlightSetup, start: PlannerInputs, now: PlannerInputs): FlightSetup {
  return {
    ...base,
    launch: { speed: now.speed, angleDeg: now.angleDeg, height: now.height },
    windSpeed: now.windSpeed,
    air: whatIfAir(base, start, now),
  };
}

/** A blank start: a catalogue ball at its nominal mass, size and drag coefficient, in the given weather. */
export interface BlankStart {
  ballId: string;
  launch: Launch;
  windSpeed: number;
  temperatureK: number;
  altitudeM: number;
  humidityPct: number;
}

export const DEFAULT_BLANK: BlankStart = {
  ballId: 'football-5',
  launch: { speed: 25, angleDeg: 35, height: 0 },
  windSpeed: 0,
  temperatureK: 288.15,
  altitudeM: 0,
  humidityPct: 50,
};

/** The setup of a blank start (quadratic drag at the catalogue's nominal C_d; no lift). */
export function blankSetup(start: BlankStart): FlightSetup {
  const spec = BALLS[start.ballId];
  if (!spec) throw new Error(`There is no ball "${start.ballId}" in the catalogue: pick one from the list.`);
  return {
    launch: { ...start.launch },
    ball: ballProps(start.ballId),
    air: airFromConditions({ airTemperatureK: start.temperatureK, altitudeM: start.altitudeM, relativeHumidityPct: start.humidityPct }),
    aero: { model: 'drag', cd: spec.cd.nominal },
    windSpeed: start.windSpeed,
    gravity: STANDARD_GRAVITY,
  };
}

/** A change shown next to a big number: a sign always (− is the minus sign), "±0" when it rounds to nothing. */
export function formatDelta(deltaSi: number, quantity: Quantity | null, units: UnitSystem, options: { digits?: number; symbol?: string } = {}): string {
  if (!Number.isFinite(deltaSi)) return '—';
  const shown = quantity === null ? deltaSi : fromSi(deltaSi, quantity, units) - fromSi(0, quantity, units);
  const digits = options.digits ?? (quantity === null ? 1 : displayUnit(quantity, units).digits);
  const symbol = options.symbol ?? (quantity === null ? '' : displayUnit(quantity, units).symbol);
  const rounded = Number(shown.toFixed(digits)) + 0;
  const magnitude = Math.abs(rounded).toFixed(digits);
  const sign = rounded > 0 ? '+' : rounded < 0 ? '−' : '±';
  return `${sign}${magnitude}${symbol ? (symbol === '°' ? symbol : ` ${symbol}`) : ''}`;
}

/** Whether a change is up, down or nothing at the shown precision (for the colour of the delta). */
export function deltaDirection(deltaSi: number, quantity: Quantity | null, units: UnitSystem, digits?: number): 'up' | 'down' | 'none' {
  const shown = quantity === null ? deltaSi : fromSi(deltaSi, quantity, units) - fromSi(0, quantity, units);
  const d = digits ?? (quantity === null ? 1 : displayUnit(quantity, units).digits);
  const rounded = Number(shown.toFixed(d));
  return rounded > 0 ? 'up' : rounded < 0 ? 'down' : 'none';
}

/**
 * The no-air flight of a launch as chart points, to the ground: x = vₓt, y = h + v_y t − g t²/2
 * (Taylor, Classical Mechanics (2005) §1.6).
 */
export function vacuumPath(launch: Launch, gravity: number = STANDARD_GRAVITY, points = 81): { x: number[]; y: number[] } {
  const th = (launch.angleDeg * Math.PI) / 180;
  const vx = launch.speed * Math.cos(th), vy = launch.speed * Math.sin(th);
  const tEnd = (vy + Math.sqrt(vy * vy + 2 * gravity * launch.height)) / gravity;
  const x: number[] = [], y: number[] = [];
  for (let i = 0; i < points; i++) {
    const t = (tEnd * i) / (points - 1);
    x.push(vx * t);
    y.push(Math.max(0, launch.height + vy * t - 0.5 * gravity * t * t));
  }
  return { x, y };
}

/**
 * Axis extents with equal metres per pixel on both axes, so the shape of a flight is true: the larger of
 * the two needs sets the scale and the other axis gets the room left.
 * @param xNeed, yNeed the largest x and y to show (display units, > 0); @param width, height plot area (px).
 */
export function equalScaleExtent(xNeed: number, yNeed: number, width: number, height: number): { xMax: number; yMax: number } {
  const w = Math.max(1, width), h = Math.max(1, height);
  const perPx = Math.max(xNeed / w, yNeed / h, 1e-6);
  return { xMax: perPx * w, yMax: perPx * h };
}

/** Heatmap cells `[column, row, carry]` of a grid (carry in display units), with the colour range. */
export function gridToHeatmap(grid: CarryGrid, units: UnitSystem): { cells: [number, number, number][]; min: number; max: number } {
  const cells: [number, number, number][] = [];
  let min = Infinity, max = -Infinity;
  grid.carry.forEach((row, r) => {
    row.forEach((carry, c) => {
      const shown = fromSi(carry, 'length', units);
      cells.push([c, r, shown]);
      if (shown < min) min = shown;
      if (shown > max) max = shown;
    });
  });
  if (cells.length === 0) { min = 0; max = 0; }
  return { cells, min, max };
}

/**
 * The best-angle ridge: for each speed column, the angle of the longest carry, refined between grid rows
 * by the vertex of the parabola through the best row and its neighbours (three-point interpolation).
 * Columns whose carries are all zero (a standstill) have no ridge point.
 */
export function bestAngleRidge(grid: CarryGrid): { speed: number; angleDeg: number; carry: number }[] {
  const ridge: { speed: number; angleDeg: number; carry: number }[] = [];
  const rows = grid.anglesDeg.length;
  grid.speeds.forEach((speed, c) => {
    let best = 0;
    for (let r = 1; r < rows; r++) if (grid.carry[r][c] > grid.carry[best][c]) best = r;
    const top = grid.carry[best][c];
    if (!(top > 0)) return;
    let angleDeg = grid.anglesDeg[best];
    let carry = top;
    if (best > 0 && best < rows - 1) {
      const ym = grid.carry[best - 1][c], yp = grid.carry[best + 1][c];
      const denom = ym - 2 * top + yp;
      if (denom < 0) {
        const offset = (0.5 * (ym - yp)) / denom;
        const step = grid.anglesDeg[best + 1] - grid.anglesDeg[best];
        angleDeg += offset * step;
        carry = top - 0.25 * (ym - yp) * offset;
      }
    }
    ridge.push({ speed, angleDeg, carry });
  });
  return ridge;
}

/** Speed axis of the carry map (m/s): around every speed it must show, with room either side, within 0.5…150. */
export function carryMapSpeedAxis(speeds: readonly number[]): { min: number; max: number } {
  const finite = speeds.filter((v) => Number.isFinite(v) && v > 0);
  const lo = finite.length ? Math.min(...finite) : 10;
  const hi = finite.length ? Math.max(...finite) : 30;
  const min = Math.max(0.5, Math.floor(lo * 0.6));
  const max = Math.min(150, Math.max(min + 5, Math.ceil(hi * 1.4)));
  return { min, max };
}

/** The carry map's angle axis (°): from level (or below, from a raised release) to steep. */
export const CARRY_MAP_ANGLES = { min: 0, max: 80, steps: 61 } as const;

/**
 * The sensitivities as rows of the panel, per one display unit of each setting (1 m/s or 1 mph, 1°, 1 m or
 * 1 ft, 1 m/s or 1 mph of tailwind), with a sign.
 */
export function sensitivityRows(sens: Sensitivities, units: UnitSystem): { key: string; label: string; value: string; perUnitSi: number }[] {
  const speedUnit = displayUnit('speed', units), lengthUnit = displayUnit('length', units);
  const oneSpeed = speedUnit.toSi(1), oneLength = lengthUnit.toSi(1);
  const carry = (key: string, label: string, perUnitSi: number) => ({ key, label, perUnitSi, value: formatDelta(perUnitSi, 'length', units, { digits: 2 }) });
  return [
    carry('speed', `Carry per 1 ${speedUnit.symbol} more launch speed`, sens.carryPerSpeed * oneSpeed),
    carry('angle', 'Carry per 1° more launch angle', sens.carryPerDegree),
    carry('height', `Carry per 1 ${lengthUnit.symbol} higher release`, sens.carryPerHeight * oneLength),
    carry('wind', `Carry per 1 ${speedUnit.symbol} more tailwind`, sens.carryPerWind * oneSpeed),
    carry('apex-speed', `Apex per 1 ${speedUnit.symbol} more launch speed`, sens.apexPerSpeed * oneSpeed),
    {
      key: 'hang-speed',
      label: `Hang time per 1 ${speedUnit.symbol} more launch speed`,
      perUnitSi: sens.flightTimePerSpeed * oneSpeed,
      value: formatDelta(sens.flightTimePerSpeed * oneSpeed, null, units, { digits: 3, symbol: 's' }),
    },
  ];
}
