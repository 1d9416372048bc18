/**
 * Background work of the web process: `WORKERS_IN_WEB` job workers (default 1; 0 leaves the jobs to
 * `npm run worker` processes) and the sweep of expired resumable uploads. Started by server/index.ts
 * after the server listens.
 */
import { JOB_HANDLERS } from './jobs/handlers';
import { jobSettings } from './jobs/settings';
import { JobWorker } from './jobs/worker';
import { log } from './logger';
import { startUploadSweeper, stopUploadSweeper } from './services/clip-uploads';
import { removeStaleWorkFolders } from './jobs/work-folders';

let worker: JobWorker | null = null;

export async function startBackgroundWork(): Promise<void> {
  startUploadSweeper((err) => log.error('expired uploads could not be swept', { stack: err instanceof Error ? err.stack : String(err) }));
  if (worker || jobSettings.workersInWeb === 0) return;
  await removeStaleWorkFolders();
  worker = new JobWorker({ handlers: JOB_HANDLERS, concurrency: jobSettings.workersInWeb, name: 'web' });
  worker.start();
}

/**
 * Stops what startBackgroundWork started (called on shutdown): running jobs finish within `graceMs`
 * (and JOB_STOP_GRACE_SECONDS) or are stopped and handed back to the queue.
 */
export async function stopBackgroundWork(graceMs?: number): Promise<void> {
  stopUploadSweeper();
  const current = worker;
  worker = null;
  await current?.stop(graceMs);
}
