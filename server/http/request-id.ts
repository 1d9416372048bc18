import { randomUUID } from 'node:crypto';
import type { RequestHandler } from 'express';

/** Gives every request an id for the logs and the `X-Request-Id` response header. */
export const requestId: RequestHandler = (req, res, next) => {
  req.requestId = randomUUID();
  res.setHeader('X-Request-Id', req.requestId);
  next();
};
