/**
 * `npm run worker`: a job worker process. Run as many as the machine (or other machines sharing the
 * database and STORAGE_DIR) can carry; each runs WORKER_CONCURRENCY jobs at once. At start it removes
 * the work folders that killed processes left. SIGTERM or SIGINT stops it gracefully: running jobs
 * finish (up to JOB_STOP_GRACE_SECONDS) or go back to the queue with their lease released.
 */
import { checkDatabase, sequelize } from './db';
import { JOB_HANDLERS } from './jobs/handlers';
import { jobSettings } from './jobs/settings';
import { JobWorker } from './jobs/worker';
import { removeStaleWorkFolders } from './jobs/work-folders';
import { armHardExit, installCrashHandlers } from './lifecycle';
import { errorFields, log } from './logger';

/** Time after the job grace for cleanup, hand-back and closing the pool before the hard exit. */
const HARD_EXIT_MARGIN_MS = 10_000;

async function main(): Promise<void> {
  await checkDatabase();
  await removeStaleWorkFolders();
  const worker = new JobWorker({ handlers: JOB_HANDLERS, concurrency: jobSettings.workerConcurrency, name: 'worker' });
  worker.start();
  let stopping = false;
  const stop = (reason: string, exitCode: number) => {
    if (stopping) return;
    stopping = true;
    log.info(`${reason} received, stopping the worker`);
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
