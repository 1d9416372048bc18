/**
 * `npm run worker`: a job worker process. Run as many as the machine (or other machines sharing the
 * database and STORAGE_DIR) can carry; each runs WORKER_CONCURRENCY jobs at once. SIGTERM or SIGINT
 * stops it gracefully: running jobs finish (up to JOB_STOP_GRACE_SECONDS) or go back to the queue.
 */
import { checkDatabase, sequelize } from './db';
import { JOB_HANDLERS } from './jobs/handlers';
import { jobSettings } from './jobs/settings';
import { JobWorker } from './jobs/worker';
import { log } from './logger';

async function main(): Promise<void> {
  await checkDatabase();
  const worker = new JobWorker({ handlers: JOB_HANDLERS, concurrency: jobSettings.workerConcurrency, name: 'worker' });
  worker.start();
  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    log.info(`${signal} received, stopping the worker`);
    worker
      .stop()
      .catch((err: unknown) => log.error('worker did not stop cleanly', { stack: err instanceof Error ? err.stack : String(err) }))
      .finally(() => {
        sequelize.close().finally(() => process.exit(0));
      });
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));
}

main().catch((err: unknown) => {
  log.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
