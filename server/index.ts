/**
 * The server process: check the database, apply pending migrations, listen, start background work.
 */
import { createApp } from './app';
import { startBackgroundWork, stopBackgroundWork } from './background';
import { DEFAULT_SESSION_SECRET, config } from './config';
import { checkDatabase, sequelize } from './db';
import { log } from './logger';
import { migrateUp } from './migrate';
import { prepareStorage } from './storage';

/** How long requests in flight may take to finish after SIGTERM before their connections are closed. */
const SHUTDOWN_GRACE_MS = 30_000;

async function main(): Promise<void> {
  await checkDatabase();
  await migrateUp();
  await prepareStorage();
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
  log.info(`Arcwright listening on http://${config.host}:${config.port}`);
  if (config.session.secret === DEFAULT_SESSION_SECRET && !['127.0.0.1', 'localhost', '::1'].includes(config.host)) {
    log.warn('SESSION_SECRET is the built-in development value while the app listens beyond this machine: set a long random SESSION_SECRET.');
  }
  await startBackgroundWork();

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    log.info(`${signal} received, shutting down after the requests in flight`);
    // Stop accepting connections; requests in flight (an upload's last part included) finish, up to the grace.
    const drained = new Promise<void>((resolve) => server.close(() => resolve()));
    const idle = setInterval(() => server.closeIdleConnections(), 200);
    const grace = setTimeout(() => {
      log.warn(`requests still running after ${SHUTDOWN_GRACE_MS / 1000} s: closing their connections`);
      server.closeAllConnections();
    }, SHUTDOWN_GRACE_MS);
    server.closeIdleConnections();
    Promise.all([
      drained,
      stopBackgroundWork().catch((err: unknown) => log.error('background work did not stop cleanly', { stack: err instanceof Error ? err.stack : String(err) })),
    ]).finally(() => {
      clearInterval(idle);
      clearTimeout(grace);
      sequelize.close().finally(() => process.exit(0));
    });
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((err: unknown) => {
  log.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
