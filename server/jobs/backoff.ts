/**
 * Exponential back-off of a worker whose claims fail (the database is down or unreachable): the pause
 * doubles from the poll interval up to a ceiling, and the worker logs once per step (and once more when
 * the claims work again) rather than one line every poll.
 */
import { errorFields, log } from '../logger';

export const BACK_OFF_CEILING_MS = 30_000;

export class BackOff {
  /** Failures in a row; 0 while claims work. */
  private failures = 0;
  /** The last pause that was logged, so that several slots of one worker log a step only once. */
  private loggedPauseMs = 0;

  constructor(
    private readonly baseMs: number,
    private readonly workerId: string,
    private readonly ceilingMs = BACK_OFF_CEILING_MS,
  ) {}

  /** Records a failed claim; returns the pause before the next try. */
  failed(err: unknown): number {
    this.failures++;
    const pauseMs = Math.min(this.ceilingMs, this.baseMs * 2 ** Math.min(this.failures - 1, 20));
    if (pauseMs > this.loggedPauseMs) {
      this.loggedPauseMs = pauseMs;
      log.error('Job worker could not claim a job; backing off', { worker: this.workerId, failures: this.failures, retryInMs: pauseMs, ...errorFields(err) });
    }
    return pauseMs;
  }

  /** Records a claim that worked; logs the recovery once after failures. */
  succeeded(): void {
    if (this.failures === 0) return;
    log.info('Job worker claims again after failures', { worker: this.workerId, failures: this.failures });
    this.failures = 0;
    this.loggedPauseMs = 0;
  }

  get failuresInRow(): number {
    return this.failures;
  }
}
