/**
 * The one error type of the API. Throw it anywhere in a route, service or middleware;
 * the error handler answers `{ error: { code, message, fields } }` with the status of `ERROR_CODES[code]`.
 * The message is shown to the user: say what was wrong and what to do.
 */
import { ERROR_CODES, type ErrorCode, type FieldErrors } from '../../shared/errors';

export class ApiError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  readonly fields?: FieldErrors;

  constructor(code: ErrorCode, message: string, fields?: FieldErrors) {
    super(message);
    this.name = 'ApiError';
    this.code = code;
    this.status = ERROR_CODES[code];
    if (fields) this.fields = fields;
  }
}

/** The standard 404 for anything the caller may not see, so another club's ids look like missing ones. */
export function notFound(what = 'record'): ApiError {
  return new ApiError('NOT_FOUND', `No such ${what} here. Check the link, or pick it again from its list.`);
}

/** Parses a route id (`:clubId`, `:athleteId`...) or answers 404: a malformed id names nothing. */
export function parseId(raw: unknown, what = 'record'): number {
  const text = typeof raw === 'string' ? raw : '';
  if (!/^[1-9]\d{0,15}$/.test(text)) throw notFound(what);
  const id = Number(text);
  if (!Number.isSafeInteger(id)) throw notFound(what);
  return id;
}
