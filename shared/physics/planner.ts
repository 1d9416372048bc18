/**
 * Planner math: what-if flights, a carry grid over launch speed × angle, the best angle, carry
 * sensitivities and the launch speed for a target carry. Every flight is integrated to the ground
 * with {@link simulateFlight}'s engine at {@link PLANNER_RTOL}; `npm run bench -- physics` prints
 * the largest carry discrepancy of a grid against a 1e-12 reference.
 */
import { airFromConditions, type Air, type Conditions } from './air';
import { resolveBall, type BallProps } from './balls';
import { STANDARD_GRAVITY } from './constants';
import { PhysicsError } from './errors';
import {
  flyToGround, initialState, motionCoefficients, simulateFlight, summaryOf,
  type FlightAero, type FlightSummary, type Launch, type MotionCoefficients, MAX_FLIGHT_TIME_S,
} from './flight';
import { flyKernel } from './kernel';

/**
 * Integration tolerance of the planner (relative, and absolute in m and m/s). Measured carry error
 * below 1e-5 m on the grid of the benchmark: a thousand times below what a tape can show.
 */
export const PLANNER_RTOL = 1e-8;

/** Everything that makes a flight: the launch, the ball, the air, what the air does, wind, gravity. `FitResult.setup` is one. */
export interface FlightSetup {
  launch: Launch;
  ball?: BallProps | string | null;
  air: Air;
  aero: FlightAero;
  /** Wind along the flight (m/s), positive = tailwind. */
  windSpeed?: number;
  /** m/s²; default 9.80665. */
  gravity?: number;
}

/** Changes to try; absent fields keep the setup's values. */
export interface WhatIfChange {
  speed?: number;
  angleDeg?: number;
  height?: number;
  windSpeed?: number;
  /** New weather: the air is recomputed from it with {@link airFromConditions}. */
  conditions?: Conditions;
}

interface Resolved {
  c: MotionCoefficients;
  kappa: number;
  ball: BallProps | undefined;
}

function resolve(setup: FlightSetup): Resolved {
  const ball = setup.ball === undefined || setup.ball === null ? undefined : resolveBall(setup.ball);
  const { c, kappa } = motionCoefficients(setup.aero, ball, setup.air, setup.windSpeed ?? 0, setup.gravity ?? STANDARD_GRAVITY);
  return { c, kappa, ball };
}

/** The setup with the changes applied. */
export function applyChange(setup: FlightSetup, change: WhatIfChange): FlightSetup {
  return {
    ...setup,
    launch: {
      speed: change.speed ?? setup.launch.speed,
      angleDeg: change.angleDeg ?? setup.launch.angleDeg,
      height: change.height ?? setup.launch.height,
    },
    windSpeed: change.windSpeed ?? setup.windSpeed,
    air: change.conditions ? airFromConditions(change.conditions) : setup.air,
  };
}

/**
 * Fly a setup: carry, apex, hang time, landing speed and angle.
 * @param setup launch (m/s, °, m), ball, air, aerodynamics, wind (m/s), gravity (m/s²).
 * @param pathPoints evenly timed points of the path for a chart (0: none).
 * Method: Dormand–Prince 5(4) to the landing event at {@link PLANNER_RTOL}.
 */
export function planFlight(setup: FlightSetup, pathPoints = 0): FlightSummary {
  return simulateFlight(setup.launch, setup.ball ?? undefined, setup.air, setup.aero, {
    windSpeed: setup.windSpeed ?? 0, gravity: setup.gravity ?? STANDARD_GRAVITY, rtol: PLANNER_RTOL, pathPoints,
  });
}

/**
 * A what-if: the setup flown as it is and with the changes.
 * @returns both flights and the differences changed − base of carry (m), apex height (m),
 *   hang time (s) and landing angle (°).
 */
export function whatIf(setup: FlightSetup, change: WhatIfChange): {
  base: FlightSummary; changed: FlightSummary;
  delta: { carry: number; apexHeight: number; flightTime: number; landingAngleDeg: number };
} {
  const base = planFlight(setup);
  const changed = planFlight(applyChange(setup, change));
  return {
    base, changed,
    delta: {
      carry: changed.carry - base.carry,
      apexHeight: changed.apexHeight - base.apexHeight,
      flightTime: changed.flightTime - base.flightTime,
      landingAngleDeg: changed.landingAngleDeg - base.landingAngleDeg,
    },
  };
}

export interface GridAxis {
  min: number;
  max: number;
  /** Number of values, ≥ 2 (61 by default). */
  steps?: number;
}

export interface CarryGrid {
  /** Launch speeds of the columns (m/s). */
  speeds: number[];
  /** Launch angles of the rows (°). */
  anglesDeg: number[];
  /** carry[row][col] for anglesDeg[row], speeds[col] (m). */
  carry: number[][];
  /** Hang time (s), same layout. */
  flightTime: number[][];
  /** Apex height (m), same layout. */
  apexHeight: number[][];
}

function axisValues(axis: GridAxis, name: string): number[] {
  const steps = axis.steps ?? 61;
  if (!Number.isInteger(steps) || steps < 2 || steps > 501 || !(axis.max > axis.min)) {
    throw new PhysicsError('BAD_OPTION', `The ${name} axis needs min < max and 2…501 steps.`);
  }
  return Array.from({ length: steps }, (_, i) => axis.min + ((axis.max - axis.min) * i) / (steps - 1));
}

/**
 * Carry, hang time and apex over a grid of launch speed × angle, the rest of the setup unchanged.
 * @param speed axis of launch speeds (m/s), within 0…150; @param angleDeg axis of angles (°), within −90…90.
 */
export function plannerGrid(setup: FlightSetup, speed: GridAxis, angleDeg: GridAxis): CarryGrid {
  const { c, kappa } = resolve(setup);
  const speeds = axisValues(speed, 'speed');
  const angles = axisValues(angleDeg, 'angle');
  if (speeds[0] < 0 || speeds[speeds.length - 1] > 150) throw new PhysicsError('BAD_OPTION', 'Grid speeds must lie within 0…150 m/s.');
  if (angles[0] < -90 || angles[angles.length - 1] > 90) throw new PhysicsError('BAD_OPTION', 'Grid angles must lie within −90…90°.');
  const h = setup.launch.height;
  const carry: number[][] = [], flightTime: number[][] = [], apexHeight: number[][] = [];
  for (const a of angles) {
    const th = (a * Math.PI) / 180;
    const cos = Math.cos(th), sin = Math.sin(th);
    const rc: number[] = [], rt: number[] = [], ra: number[] = [];
    // Each flight starts with the step its slower neighbour settled on (same tolerance, fewer steps).
    let hStart = 0;
    for (const v of speeds) {
      if (h === 0 && (v === 0 || a <= 0)) { rc.push(0); rt.push(0); ra.push(0); continue; }
      if (c.model === 'vacuum') {
        const raw = flyToGround(c, kappa, initialState(0, h, v * cos, v * sin), [], PLANNER_RTOL, true);
        rc.push(raw.landing.y[0]); rt.push(raw.landing.t); ra.push(raw.apex ? raw.apex.y[1] : h);
        continue;
      }
      const f = flyKernel(c, 0, h, v * cos, v * sin, PLANNER_RTOL, true, MAX_FLIGHT_TIME_S, hStart);
      hStart = f.hSettled;
      rc.push(f.landing.x); rt.push(f.landing.t); ra.push(f.apex ? f.apex.y : h);
    }
    carry.push(rc); flightTime.push(rt); apexHeight.push(ra);
  }
  return { speeds, anglesDeg: angles, carry, flightTime, apexHeight };
}

/** Carry and its derivatives with respect to launch vₓ, v_y and height, from the variational equations. */
function carryWithGradient(c: MotionCoefficients, kappa: number, h: number, vx: number, vy: number): {
  summary: FlightSummary; dCarry: [number, number, number]; dApex: [number, number, number]; dTime: [number, number, number];
} {
  const sens = ['vx0', 'vy0'] as const;
  const raw = flyToGround(c, kappa, initialState(0, h, vx, vy, sens), sens, PLANNER_RTOL, true);
  const L = raw.landing.y;
  const summary = summaryOf(c, raw, 0, h, vx, vy);
  // Event sensitivities (implicit function theorem): δt_L = −S_y/v_y, δcarry = S_x + vₓ δt_L.
  const col = (j: number, st: Float64Array, comp: number) => (j === 2 ? (comp === 1 ? 1 : 0) : st[4 + 4 * j + comp]);
  const dCarry: [number, number, number] = [0, 0, 0], dApex: [number, number, number] = [0, 0, 0], dTime: [number, number, number] = [0, 0, 0];
  for (let j = 0; j < 3; j++) {
    const dt = -col(j, L, 1) / L[3];
    dTime[j] = dt;
    dCarry[j] = col(j, L, 0) + L[2] * dt;
    dApex[j] = raw.apex ? col(j, raw.apex.y, 1) : (j === 2 ? 1 : 0);
  }
  return { summary, dCarry, dApex, dTime };
}

/**
 * The launch angle that carries farthest at the setup's speed and height (and air, wind).
 * Method: Brent's minimisation of −carry(θ) on 0…80° to 1e-4° (Brent, *Algorithms for
 * Minimization without Derivatives* (1973) ch. 5). Without air it reproduces
 * sin θ* = v/√(2v² + 2gh) (Lichtenberg & Wills, Am. J. Phys. 46 (1978) 546).
 * @returns θ* (°) and the carry there (m).
 */
export function bestAngle(setup: FlightSetup, options: { speed?: number; height?: number } = {}): { angleDeg: number; carry: number; evaluations: number } {
  const { c, kappa } = resolve(setup);
  const v = options.speed ?? setup.launch.speed;
  const h = options.height ?? setup.launch.height;
  if (!(v > 0) || !(h >= 0)) throw new PhysicsError('BAD_OPTION', 'The best angle needs a positive speed and a height ≥ 0.');
  let evaluations = 0;
  const negCarry = (deg: number): number => {
    evaluations++;
    const th = (deg * Math.PI) / 180;
    if (h === 0 && deg <= 0) return 0;
    return -flyToGround(c, kappa, initialState(0, h, v * Math.cos(th), v * Math.sin(th)), [], PLANNER_RTOL, false).landing.y[0];
  };
  const { x, fx } = brentMinimize(negCarry, h > 0 ? -10 : 0.5, 80, 1e-4);
  return { angleDeg: x, carry: -fx, evaluations };
}

/** Brent's method for a minimum on [a, b] (golden section with parabolic steps), to absolute tolerance tol in x. */
function brentMinimize(f: (x: number) => number, a: number, b: number, tol: number): { x: number; fx: number } {
  const gold = 0.3819660112501051;
  let x = a + gold * (b - a), w = x, v = x;
  let fx = f(x), fw = fx, fv = fx;
  let d = 0, e = 0;
  for (let it = 0; it < 200; it++) {
    const m = 0.5 * (a + b);
    const tol1 = tol / 3 + 1e-10 * Math.abs(x), tol2 = 2 * tol1;
    if (Math.abs(x - m) <= tol2 - 0.5 * (b - a)) break;
    let useGolden = true;
    if (Math.abs(e) > tol1) {
      const r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p; else q = -q;
      const eOld = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * eOld) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = x < m ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) { e = (x < m ? b : a) - x; d = gold * e; }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d > 0 ? tol1 : -tol1);
    const fu = f(u);
    if (fu <= fx) {
      if (u < x) b = x; else a = x;
      v = w; fv = fw; w = x; fw = fx; x = u; fx = fu;
    } else {
      if (u < x) a = u; else b = u;
      if (fu <= fw || w === x) { v = w; fv = fw; w = u; fw = fu; } else if (fu <= fv || v === x || v === w) { v = u; fv = fu; }
    }
  }
  return { x, fx };
}

export interface Sensitivities {
  /** ∂carry/∂v₀ (m per m/s). */
  carryPerSpeed: number;
  /** ∂carry/∂θ (m per degree). */
  carryPerDegree: number;
  /** ∂carry/∂h (m per m of release height). */
  carryPerHeight: number;
  /** ∂carry/∂w (m per m/s of tailwind). */
  carryPerWind: number;
  apexPerSpeed: number;
  apexPerDegree: number;
  /** ∂(hang time)/∂v₀ (s per m/s). */
  flightTimePerSpeed: number;
  flightTimePerDegree: number;
  flight: FlightSummary;
}

/**
 * Sensitivities of carry, apex and hang time to the launch, at the setup.
 * Method: variational equations integrated with the flight and the implicit function theorem at
 * the landing and apex events (exact derivatives of the model, not differences); wind by a
 * central difference of ±0.01 m/s.
 */
export function sensitivities(setup: FlightSetup): Sensitivities {
  const { c, kappa } = resolve(setup);
  const { speed: v, angleDeg, height: h } = setup.launch;
  if (!(v > 0)) throw new PhysicsError('BAD_OPTION', 'Sensitivities need a positive launch speed.');
  const th = (angleDeg * Math.PI) / 180;
  const cos = Math.cos(th), sin = Math.sin(th);
  const { summary, dCarry, dApex, dTime } = carryWithGradient(c, kappa, h, v * cos, v * sin);
  const perSpeed = (d: number[]) => d[0] * cos + d[1] * sin;
  const perDegree = (d: number[]) => v * (-d[0] * sin + d[1] * cos) * (Math.PI / 180);
  const dw = 0.01;
  const carryAt = (wind: number) => flyToGround({ ...c, wind }, kappa, initialState(0, h, v * cos, v * sin), [], PLANNER_RTOL, false).landing.y[0];
  return {
    carryPerSpeed: perSpeed(dCarry),
    carryPerDegree: perDegree(dCarry),
    carryPerHeight: dCarry[2],
    carryPerWind: c.model === 'vacuum' ? 0 : (carryAt(c.wind + dw) - carryAt(c.wind - dw)) / (2 * dw),
    apexPerSpeed: perSpeed(dApex),
    apexPerDegree: perDegree(dApex),
    flightTimePerSpeed: perSpeed(dTime),
    flightTimePerDegree: perDegree(dTime),
    flight: summary,
  };
}

/**
 * The launch speed that carries a target distance at the setup's angle (or a given one).
 * Method: safeguarded Newton iteration on carry(v) − target with the exact derivative from the
 * variational equations, inside a bracket that only shrinks (carry grows with speed at a fixed
 * angle above the ground).
 * @param targetCarry m, > 0. @returns the speed (m/s), the flight, and the iterations used.
 * @throws PhysicsError `TARGET_OUT_OF_REACH` when even 150 m/s falls short.
 */
export function speedForCarry(setup: FlightSetup, targetCarry: number, options: { angleDeg?: number } = {}): { speed: number; flight: FlightSummary; iterations: number } {
  if (!(targetCarry > 0) || !Number.isFinite(targetCarry)) throw new PhysicsError('BAD_OPTION', 'The target carry must be a positive distance in metres.');
  const { c, kappa } = resolve(setup);
  const angleDeg = options.angleDeg ?? setup.launch.angleDeg;
  const h = setup.launch.height;
  if (h === 0 && angleDeg <= 0) throw new PhysicsError('BAD_LAUNCH', 'From the ground the launch angle must be above 0°.');
  const th = (angleDeg * Math.PI) / 180;
  const cos = Math.cos(th), sin = Math.sin(th);
  const evalAt = (v: number) => {
    const r = carryWithGradient(c, kappa, h, v * cos, v * sin);
    return { f: r.summary.carry - targetCarry, df: r.dCarry[0] * cos + r.dCarry[1] * sin, summary: r.summary };
  };
  let lo = 1e-3, hi = 150;
  const top = evalAt(hi);
  if (top.f < 0) {
    throw new PhysicsError('TARGET_OUT_OF_REACH', `A carry of ${targetCarry} m is out of reach at ${angleDeg}°: even 150 m/s carries ${top.summary.carry.toFixed(1)} m in this air.`);
  }
  // Start from the no-air speed for the target (a good guess for heavy balls, an underestimate otherwise).
  const g = c.g;
  let v = Math.min(149, Math.max(1, Math.sqrt((g * targetCarry) / Math.max(Math.sin(2 * Math.max(th, 0.05)), 0.1))));
  for (let it = 1; it <= 60; it++) {
    const r = evalAt(v);
    if (r.f < 0) lo = v; else hi = v;
    if (Math.abs(r.f) <= 1e-9 * Math.max(1, targetCarry)) return { speed: v, flight: r.summary, iterations: it };
    let next = r.df > 0 ? v - r.f / r.df : NaN;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (hi - lo < 1e-12 * hi) return { speed: next, flight: evalAt(next).summary, iterations: it };
    v = next;
  }
  const r = evalAt(v);
  return { speed: v, flight: r.summary, iterations: 60 };
}
