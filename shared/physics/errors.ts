/**
 * Coded errors and warnings of the flight engine.
 *
 * Errors stop a computation (`PhysicsError`, thrown); warnings travel with a result
 * (`FlightWarning`, in `warnings`). Every message says what was wrong and what to do, in words a
 * coach or analyst can act on. The server maps a `PhysicsError` to its API error
 * `UNPROCESSABLE` (422) and passes `code` and `message` through.
 */

/** Codes of the errors the engine throws. */
export const PHYSICS_ERROR_CODES = [
  'TOO_FEW_POINTS',
  'LENGTH_MISMATCH',
  'UNSORTED_TIMES',
  'DUPLICATE_TIMES',
  'NON_FINITE',
  'NEVER_RISES',
  'SCALE_SUSPECT',
  'MISSING_BALL',
  'UNKNOWN_BALL',
  'BAD_BALL',
  'BAD_AIR',
  'BAD_LAUNCH',
  'BAD_OPTION',
  'NO_LANDING',
  'TARGET_OUT_OF_REACH',
  'INTEGRATION_FAILED',
  'FIT_FAILED',
  'CSV_NO_HEADER',
  'CSV_BAD_ROW',
] as const;

export type PhysicsErrorCode = (typeof PHYSICS_ERROR_CODES)[number];

/** Codes of the warnings a result may carry. */
export const FLIGHT_WARNING_CODES = [
  'NEGATIVE_CD',
  'CD_PRIOR_USED',
  'CD_OUTSIDE_RANGE',
  'SCALE_DISAGREES',
  'SCALE_UNCHECKED',
  'EXTRAPOLATED',
  'OUTLIERS_DOWNWEIGHTED',
  'NOT_CONVERGED',
  'POORLY_DETERMINED',
  'NEAR_DRAG_CRISIS',
  'NEVER_RISES',
  'LARGE_LIFT',
  'AIR_ASSUMED',
  'LINEAR_DRAG_UNUSUAL',
  'RELEASE_EXTRAPOLATED',
] as const;

export type FlightWarningCode = (typeof FLIGHT_WARNING_CODES)[number];

export interface FlightWarning {
  code: FlightWarningCode;
  message: string;
}

/** An error of the flight engine: a stable `code`, a message for people, optional details for programs. */
export class PhysicsError extends Error {
  readonly code: PhysicsErrorCode;
  readonly details: Record<string, unknown> | undefined;

  constructor(code: PhysicsErrorCode, message: string, details?: Record<string, unknown>) {
    super(message);
    this.name = 'PhysicsError';
    this.code = code;
    this.details = details;
  }
}

/** True when `e` is a `PhysicsError` (also across bundles, where `instanceof` may fail). */
export function isPhysicsError(e: unknown): e is PhysicsError {
  return e instanceof PhysicsError || (typeof e === 'object' && e !== null && (e as { name?: unknown }).name === 'PhysicsError'
    && typeof (e as { code?: unknown }).code === 'string');
}
