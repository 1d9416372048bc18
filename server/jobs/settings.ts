/**
 * Settings of the job queue and workers, from the environment (documented in `.env.example`).
 * Kept apart from server/config.ts so the worker process reads only what it needs.
 */

function int(name: string, fallback: number, min: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const value = Number(raw);
  if (!Number.isInteger(value) || value < min) {
    throw new Error(`Environment variable ${name} must be a whole number >= ${min} (got "${raw}"). Fix it in .env or the environment.`);
  }
  return value;
}

export const jobSettings = {
  /** Workers the web process runs itself (`WORKERS_IN_WEB`, default 1; 0 leaves all work to `npm run worker`). */
  workersInWeb: int('WORKERS_IN_WEB', 1, 0),
  /** Jobs one `npm run worker` process runs at once (`WORKER_CONCURRENCY`, default 1). */
  workerConcurrency: int('WORKER_CONCURRENCY', 1, 1),
  /** How long a claim holds without renewal (`JOB_LEASE_SECONDS`, default 30); renewed every third of it while running. */
  leaseMs: int('JOB_LEASE_SECONDS', 30, 1) * 1000,
  /** Pause between looks at an empty queue (`JOB_POLL_MS`, default 500). */
  pollMs: int('JOB_POLL_MS', 500, 10),
  /** Claims of one job before a worker that keeps dying marks it failed (`JOB_MAX_ATTEMPTS`, default 3). */
  maxAttempts: int('JOB_MAX_ATTEMPTS', 3, 1),
  /** On SIGTERM, how long a running job may take to finish before it is stopped and handed back (`JOB_STOP_GRACE_SECONDS`, default 20). */
  stopGraceMs: int('JOB_STOP_GRACE_SECONDS', 20, 0) * 1000,
};
