/**
 * Equations of motion of a ball in the vertical plane of its flight, and flights integrated to
 * the ground with their apex and landing.
 *
 * State s = (x, y, vₓ, v_y): x along the flight, y up from the ground (m), ground-frame velocity
 * (m/s). A steady wind w along the flight (positive = tailwind) enters through the air-relative
 * velocity u = (vₓ − w, v_y), V = |u|. With κ = ρA/(2m):
 * - vacuum:    a = (0, −g)
 * - linear:    a = −β u − (0, g)                          (F = −b v, β = b/m; Taylor, Classical Mechanics (2005) §2.2–2.4)
 * - drag:      a = −κ C_d V u − (0, g)                     (F = ½ρC_dAV², against u; Taylor (2005) §2.4)
 * - drag-lift: a = −κ C_d V u + κ C_L V (−u_y, uₓ) − (0, g) (lift ½ρC_LAV² perpendicular to u, rotated
 *              +90° from it: up for a ball going forward, so backspin gives C_L > 0 and topspin C_L < 0;
 *              Nathan, Am. J. Phys. 76 (2008) 119)
 * Variational equations (the state's derivatives with respect to launch velocity, C_d, C_L, β or g)
 * ride along when asked for: S' = (∂a/∂s) S + ∂a/∂p (Hairer, Nørsett & Wanner I (1993) §I.14).
 */
import type { Air } from './air';
import { crossSectionArea, resolveBall, type BallProps } from './balls';
import { STANDARD_GRAVITY } from './constants';
import { PhysicsError } from './errors';
import { integrate, type OdeEvent, type OdeRhs } from './integrator';
import { flyKernel } from './kernel';
import { withDefaults } from './options';

export type FlightModel = 'vacuum' | 'linear' | 'drag' | 'drag-lift';
export const FLIGHT_MODELS: readonly FlightModel[] = ['vacuum', 'linear', 'drag', 'drag-lift'];

/** How the ball leaves the athlete. */
export interface Launch {
  /** Launch speed v₀ (m/s, ground frame), ≥ 0. */
  speed: number;
  /** Launch angle θ above the horizontal (degrees), −90…90. */
  angleDeg: number;
  /** Release height above the ground h (m), ≥ 0. */
  height: number;
}

/** What acts on the ball in flight besides gravity. */
export interface FlightAero {
  model: FlightModel;
  /** Drag coefficient C_d (quadratic models). */
  cd?: number;
  /** Lift coefficient C_L (drag-lift; backspin positive). */
  cl?: number;
  /** Linear drag rate β = b/m (1/s) (linear model). */
  dragRate?: number;
}

/** Options of {@link simulateFlight}; defaults in {@link SIMULATE_DEFAULTS}. */
export interface SimulateOptions {
  /** Wind along the flight (m/s), positive = tailwind. */
  windSpeed?: number;
  /** Gravity g (m/s²); default standard gravity 9.80665. */
  gravity?: number;
  /** Relative (and absolute, in m and m/s) tolerance of the integration. */
  rtol?: number;
  /** Number of evenly timed points of the path to return (0: none). */
  pathPoints?: number;
  /** Also return the apex (default true; the planner grid turns it off). */
  apex?: boolean;
}

export const SIMULATE_DEFAULTS = { windSpeed: 0, gravity: STANDARD_GRAVITY, rtol: 1e-9, pathPoints: 0, apex: true } as const;

/** A flight from release to the ground (y = 0). Times in s from the release, lengths in m, speeds in m/s. */
export interface FlightSummary {
  model: FlightModel;
  launch: Launch & { vx: number; vy: number };
  /** Highest point above the ground; the release height when the ball is launched downward. */
  apexHeight: number;
  apexTime: number;
  /** Horizontal distance from the release to the apex. */
  apexX: number;
  timeUp: number;
  timeDown: number;
  /** Time from release to the ground (hang time). */
  flightTime: number;
  /** Horizontal distance from the release point to where the ball reaches the ground. */
  carry: number;
  landingSpeed: number;
  /** Angle of descent below the horizontal at landing (degrees, positive downward). */
  landingAngleDeg: number;
  landingVx: number;
  landingVy: number;
  /** Horizontal speed at launch minus at landing (m/s). */
  horizontalSpeedLost: number;
  path?: { t: number[]; x: number[]; y: number[]; vx: number[]; vy: number[] };
  steps: number;
}

/** Coefficients of the equations of motion, as used inside the engine. */
export interface MotionCoefficients {
  model: FlightModel;
  /** κ C_d (1/m). */
  k: number;
  /** κ C_L (1/m). */
  kl: number;
  /** β (1/s). */
  beta: number;
  g: number;
  wind: number;
}

/** A parameter the variational equations can differentiate with respect to. */
export type SensitivityParam = 'vx0' | 'vy0' | 'cd' | 'cl' | 'beta' | 'g';

/** κ = ρA/(2m) (1/m): drag acceleration per C_d per (m/s)². */
export function dragFactor(ball: BallProps, air: Air): number {
  return (air.densityKgM3 * crossSectionArea(ball.diameterM)) / (2 * ball.massKg);
}

/**
 * Right-hand side of the equations of motion, optionally with variational equations for the
 * listed parameters (state index 4 + 4j … 4 + 4j + 3 holds ∂(x, y, vₓ, v_y)/∂p_j).
 * `kappa` converts ∂/∂(κC_d) into ∂/∂C_d.
 */
export function flightRhs(c: MotionCoefficients, kappa: number, sens: readonly SensitivityParam[] = []): OdeRhs {
  const { k, kl, beta, g, wind } = c;
  const nS = sens.length;
  // Forcing kinds as small integers so the inner loop does no string comparisons.
  const kinds = new Int8Array(nS);
  for (let j = 0; j < nS; j++) kinds[j] = ['vx0', 'vy0', 'cd', 'cl', 'beta', 'g'].indexOf(sens[j]);
  if (c.model === 'linear') {
    return (_t, s, d) => {
      const u = s[2] - wind, v = s[3];
      d[0] = s[2]; d[1] = s[3];
      d[2] = -beta * u;
      d[3] = -beta * v - g;
      for (let j = 0; j < nS; j++) {
        const b = 4 + 4 * j;
        const su = s[b + 2], sv = s[b + 3];
        d[b] = su; d[b + 1] = sv;
        let fx = 0, fy = 0;
        const kind = kinds[j];
        if (kind === 4) { fx = -u; fy = -v; } else if (kind === 5) fy = -1;
        d[b + 2] = -beta * su + fx;
        d[b + 3] = -beta * sv + fy;
      }
    };
  }
  return (_t, s, d) => {
    const u = s[2] - wind, v = s[3];
    const V = Math.sqrt(u * u + v * v);
    d[0] = s[2]; d[1] = s[3];
    d[2] = -k * V * u - kl * V * v;
    d[3] = -k * V * v + kl * V * u - g;
    if (nS === 0) return;
    // ∂a/∂(u, v); V > 0 except in a still hover, where the drag terms vanish anyway.
    let a11 = 0, a12 = 0, a21 = 0, a22 = 0;
    if (V > 0) {
      const uv = (u * v) / V, Vu = V + (u * u) / V, Vv = V + (v * v) / V;
      a11 = -k * Vu - kl * uv;
      a12 = -k * uv - kl * Vv;
      a21 = -k * uv + kl * Vu;
      a22 = -k * Vv + kl * uv;
    }
    for (let j = 0; j < nS; j++) {
      const b = 4 + 4 * j;
      const su = s[b + 2], sv = s[b + 3];
      d[b] = su; d[b + 1] = sv;
      let fx = 0, fy = 0;
      const kind = kinds[j];
      if (kind === 2) { fx = -kappa * V * u; fy = -kappa * V * v; } else if (kind === 3) { fx = -kappa * V * v; fy = kappa * V * u; } else if (kind === 5) fy = -1;
      d[b + 2] = a11 * su + a12 * sv + fx;
      d[b + 3] = a21 * su + a22 * sv + fy;
    }
  };
}

/** Initial state (with variational columns) for a launch velocity. */
export function initialState(x0: number, y0: number, vx0: number, vy0: number, sens: readonly SensitivityParam[] = []): Float64Array {
  const s = new Float64Array(4 + 4 * sens.length);
  s[0] = x0; s[1] = y0; s[2] = vx0; s[3] = vy0;
  for (let j = 0; j < sens.length; j++) {
    if (sens[j] === 'vx0') s[4 + 4 * j + 2] = 1;
    if (sens[j] === 'vy0') s[4 + 4 * j + 3] = 1;
  }
  return s;
}

/** Acceleration (aₓ, a_y) of a state under the coefficients (for event sensitivities). */
export function acceleration(c: MotionCoefficients, vx: number, vy: number): [number, number] {
  const u = vx - c.wind, v = vy;
  if (c.model === 'vacuum') return [0, -c.g];
  if (c.model === 'linear') return [-c.beta * u, -c.beta * v - c.g];
  const V = Math.sqrt(u * u + v * v);
  return [-c.k * V * u - c.kl * V * v, -c.k * V * v + c.kl * V * u - c.g];
}

/** The coefficients for a ball, air and aerodynamics. */
export function motionCoefficients(aero: FlightAero, ball: BallProps | undefined, air: Air | undefined, windSpeed: number, gravity: number): { c: MotionCoefficients; kappa: number } {
  const needsBall = aero.model === 'drag' || aero.model === 'drag-lift';
  let kappa = 0;
  if (needsBall) {
    if (!ball) throw new PhysicsError('MISSING_BALL', 'A drag model needs the ball: give a catalogue ball or its mass and diameter.');
    if (!air) throw new PhysicsError('BAD_AIR', 'A drag model needs the air: give the density or the weather.');
    kappa = dragFactor(resolveBall(ball), air);
  }
  const cd = aero.model === 'drag' || aero.model === 'drag-lift' ? aero.cd : 0;
  const cl = aero.model === 'drag-lift' ? aero.cl ?? 0 : 0;
  const beta = aero.model === 'linear' ? aero.dragRate : 0;
  if (needsBall && (cd === undefined || !Number.isFinite(cd))) throw new PhysicsError('BAD_OPTION', `The ${aero.model} model needs a finite drag coefficient cd.`);
  if (!Number.isFinite(cl)) throw new PhysicsError('BAD_OPTION', 'The lift coefficient cl must be a finite number.');
  if (aero.model === 'linear' && (beta === undefined || !Number.isFinite(beta))) throw new PhysicsError('BAD_OPTION', 'The linear model needs a finite drag rate (1/s).');
  if (!Number.isFinite(windSpeed) || Math.abs(windSpeed) > 60) throw new PhysicsError('BAD_OPTION', `Wind ${windSpeed} m/s is not a wind speed between −60 and 60 m/s.`);
  if (!Number.isFinite(gravity) || gravity <= 0 || gravity > 30) throw new PhysicsError('BAD_OPTION', `Gravity ${gravity} m/s² is not between 0 and 30 m/s².`);
  return {
    c: { model: aero.model, k: kappa * (cd ?? 0), kl: kappa * cl, beta: beta ?? 0, g: gravity, wind: windSpeed },
    kappa,
  };
}

function checkLaunch(launch: Launch): void {
  if (!Number.isFinite(launch.speed) || launch.speed < 0 || launch.speed > 150) {
    throw new PhysicsError('BAD_LAUNCH', `Launch speed ${launch.speed} m/s is not between 0 and 150 m/s.`);
  }
  if (!Number.isFinite(launch.angleDeg) || Math.abs(launch.angleDeg) > 90) {
    throw new PhysicsError('BAD_LAUNCH', `Launch angle ${launch.angleDeg}° is not between −90° and 90°.`);
  }
  if (!Number.isFinite(launch.height) || launch.height < 0 || launch.height > 100) {
    throw new PhysicsError('BAD_LAUNCH', `Release height ${launch.height} m is not between 0 and 100 m.`);
  }
  if (launch.height === 0 && launch.angleDeg <= 0) {
    throw new PhysicsError('BAD_LAUNCH', 'A ball released at ground level must be launched upward (angle above 0°).');
  }
}

const APEX_EVENT: OdeEvent = { name: 'apex', g: (_t, y) => y[3], direction: -1, terminal: false };
const LANDING_EVENT: OdeEvent = { name: 'landing', g: (_t, y) => y[1], direction: -1, terminal: true };
const APEX_AND_LANDING = [APEX_EVENT, LANDING_EVENT];
const LANDING_ONLY = [LANDING_EVENT];
/** No real throw or kick stays up this long; a flight that does has parameters far off. */
export const MAX_FLIGHT_TIME_S = 120;

/** Raw result of a flight from an initial state, with event states (including variational columns). */
export interface RawFlight {
  /** State at the apex; its velocity entries are 0 when the kernel flew the flight (only x and y are kept). */
  apex: { t: number; y: Float64Array } | null;
  landing: { t: number; y: Float64Array };
  steps: number;
}

/**
 * Integrate a flight from a state to the ground, with the apex (v_y = 0) and landing (y = 0) events.
 * Without sensitivities the scalar kernel ({@link flyKernel}) does the work: same method, no arrays.
 * @throws PhysicsError `NO_LANDING` when the ball does not come down within 120 s.
 */
export function flyToGround(c: MotionCoefficients, kappa: number, s0: Float64Array, sens: readonly SensitivityParam[], rtol: number, withApex: boolean): RawFlight {
  if (c.model === 'vacuum' && sens.length === 0) return vacuumRaw(c, s0, withApex);
  if (sens.length === 0) {
    const f = flyKernel(c, s0[0], s0[1], s0[2], s0[3], rtol, withApex, MAX_FLIGHT_TIME_S);
    return {
      apex: f.apex ? { t: f.apex.t, y: Float64Array.of(f.apex.x, f.apex.y, 0, 0) } : null,
      landing: { t: f.landing.t, y: Float64Array.of(f.landing.x, 0, f.landing.vx, f.landing.vy) },
      steps: f.steps,
    };
  }
  const res = integrate(flightRhs(c, kappa, sens), 0, s0, {
    tEnd: MAX_FLIGHT_TIME_S, rtol, atol: rtol, errorDim: 4,
    events: withApex ? APEX_AND_LANDING : LANDING_ONLY,
  });
  if (res.status !== 'event') {
    throw new PhysicsError('NO_LANDING', `The ball does not come down within ${MAX_FLIGHT_TIME_S} s with these parameters: check the drag and lift values.`);
  }
  const apexHit = res.events.find((e) => e.name === 'apex') ?? null;
  return { apex: apexHit ? { t: apexHit.t, y: apexHit.y } : null, landing: { t: res.t, y: res.y }, steps: res.acceptedSteps };
}

function vacuumRaw(c: MotionCoefficients, s0: Float64Array, withApex: boolean): RawFlight {
  const [x0, y0, vx, vy] = [s0[0], s0[1], s0[2], s0[3]];
  const g = c.g;
  const tL = (vy + Math.sqrt(vy * vy + 2 * g * y0)) / g;
  const landing = Float64Array.of(x0 + vx * tL, 0, vx, vy - g * tL);
  let apex: RawFlight['apex'] = null;
  if (withApex && vy > 0) {
    const tA = vy / g;
    apex = { t: tA, y: Float64Array.of(x0 + vx * tA, y0 + (vy * vy) / (2 * g), vx, 0) };
  }
  return { apex, landing: { t: tL, y: landing }, steps: 0 };
}

/**
 * Fly a ball from its release to the ground.
 * @param launch speed (m/s), angle (°) and release height (m); see {@link Launch}.
 * @param ball mass (kg) and diameter (m), or a catalogue id; needed by the quadratic models.
 * @param air density (kg/m³) and viscosity; needed by the quadratic models.
 * @param aero model and its coefficients (C_d, C_L, or β in 1/s).
 * @param options wind (m/s, + tailwind), gravity (m/s²), tolerance, path points.
 * @returns apex, hang time, carry, landing speed and angle; see {@link FlightSummary}.
 * Method: Dormand–Prince 5(4) with event location ({@link integrate}); closed form without air.
 */
export function simulateFlight(launch: Launch, ball: BallProps | string | undefined, air: Air | undefined, aero: FlightAero, options: SimulateOptions = {}): FlightSummary {
  checkLaunch(launch);
  const o = withDefaults(SIMULATE_DEFAULTS, options) as { windSpeed: number; gravity: number; rtol: number; pathPoints: number; apex: boolean };
  const resolved = ball === undefined ? undefined : resolveBall(ball);
  const { c, kappa } = motionCoefficients(aero, resolved, air, o.windSpeed, o.gravity);
  const th = (launch.angleDeg * Math.PI) / 180;
  const vx = launch.speed * Math.cos(th), vy = launch.speed * Math.sin(th);
  return summarize(c, kappa, 0, launch.height, vx, vy, o.rtol, o.pathPoints, o.apex);
}

/** Summary of the flight from (x₀, y₀, vₓ, v_y) under given coefficients. */
export function summarize(c: MotionCoefficients, kappa: number, x0: number, y0: number, vx: number, vy: number, rtol: number, pathPoints = 0, withApex = true): FlightSummary {
  const raw = flyToGround(c, kappa, initialState(x0, y0, vx, vy), [], rtol, withApex);
  const summary = summaryOf(c, raw, x0, y0, vx, vy);
  if (pathPoints >= 2) summary.path = samplePath(c, kappa, x0, y0, vx, vy, raw.landing.t, pathPoints, rtol);
  return summary;
}

/** Summary of an integrated flight (the raw events) launched from (x₀, y₀, vₓ, v_y). */
export function summaryOf(c: MotionCoefficients, raw: RawFlight, x0: number, y0: number, vx: number, vy: number): FlightSummary {
  const L = raw.landing.y;
  const apex = raw.apex;
  const apexTime = apex ? apex.t : 0;
  const speed = Math.hypot(vx, vy);
  const summary: FlightSummary = {
    model: c.model,
    launch: { speed, angleDeg: (Math.atan2(vy, vx) * 180) / Math.PI, height: y0, vx, vy },
    apexHeight: apex ? apex.y[1] : y0,
    apexTime,
    apexX: apex ? apex.y[0] - x0 : 0,
    timeUp: apexTime,
    timeDown: raw.landing.t - apexTime,
    flightTime: raw.landing.t,
    carry: L[0] - x0,
    landingSpeed: Math.hypot(L[2], L[3]),
    landingAngleDeg: (Math.atan2(-L[3], L[2]) * 180) / Math.PI,
    landingVx: L[2],
    landingVy: L[3],
    horizontalSpeedLost: vx - L[2],
    steps: raw.steps,
  };
  return summary;
}

/** Evenly timed points of a flight from 0 to `tEnd` (s). */
export function samplePath(c: MotionCoefficients, kappa: number, x0: number, y0: number, vx: number, vy: number, tEnd: number, points: number, rtol: number = SIMULATE_DEFAULTS.rtol): NonNullable<FlightSummary['path']> {
  const times = new Float64Array(points);
  for (let i = 0; i < points; i++) times[i] = (tEnd * i) / (points - 1);
  // Note: tEnd·(n−1)/(n−1) can round above tEnd, and the integrator writes no output past its end.
  times[points - 1] = tEnd;
  const out = new Float64Array(points * 4);
  if (c.model === 'vacuum') {
    for (let i = 0; i < points; i++) {
      const t = times[i];
      out.set([x0 + vx * t, y0 + vy * t - 0.5 * c.g * t * t, vx, vy - c.g * t], 4 * i);
    }
  } else {
    integrate(flightRhs(c, kappa), 0, [x0, y0, vx, vy], { tEnd: Math.max(tEnd, 1e-9), rtol, atol: rtol, outputTimes: times, output: out });
  }
  const path = { t: Array.from(times), x: [] as number[], y: [] as number[], vx: [] as number[], vy: [] as number[] };
  for (let i = 0; i < points; i++) {
    path.x.push(out[4 * i]); path.y.push(out[4 * i + 1]); path.vx.push(out[4 * i + 2]); path.vy.push(out[4 * i + 3]);
  }
  return path;
}

/**
 * The flight without air for the same launch, in closed form.
 * Range R = (v cosθ / g)(v sinθ + √(v² sin²θ + 2gh)) (Taylor, Classical Mechanics (2005) ch. 1–2).
 */
export function vacuumFlight(launch: Launch, gravity: number = STANDARD_GRAVITY): FlightSummary {
  checkLaunch(launch);
  const th = (launch.angleDeg * Math.PI) / 180;
  const vx = launch.speed * Math.cos(th), vy = launch.speed * Math.sin(th);
  return summarize({ model: 'vacuum', k: 0, kl: 0, beta: 0, g: gravity, wind: 0 }, 0, 0, launch.height, vx, vy, SIMULATE_DEFAULTS.rtol);
}
