// Relative import (not the @shared alias): the client unit tests run this module under plain Vitest.
import type { ErrorCode, FieldErrors } from '../../shared/errors';
import { ERROR_CODES } from '../../shared/errors';

/**
 * An API answer that was not a success, in the one shape the client handles.
 * Thrown by `src/api/http.ts`; views read `fields` for inline messages and `message` for the rest.
 */
export class ApiRequestError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  readonly fields: FieldErrors;

  constructor(code: ErrorCode, message: string, status: number, fields: FieldErrors = {}) {
    super(message);
    this.name = 'ApiRequestError';
    this.code = code;
    this.status = status;
    this.fields = fields;
  }
}

/** Status 0 means the request never reached the server (offline, server down, aborted). */
export const NETWORK_STATUS = 0;

function isErrorCode(value: unknown): value is ErrorCode {
  return typeof value === 'string' && Object.prototype.hasOwnProperty.call(ERROR_CODES, value);
}

function fallbackCode(status: number): ErrorCode {
  if (status === 400) return 'BAD_REQUEST';
  if (status === 401) return 'UNAUTHENTICATED';
  if (status === 403) return 'FORBIDDEN';
  if (status === 404) return 'NOT_FOUND';
  if (status === 409) return 'CONFLICT';
  if (status === 413) return 'PAYLOAD_TOO_LARGE';
  if (status === 415) return 'UNSUPPORTED_MEDIA';
  if (status === 422) return 'UNPROCESSABLE';
  if (status === 429) return 'RATE_LIMITED';
  if (status === 503 || status === 502 || status === 504) return 'SERVICE_UNAVAILABLE';
  return 'INTERNAL';
}

const FALLBACK_MESSAGES: Partial<Record<ErrorCode, string>> = {
  UNAUTHENTICATED: 'Your session has ended. Sign in again to continue.',
  FORBIDDEN: 'Your role in this club does not allow this.',
  NOT_FOUND: 'This item does not exist or is not part of the club in view.',
  CONFLICT: 'This clashes with something that changed meanwhile. Reload and try again.',
  PAYLOAD_TOO_LARGE: 'The file is larger than the server accepts.',
  RATE_LIMITED: 'Too many attempts. Wait a minute and try again.',
  SERVICE_UNAVAILABLE: 'Arcwright is not reachable right now. Try again in a moment.',
  INTERNAL: 'Something went wrong on the server. Try again; if it keeps happening, tell your club admin.',
};

function isFieldErrors(value: unknown): value is FieldErrors {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return false;
  return Object.values(value).every((v) => typeof v === 'string');
}

/**
 * Turns an HTTP status and the parsed body of a failed answer into an ApiRequestError.
 * Bodies that are not the API's `{ error: { code, message, fields } }` (a proxy's HTML page, an empty body)
 * still give a code and a message a coach can act on.
 */
export function toApiRequestError(status: number, body: unknown): ApiRequestError {
  const error = typeof body === 'object' && body !== null ? (body as { error?: unknown }).error : undefined;
  if (typeof error === 'object' && error !== null) {
    const { code, message, fields } = error as { code?: unknown; message?: unknown; fields?: unknown };
    const resolved = isErrorCode(code) ? code : fallbackCode(status);
    const text = typeof message === 'string' && message.trim() !== '' ? message : (FALLBACK_MESSAGES[resolved] ?? 'The request failed.');
    return new ApiRequestError(resolved, text, status, isFieldErrors(fields) ? fields : {});
  }
  const code = fallbackCode(status);
  return new ApiRequestError(code, FALLBACK_MESSAGES[code] ?? `The request failed (HTTP ${status}).`, status);
}

/** The error for a request that got no answer at all. */
export function networkError(): ApiRequestError {
  return new ApiRequestError(
    'SERVICE_UNAVAILABLE',
    'Arcwright could not be reached. Check your connection and try again.',
    NETWORK_STATUS,
  );
}

export interface ErrorNotice {
  severity: 'error' | 'warn';
  summary: string;
  detail: string;
}

/** How an error is announced in a toast: cautions (amber) for what the user can fix, red for failures. */
export function describeError(error: unknown): ErrorNotice {
  if (error instanceof ApiRequestError) {
    const userFixable = error.status >= 400 && error.status < 500 && error.code !== 'CSRF_INVALID';
    const summaries: Partial<Record<ErrorCode, string>> = {
      VALIDATION_FAILED: 'Check the form',
      UNAUTHENTICATED: 'Signed out',
      INVALID_CREDENTIALS: 'Sign-in failed',
      FORBIDDEN: 'Not allowed',
      NOT_FOUND: 'Not found',
      CONFLICT: 'Not saved',
      EMAIL_TAKEN: 'E-mail in use',
      RATE_LIMITED: 'Slow down',
      SERVICE_UNAVAILABLE: 'Not reachable',
    };
    return {
      severity: userFixable ? 'warn' : 'error',
      summary: summaries[error.code] ?? (userFixable ? 'Request refused' : 'Something went wrong'),
      detail: error.message,
    };
  }
  return {
    severity: 'error',
    summary: 'Something went wrong',
    detail: 'An unexpected problem stopped this action. Reload the page and try again.',
  };
}
