/**
 * Error codes of the API, defined once for server and client.
 * Every error response is `{ error: { code, message, fields? } }` with one of these codes.
 * Add new codes here (UPPER_SNAKE) rather than inventing strings at the call site.
 */
export const ERROR_CODES = {
  VALIDATION_FAILED: 400,
  MALFORMED_JSON: 400,
  BAD_REQUEST: 400,
  UNAUTHENTICATED: 401,
  INVALID_CREDENTIALS: 401,
  CSRF_INVALID: 403,
  FORBIDDEN: 403,
  NOT_FOUND: 404,
  EMAIL_TAKEN: 409,
  CONFLICT: 409,
  PAYLOAD_TOO_LARGE: 413,
  UNSUPPORTED_MEDIA: 415,
  UNPROCESSABLE: 422,
  RATE_LIMITED: 429,
  // Clips, tracks and calibration.
  CSV_INVALID: 400,
  CALIBRATION_REQUIRED: 409,
  MEDIA_UNREADABLE: 422,
  UPLOAD_EXPIRED: 410,
  UPLOAD_BUSY: 423,
  // Members, invitations, password reset and e-mail.
  INVITATION_INVALID: 404,
  INVITATION_EXPIRED: 410,
  INVITATION_REVOKED: 410,
  INVITATION_USED: 410,
  INVITATION_PENDING: 409,
  INVITATION_EMAIL_MISMATCH: 403,
  ALREADY_MEMBER: 409,
  RESET_LINK_INVALID: 404,
  RESET_LINK_EXPIRED: 410,
  RESET_LINK_USED: 410,
  MAIL_UNAVAILABLE: 503,
  // Seats, subscription and billing.
  SEAT_LIMIT_REACHED: 409,
  SEATS_IN_USE: 409,
  SUBSCRIPTION_INACTIVE: 402,
  WEBHOOK_SIGNATURE_INVALID: 400,
  PAYMENT_PROVIDER_UNAVAILABLE: 502,
  INTERNAL: 500,
  SERVICE_UNAVAILABLE: 503,
} as const;

export type ErrorCode = keyof typeof ERROR_CODES;

/** Field-level messages, keyed by the dotted path of the field in the request body. */
export type FieldErrors = Record<string, string>;

export interface ApiErrorBody {
  error: { code: ErrorCode; message: string; fields?: FieldErrors };
}

/**
 * Codes of a failed job (`JobFailure(message, code)` on the server): why a background job stopped, for
 * the log and the failure handlers. The message stored on the job is the sentence the coach reads.
 */
export const JOB_FAILURE_CODES = [
  'JOB_FAILED',
  'CLIP_GONE',
  'CLIP_SOURCE_MISSING',
  'FLIGHT_GONE',
  'CALIBRATION_REQUIRED',
  'UNKNOWN_BALL',
  'BAD_OPTION',
] as const;

export type JobFailureCode = (typeof JOB_FAILURE_CODES)[number];
