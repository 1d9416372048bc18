/**
 * The access log: one line per answered request through pino-http, with method, route pattern, path
 * (without its query string, which may carry tokens), status, duration, request id and the user and club
 * ids. Headers, cookies and bodies are never logged.
 */
import type { Request, RequestHandler, Response } from 'express';
import { pinoHttp } from 'pino-http';
import { logger } from '../logger';

/** Every API router is mounted under this prefix (server/app.ts). */
const API_PREFIX = '/api/v1';

function routeOf(req: Request): string | undefined {
  const route = (req as Request & { route?: { path?: unknown } }).route;
  if (!route || typeof route.path !== 'string') return undefined;
  // Note: Express resets req.baseUrl when an error leaves a router, so the mount prefix is put back here.
  const base = req.baseUrl || (req.originalUrl.startsWith(`${API_PREFIX}/`) && !route.path.startsWith(API_PREFIX) ? API_PREFIX : '');
  return `${base}${route.path}`;
}

function fields(req: Request, res: Response, responseTime: number): Record<string, unknown> {
  return {
    requestId: req.requestId,
    method: req.method,
    route: routeOf(req),
    path: (req.originalUrl ?? req.url).split('?')[0],
    status: res.statusCode,
    durationMs: responseTime,
    userId: req.user?.id,
    clubId: req.club?.id,
  };
}

export function accessLog(): RequestHandler {
  const middleware = pinoHttp({
    logger,
    genReqId: (req) => (req as Request).requestId,
    // Only the fields below; pino-http's default serializers would add every header.
    wrapSerializers: false,
    serializers: { req: () => undefined, res: () => undefined, err: () => undefined },
    // 503 is an expected answer (readiness while draining, a database outage): a warning, not an error.
    customLogLevel: (_req, res, err) => (res.statusCode === 503 ? 'warn' : err || res.statusCode >= 500 ? 'error' : 'info'),
    customSuccessMessage: () => 'request',
    customErrorMessage: () => 'request failed',
    customSuccessObject: (req, res, value) => fields(req as Request, res as Response, (value as { responseTime: number }).responseTime),
    customErrorObject: (req, res, _err, value) => fields(req as Request, res as Response, (value as { responseTime: number }).responseTime),
  });
  return middleware as unknown as RequestHandler;
}
