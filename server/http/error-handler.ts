/**
 * The 404 for unknown API routes and the one error handler. Answers only `{ error: { code, message, fields } }`;
 * unknown failures are logged with their stack and request id and answered with a generic message.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { UniqueConstraintError } from 'sequelize';
import type { ErrorCode } from '../../shared/errors';
import { log } from '../logger';
import { ApiError } from './errors';

export const apiNotFound: RequestHandler = (req) => {
  throw new ApiError('NOT_FOUND', `There is no API endpoint ${req.method} ${req.originalUrl.split('?')[0]}. Check the address and method.`);
};

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
  if (type === 'encoding.unsupported' || type === 'charset.unsupported') {
    return new ApiError('UNSUPPORTED_MEDIA', 'Send the request body as UTF-8 JSON.');
  }
  if (err.name === 'MulterError') {
    const code = (err as Error & { code?: string }).code;
    if (code === 'LIMIT_FILE_SIZE') return new ApiError('PAYLOAD_TOO_LARGE', 'The file is larger than this server accepts. Trim the clip or upload fewer frames.');
    return new ApiError('BAD_REQUEST', `The upload could not be read (${err.message}). Send the file in the form field the page uses.`);
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
  if (known) {
    if (known.status >= 500) log.error(`${req.method} ${req.originalUrl} -> ${known.code}`, { requestId: req.requestId });
    const body: { code: ErrorCode; message: string; fields?: Record<string, string> } = { code: known.code, message: known.message };
    if (known.fields) body.fields = known.fields;
    res.status(known.status).json({ error: body });
    return;
  }
  const stack = err instanceof Error ? err.stack : String(err);
  log.error(`${req.method} ${req.originalUrl} failed`, { requestId: req.requestId, stack });
  res.status(500).json({
    error: {
      code: 'INTERNAL',
      message: `Something went wrong on our side (reference ${req.requestId}). Try again in a moment; if it keeps happening, give this reference to your administrator.`,
    },
  });
};
