/**
 * Several web processes on one machine (`WEB_PROCESSES`, default 1) through Node's cluster module: the
 * primary checks the database and applies the migrations once, then forks the web processes, which share
 * the listening port (the operating system spreads the connections) and the database. One of them (the
 * "background" one) also runs the job workers of `WORKERS_IN_WEB` and the sweeps, so that they do not run
 * once per process. A web process that dies is replaced (after a pause that grows while they keep dying);
 * SIGTERM or SIGINT to the primary drains every web process (each as server/index.ts describes) and exits
 * when the last has.
 * Note: in-memory limits (the sign-in and sign-up rate limits) count per process, so with N processes a
 * client may try up to N times a limit; the README says so.
 */
import cluster, { type Worker } from 'node:cluster';
import { log } from './logger';

/** Environment variable the primary sets on the one web process that runs the background work. */
export const BACKGROUND_ROLE_VAR = 'ARCWRIGHT_WEB_BACKGROUND';

/** True in a process forked by the primary (it skips the migrations the primary applied). */
export function isForkedWebProcess(): boolean {
  return cluster.isWorker;
}

/** True unless this is a forked web process without the background role. */
export function runsBackgroundWork(): boolean {
  return !cluster.isWorker || process.env[BACKGROUND_ROLE_VAR] === '1';
}

const RESPAWN_FIRST_MS = 500;
const RESPAWN_MAX_MS = 30_000;

/**
 * Forks `count` web processes and keeps them running until SIGTERM/SIGINT; resolves never (the primary
 * exits when the last process has drained).
 */
export function runWebProcesses(count: number, graceMs: number): void {
  let stopping = false;
  let backgroundWorker: Worker | null = null;
  let respawnMs = RESPAWN_FIRST_MS;
  const fork = (background: boolean): void => {
    const worker = cluster.fork(background ? { [BACKGROUND_ROLE_VAR]: '1' } : {});
    if (background) backgroundWorker = worker;
    worker.once('listening', () => {
      respawnMs = RESPAWN_FIRST_MS;
    });
    worker.once('exit', (code, signal) => {
      const wasBackground = worker === backgroundWorker;
      if (wasBackground) backgroundWorker = null;
      if (stopping) {
        if (Object.keys(cluster.workers ?? {}).length === 0) {
          log.info('Every web process has stopped');
          process.exit(0);
        }
        return;
      }
      log.error(`A web process (pid ${worker.process.pid}) ended (${signal ?? `exit ${code}`}); starting another in ${respawnMs} ms`);
      const wait = respawnMs;
      respawnMs = Math.min(RESPAWN_MAX_MS, respawnMs * 2);
      setTimeout(() => {
        if (!stopping) fork(wasBackground);
      }, wait).unref();
    });
  };
  for (let i = 0; i < count; i += 1) fork(i === 0);
  log.info(`Started ${count} web processes`);

  const stop = (reason: string) => {
    if (stopping) return;
    stopping = true;
    log.info(`${reason} received, draining ${Object.keys(cluster.workers ?? {}).length} web processes (grace ${graceMs} ms)`);
    for (const worker of Object.values(cluster.workers ?? {})) worker?.process.kill('SIGTERM');
    if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
    // The processes' own hard-exit timers end them; this one only catches a primary left waiting.
    setTimeout(() => {
      log.error('Web processes did not stop in time; exiting');
      process.exit(1);
    }, graceMs + 15_000).unref();
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}
