/**
 * `npm run worker`: a job worker process. Run as many as the machine (or other machines sharing the
 * database and STORAGE_DIR) can carry; each runs WORKER_CONCURRENCY jobs at once. At start it removes
 * the work folders that killed processes left. SIGTERM or SIGINT stops it gracefully: running jobs
 * finish (up to JOB_STOP_GRACE_SECONDS) or go back to the queue with their lease released.
 */
import { writeFile } from 'node:fs/promises';
import { checkDatabase, sequelize } from './db';
import { JOB_HANDLERS } from './jobs/handlers';
import { jobSettings } from './jobs/settings';
import { JobWorker } from './jobs/worker';
import { removeStaleWorkFolders } from './jobs/work-folders';
import { armHardExit, installCrashHandlers } from './lifecycle';
import { errorFields, log } from './logger';

/** Time after the job grace for cleanup, hand-back and closing the pool before the hard exit. */
const HARD_EXIT_MARGIN_MS = 10_000;
/** How often the heartbeat file is touched while the worker is healthy. */
const HEARTBEAT_EVERY_MS = 10_000;

/**
 * Touches `WORKER_HEARTBEAT_FILE` (when set) every 10 s while the worker claims without errors, for a
 * container health check: a file older than 30 s means the worker is stuck or cannot reach the database.
 */
function startHeartbeat(worker: JobWorker): NodeJS.Timeout | null {
  const file = process.env.WORKER_HEARTBEAT_FILE;
  if (!file) return null;
  const beat = () => {
    if (worker.healthy()) writeFile(file, new Date().toISOString()).catch((err: unknown) => log.warn('Could not write the heartbeat file', { file, ...errorFields(err) }));
  };
  beat();
  const timer = setInterval(beat, HEARTBEAT_EVERY_MS);
  timer.unref();
  return timer;
}

async function main(): Promise<void> {
  await checkDatabase();
  await removeStaleWorkFolders();
  const worker = new JobWorker({ handlers: JOB_HANDLERS, concurrency: jobSettings.workerConcurrency, name: 'worker' });
  worker.start();
  const heartbeat = startHeartbeat(worker);
  let stopping = false;
  const stop = (reason: string, exitCode: number) => {
    if (stopping) return;
    stopping = true;
    log.info(`${reason} received, stopping the worker`);
    if (heartbeat) clearInterval(heartbeat);
    armHardExit(jobSettings.stopGraceMs + HARD_EXIT_MARGIN_MS, 'Worker shutdown');
    worker
      .stop()
      .catch((err: unknown) => log.error('worker did not stop cleanly', errorFields(err)))
      .finally(() => {
        sequelize.close().finally(() => process.exit(exitCode));
      });
  };
  process.on('SIGTERM', () => stop('SIGTERM', 0));
  process.on('SIGINT', () => stop('SIGINT', 0));
  installCrashHandlers(stop);
}

main().catch((err: unknown) => {
  log.error(err instanceof Error ? err.message : String(err), errorFields(err));
  process.exit(1);
});
