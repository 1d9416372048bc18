/**
 * CSRF protection with the synchronizer-token pattern (csrf-sync): the token lives in the session, the client
 * sends it in the `X-CSRF-Token` header on every POST/PUT/PATCH/DELETE. `GET /api/v1/auth/csrf` hands it out.
 */
import type { Request, RequestHandler } from 'express';
import { csrfSync } from 'csrf-sync';
import { ApiError } from './errors';

const { generateToken, isRequestValid } = csrfSync({
  getTokenFromRequest: (req) => {
    const header = req.headers['x-csrf-token'];
    return Array.isArray(header) ? header[0] : header;
  },
});

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The session's CSRF token, created when missing. */
export function csrfToken(req: Request): string {
  return generateToken(req);
}

export const csrfProtection: RequestHandler = (req, _res, next) => {
  if (SAFE_METHODS.has(req.method)) {
    next();
    return;
  }
  if (!isRequestValid(req)) {
    throw new ApiError(
      'CSRF_INVALID',
      'This request is missing its security token or the token has expired. Reload the page and try again.',
    );
  }
  next();
};
