/**
 * The server process: check the database, apply pending migrations, listen, start background work.
 * SIGTERM or SIGINT drains it (see server/lifecycle.ts): readiness answers 503, requests in flight
 * finish within SHUTDOWN_GRACE_MS, running jobs finish or go back to the queue, then it exits. With
 * WEB_PROCESSES above 1 this process only migrates and then supervises that many web processes
 * (server/web-processes.ts), each of which runs this file too.
 */
import { createApp } from './app';
import { startBackgroundWork, stopBackgroundWork } from './background';
import { DEFAULT_SESSION_SECRET, config } from './config';
import { checkDatabase, sequelize } from './db';
import { armHardExit, drainHttpServer, installCrashHandlers } from './lifecycle';
import { errorFields, log } from './logger';
import { migrateUp } from './migrate';
import { assertSafeConfiguration } from './startup-checks';
import { prepareStorage } from './storage';
import { isForkedWebProcess, runsBackgroundWork, runWebProcesses } from './web-processes';

/** Time after the grace period for the last steps (closing the pool) before the hard exit. */
const HARD_EXIT_MARGIN_MS = 5_000;

async function main(): Promise<void> {
  assertSafeConfiguration(config);
  await checkDatabase();
  // A forked web process finds the migrations applied by its primary.
  if (!isForkedWebProcess()) await migrateUp();
  await prepareStorage();
  if (!isForkedWebProcess() && config.webProcesses > 1) {
    await sequelize.close();
    runWebProcesses(config.webProcesses, config.shutdown.graceMs);
    return;
  }
  const app = createApp();
  const server = app.listen(config.port, config.host);
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', (err: NodeJS.ErrnoException) => {
      if (err.code === 'EADDRINUSE') {
        reject(new Error(`Port ${config.port} on ${config.host} is already in use. Stop the other server or set PORT to a free port.`));
      } else reject(err);
    });
  });
  if (!isForkedWebProcess()) log.info(`Arcwright listening on http://${config.host}:${config.port}`);
  else if (runsBackgroundWork()) log.info(`Arcwright listening on http://${config.host}:${config.port} (${config.webProcesses} web processes)`);
  if (config.session.secret === DEFAULT_SESSION_SECRET && !['127.0.0.1', 'localhost', '::1'].includes(config.host)) {
    log.warn('SESSION_SECRET is the built-in development value while the app listens beyond this machine: set a long random SESSION_SECRET.');
  }
  if (runsBackgroundWork()) await startBackgroundWork();

  let stopping = false;
  const stop = (reason: string, exitCode: number) => {
    if (stopping) return;
    stopping = true;
    const graceMs = config.shutdown.graceMs;
    log.info(`${reason} received, draining (grace ${graceMs} ms)`);
    armHardExit(graceMs + HARD_EXIT_MARGIN_MS, 'Shutdown');
    Promise.allSettled([drainHttpServer(server, graceMs), stopBackgroundWork(graceMs)])
      .then((results) => {
        for (const result of results) if (result.status === 'rejected') log.error('A shutdown step failed', errorFields(result.reason));
        return sequelize.close();
      })
      .catch((err: unknown) => log.error('Closing the database pool failed', errorFields(err)))
      .finally(() => {
        log.info('Stopped');
        process.exit(exitCode);
      });
  };
  process.on('SIGINT', () => stop('SIGINT', 0));
  process.on('SIGTERM', () => stop('SIGTERM', 0));
  installCrashHandlers(stop);
}

main().catch((err: unknown) => {
  log.error(err instanceof Error ? err.message : String(err), errorFields(err));
  process.exit(1);
});
