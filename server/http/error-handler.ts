/**
 * The 404 for unknown API routes and the one error handler. Answers only `{ error: { code, message, fields } }`;
 * unknown failures are logged with their stack and request id and answered with a generic message.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { BaseError as SequelizeError, ConnectionError, UniqueConstraintError } from 'sequelize';
import type { ErrorCode } from '../../shared/errors';
import { isLockConflict } from '../db-errors';
import { log } from '../logger';
import { ApiError } from './errors';

export const apiNotFound: RequestHandler = (req) => {
  throw new ApiError('NOT_FOUND', `There is no API endpoint ${req.method} ${req.originalUrl.split('?')[0]}. Check the address and method.`);
};

/** Codes of zlib when a body does not match its Content-Encoding. */
const ZLIB_CODES = new Set(['Z_DATA_ERROR', 'Z_BUF_ERROR', 'ERR_BROTLI_DECOMPRESSION_FAILED', 'Z_NEED_DICT']);

/** Busboy's messages for multipart bodies it cannot parse (it gives them no code). */
const BUSBOY_MALFORMED = /^(Malformed part header|Malformed urlencoded form|Unexpected end of (form|file)|Multipart: Boundary not found)/;

/** Codes of the mariadb driver (and Node's sockets) when the connection, not the statement, failed. */
const CONNECTION_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ER_SOCKET_UNEXPECTED_CLOSE',
  'ER_CONNECTION_ALREADY_CLOSED',
  'ER_GET_CONNECTION_TIMEOUT',
  'ER_CONNECTION_TIMEOUT',
  'ER_CMD_CONNECTION_CLOSED',
  'ER_SERVER_SHUTDOWN',
  'ER_POOL_ALREADY_CLOSED',
]);

/** Seconds a client should wait before trying again after a 503 of a database outage. */
export const DATABASE_RETRY_AFTER_S = 5;

/** True when the error means the database cannot be reached (not that a statement was wrong). */
export function isDatabaseOutage(err: unknown): boolean {
  if (err instanceof ConnectionError) return true;
  if (!(err instanceof Error)) return false;
  const original = (err instanceof SequelizeError ? (err as SequelizeError & { original?: unknown }).original : err) as
    | { code?: unknown; fatal?: unknown; errno?: unknown }
    | undefined;
  if (!original) return false;
  if (typeof original.code === 'string' && CONNECTION_CODES.has(original.code)) return true;
  // The mariadb driver marks errors after which the connection is unusable as fatal.
  return original.fatal === true && err.name !== 'SequelizeUniqueConstraintError';
}

export function databaseUnavailable(): ApiError {
  return new ApiError('SERVICE_UNAVAILABLE', 'The database is not answering right now. Try again shortly; if it keeps happening, tell your administrator.');
}

interface BodyParserError extends Error {
  type?: string;
  status?: number;
  limit?: number;
}

/** Errors of libraries (body parser, multer, Sequelize) the user can act on, mapped to an ApiError. */
function knownError(err: unknown): ApiError | null {
  if (err instanceof ApiError) return err;
  if (!(err instanceof Error)) return null;
  const type = (err as BodyParserError).type;
  if (type === 'entity.parse.failed') {
    return new ApiError('MALFORMED_JSON', 'The request body is not valid JSON. Send a JSON object with the header Content-Type: application/json.');
  }
  if (type === 'entity.too.large') {
    return new ApiError('PAYLOAD_TOO_LARGE', 'The request body is too large. Send less data in one request.');
  }
  if (type === 'encoding.unsupported') {
    return new ApiError(
      'BAD_REQUEST',
      'The request body has a Content-Encoding this server does not read. Send it uncompressed, or compressed with gzip, deflate or br and the matching header.',
    );
  }
  if (type === 'charset.unsupported') {
    return new ApiError('UNSUPPORTED_MEDIA', 'Send the request body as UTF-8 JSON.');
  }
  // Express's router fails to decode a path parameter such as `%c0` (not UTF-8) with a URIError.
  if (err instanceof URIError) {
    return new ApiError('BAD_REQUEST', 'The address holds characters that cannot be decoded (a stray % sign?). Check the link and try again.');
  }
  if (ZLIB_CODES.has((err as Error & { code?: string }).code ?? '')) {
    return new ApiError('BAD_REQUEST', 'The request body could not be decompressed: it does not match its Content-Encoding header. Send it uncompressed, or with the right header.');
  }
  if (BUSBOY_MALFORMED.test(err.message)) {
    return new ApiError(
      'BAD_REQUEST',
      'A part of the upload could not be read (a malformed part header, for example a control character in a file name). Rename the file and upload it again.',
    );
  }
  if (isDatabaseOutage(err)) return databaseUnavailable();
  if (err.name === 'MulterError') {
    const code = (err as Error & { code?: string }).code;
    if (code === 'LIMIT_FILE_SIZE') return new ApiError('PAYLOAD_TOO_LARGE', 'The file is larger than this server accepts. Trim the clip or upload fewer frames.');
    return new ApiError('BAD_REQUEST', `The upload could not be read (${err.message}). Send the file in the form field the page uses.`);
  }
  if (isLockConflict(err)) {
    // Still losing after the transaction helper's retries: another request was saving the same records.
    return new ApiError('CONFLICT', 'Another change to the same records was being saved at the same moment. Try again in a moment.');
  }
  if (err instanceof UniqueConstraintError) {
    return new ApiError('CONFLICT', 'This would duplicate a record that already exists. Reload the page and try again.');
  }
  return null;
}

export const errorHandler: ErrorRequestHandler = (err, req, res, next) => {
  if (res.headersSent) {
    next(err);
    return;
  }
  const known = knownError(err);
  if (known?.code === 'SERVICE_UNAVAILABLE') res.setHeader('Retry-After', String(DATABASE_RETRY_AFTER_S));
  if (known) {
    // A 503 (database outage) is expected while it lasts: a warning per request, not an error with a stack.
    if (known.status === 503) log.warn(`${req.method} ${req.originalUrl} -> ${known.code}`, { requestId: req.requestId, error: err instanceof Error ? err.message : String(err) });
    else if (known.status >= 500) log.error(`${req.method} ${req.originalUrl} -> ${known.code}`, { requestId: req.requestId, error: err instanceof Error ? err.message : String(err) });
    const body: { code: ErrorCode; message: string; fields?: Record<string, string> } = { code: known.code, message: known.message };
    if (known.fields) body.fields = known.fields;
    res.status(known.status).json({ error: body });
    return;
  }
  const stack = err instanceof Error ? err.stack : String(err);
  // Sequelize's errors often carry an empty message of their own; the driver's says what went wrong.
  const cause = (err as { original?: { message?: unknown } } | null)?.original?.message;
  log.error(`${req.method} ${req.originalUrl} failed`, { requestId: req.requestId, stack, ...(typeof cause === 'string' && cause ? { cause } : {}) });
  res.status(500).json({
    error: {
      code: 'INTERNAL',
      message: `Something went wrong on our side (reference ${req.requestId}). Try again in a moment; if it keeps happening, give this reference to your administrator.`,
    },
  });
};
