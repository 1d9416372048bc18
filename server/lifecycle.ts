/**
 * The life of a server process after it listens: draining on SIGTERM (readiness answers 503, new
 * connections are refused, requests in flight finish within the grace period), a hard-exit timer
 * in case something hangs, and handlers that log an unhandled rejection or exception before exiting.
 */
import type { Server } from 'node:http';
import type { RequestHandler } from 'express';
import { errorFields, log } from './logger';

let draining = false;

/** True once shutdown began: readiness answers 503 so a load balancer stops sending requests. */
export function isDraining(): boolean {
  return draining;
}

export function beginDraining(): void {
  draining = true;
}

/** Back to serving (tests only; a real process never leaves draining). */
export function resetDraining(): void {
  draining = false;
}

/** While draining, every answer asks the client to close its keep-alive connection so it can go. */
export const closeConnectionsWhileDraining: RequestHandler = (_req, res, next) => {
  if (draining) res.setHeader('Connection', 'close');
  next();
};

/**
 * Stops accepting connections and waits for the requests in flight to finish (an upload included),
 * for at most `graceMs`; then cuts the connections that are still open. Idle keep-alive connections
 * are closed at once. Resolves with whether the grace period ran out.
 */
export async function drainHttpServer(server: Server, graceMs: number): Promise<{ timedOut: boolean }> {
  beginDraining();
  const closed = new Promise<void>((resolve) => server.close(() => resolve()));
  server.closeIdleConnections();
  // Connections that finish a request while draining become idle: close them as they do.
  const idleSweep = setInterval(() => server.closeIdleConnections(), 250);
  const late = await timedOut(closed, graceMs);
  clearInterval(idleSweep);
  if (late) {
    log.warn('Shutdown grace period ran out; closing the connections still open', { graceMs });
    server.closeAllConnections();
    await closed;
  }
  return { timedOut: late };
}

/** Waits for `work` at most `ms`; true when the time ran out first (the work goes on regardless). */
export async function timedOut(work: Promise<unknown>, ms: number): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined;
  const late = await Promise.race([
    work.then(() => false),
    new Promise<boolean>((resolve) => {
      timer = setTimeout(() => resolve(true), ms);
    }),
  ]);
  clearTimeout(timer);
  return late;
}

/**
 * Exits with code 1 after `ms` unless the process exited before: the last resort when a step of the
 * shutdown hangs (a database that does not answer, a stuck child). The timer does not keep the process alive.
 */
export function armHardExit(ms: number, what: string): NodeJS.Timeout {
  const timer = setTimeout(() => {
    log.error(`${what} did not finish within ${ms} ms; exiting now`);
    process.exit(1);
  }, ms);
  timer.unref();
  return timer;
}

/**
 * Logs an unhandled rejection or uncaught exception with its stack and calls `shutdown(1)`: the
 * process is in an unknown state, so it stops (gracefully when it can) and is restarted by its supervisor.
 */
export function installCrashHandlers(shutdown: (reason: string, exitCode: number) => void): void {
  process.on('unhandledRejection', (reason: unknown) => {
    log.error('Unhandled promise rejection; shutting down', errorFields(reason));
    shutdown('unhandledRejection', 1);
  });
  process.on('uncaughtException', (err: Error) => {
    log.error('Uncaught exception; shutting down', errorFields(err));
    shutdown('uncaughtException', 1);
  });
}
