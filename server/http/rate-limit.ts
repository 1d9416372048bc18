/**
 * Rate limits of the sign-in, sign-up and password-reset endpoints (express-rate-limit, in-memory per process).
 */
import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { ApiError } from './errors';

export interface LimitOptions {
  windowMs: number;
  max: number;
}

function minutes(ms: number): string {
  const m = Math.max(1, Math.round(ms / 60000));
  return `${m} minute${m === 1 ? '' : 's'}`;
}

function ipOf(req: Request): string {
  return ipKeyGenerator(req.ip ?? req.socket.remoteAddress ?? 'unknown');
}

/** The caller's IP address with the e-mail of the body. */
function ipAndEmail(req: Request): string {
  const email = typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase() : '';
  return `${ipOf(req)}|${email}`;
}

/** A limit of failed sign-ins (successful ones do not count) under `key`, refused with `what`'s message. */
function failedSigninLimiter({ windowMs, max }: LimitOptions, key: (req: Request) => string, what: string): RequestHandler {
  return rateLimit({
    windowMs,
    limit: max,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: key,
    handler: (_req, _res, next) => {
      next(new ApiError('RATE_LIMITED', `${what} Wait ${minutes(windowMs)} and try again, or ask a club admin for help.`));
    },
  });
}

/**
 * Failed sign-ins per IP address and e-mail: successful ones do not count, so a coach who types the
 * password right is never locked out by earlier typos beyond the window.
 */
export function signinLimiter(options: LimitOptions): RequestHandler {
  return failedSigninLimiter(options, ipAndEmail, 'Too many sign-in attempts for this e-mail.');
}

/**
 * Failed sign-ins per IP address across every e-mail, beside the per-e-mail limit: trying a few passwords
 * on many accounts from one address (password spraying) is capped as trying many on one account is.
 * Successful sign-ins do not count, so a club signing in from behind one address is not locked out.
 */
export function signinAddressLimiter(options: LimitOptions): RequestHandler {
  return failedSigninLimiter(options, ipOf, 'Too many failed sign-ins from this address.');
}

/** Sign-ups per IP address. */
export function signupLimiter({ windowMs, max }: LimitOptions): RequestHandler {
  return rateLimit({
    windowMs,
    limit: max,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => ipOf(req),
    handler: (_req, _res, next) => {
      next(new ApiError('RATE_LIMITED', `Too many new accounts from this address. Wait ${minutes(windowMs)} and try again.`));
    },
  });
}

/** Password-reset requests per IP address and e-mail, so nobody can flood an inbox from the sign-in page. */
export function resetLimiter({ windowMs, max }: LimitOptions): RequestHandler {
  return rateLimit({
    windowMs,
    limit: max,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: ipAndEmail,
    handler: (_req, _res, next) => {
      next(new ApiError('RATE_LIMITED', `Too many password-reset requests for this e-mail. Wait ${minutes(windowMs)}, then check the inbox before asking again.`));
    },
  });
}
