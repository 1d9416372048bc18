import { randomUUID } from 'node:crypto';
import type { RequestHandler } from 'express';

/** An incoming id is kept only when it is short and made of safe characters (it lands in logs and a header). */
const ACCEPTED_ID = /^[A-Za-z0-9._:-]{1,128}$/;

/** The id a request is known by: the caller's `X-Request-Id` when it is acceptable, otherwise a new UUID. */
export function requestIdOf(header: string | string[] | undefined): string {
  const value = Array.isArray(header) ? header[0] : header;
  return value !== undefined && ACCEPTED_ID.test(value) ? value : randomUUID();
}

/** Gives every request an id for the logs and the `X-Request-Id` response header. */
export const requestId: RequestHandler = (req, res, next) => {
  req.requestId = requestIdOf(req.headers['x-request-id']);
  res.setHeader('X-Request-Id', req.requestId);
  next();
};
