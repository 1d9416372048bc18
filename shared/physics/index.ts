/**
 * Arcwright's flight engine: the public API for the server (fit jobs), the browser (planner) and
 * the `fit` command. SI units throughout (angles in degrees where the name says `Deg`).
 * See shared/physics/README.md for the models and the methods.
 */
export { ENGINE_VERSION } from './version';
export { STANDARD_GRAVITY, ISA, CELSIUS_ZERO_K } from './constants';
export {
  PHYSICS_ERROR_CODES, FLIGHT_WARNING_CODES, PhysicsError, isPhysicsError,
  type PhysicsErrorCode, type FlightWarningCode, type FlightWarning,
} from './errors';
export {
  airFromConditions, airFromDensity, standardAir, standardAtmosphere, humidAirDensity, saturationVapourPressure,
  sutherlandViscosity, reynoldsNumber, dragRegime, geopotentialAltitude, SMOOTH_SPHERE_CRISIS_RE, AIR_TEMPERATURE_RANGE_K,
  type Air, type Conditions, type DragRegime,
} from './air';
export {
  BALLS, BALL_IDS, ballProps, resolveBall, recogniseBall, crossSectionArea,
  type BallSpec, type BallProps, type NominalRange, type SourceNote,
} from './balls';
export {
  simulateFlight, vacuumFlight, dragFactor, FLIGHT_MODELS, SIMULATE_DEFAULTS,
  type FlightModel, type Launch, type FlightAero, type SimulateOptions, type FlightSummary,
} from './flight';
export { integrate, INTEGRATOR_DEFAULTS, type OdeRhs, type OdeEvent, type IntegrateOptions, type IntegrateResult } from './integrator';
export { levenbergMarquardt, LM_DEFAULTS, ROBUST_LOSSES, type RobustLoss, type LmProblem, type LmOptions, type LmResult } from './lm';
export {
  fitFlight, fittedPath, FIT_DEFAULTS, NOISE_FLOOR_M, EXTRAPOLATED_CARRY_SHARE,
  type FitOptions, type FitResult, type ModelChoice, type ScaleCheck,
} from './fit';
export {
  planFlight, whatIf, applyChange, plannerGrid, bestAngle, sensitivities, speedForCarry, PLANNER_RTOL,
  type FlightSetup, type WhatIfChange, type GridAxis, type CarryGrid, type Sensitivities,
} from './planner';
export { checkTrack, MIN_POINTS, type Track } from './track';
export { RELEASE_MAX_BACK_S, RELEASE_MAX_HEIGHT_M, RELEASE_WARN_FRAMES, type ReleaseSpec } from './release';
export { generateTrack, mulberry32, normalGenerator, type SyntheticTrackSpec } from './synthetic';
