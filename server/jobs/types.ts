/** What a job handler is given and what it provides. */
import type { JobFailureCode } from '../../shared/errors';
import type { JobType } from '../../shared/schemas/clip';
import type { Job } from '../models';

export interface JobContext {
  job: Job;
  workerId: string;
  /** Aborted when the worker stops (graceful stop timed out) or lost the job (its lease was taken): stop and throw. */
  signal: AbortSignal;
  /** Reports progress 0–100; cheap to call often (writes are throttled). */
  progress(percent: number): void;
}

export interface JobHandler {
  type: JobType;
  /** Does the work; returns the job's result (stored as JSON). Throw to fail: a `JobFailure` message is shown to the coach. */
  run(ctx: JobContext): Promise<Record<string, unknown> | null>;
  /** Removes whatever a failed or stopped run wrote (nothing may stay half-written). Must not throw for missing files. */
  cleanup?(job: Job): Promise<void>;
  /** Records the failure on the job's subject (e.g. the clip's status), after `cleanup`. */
  onFailed?(job: Job, reason: string): Promise<void>;
}

/**
 * A failure whose message is meant for the coach (bad input, a clip that cannot be read, a lost ball).
 * Other errors are logged with their stack and reported with a generic sentence. `code` is one of
 * `JOB_FAILURE_CODES` (shared/errors.ts).
 */
export class JobFailure extends Error {
  constructor(
    message: string,
    readonly code: JobFailureCode = 'JOB_FAILED',
  ) {
    super(message);
    this.name = 'JobFailure';
  }
}
