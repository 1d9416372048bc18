/**
 * A job worker: claims jobs from the `jobs` table one at a time per slot, runs their handler, renews the
 * lease while it runs, and records done/failed. Several workers (in the web process and in `npm run worker`
 * processes on any machine sharing the database and storage) can run side by side: the claim's row lock
 * keeps any job from running twice at once.
 */
import { hostname } from 'node:os';
import { randomBytes } from 'node:crypto';
import { onPrimary } from '../db-routing';
import { timedOut } from '../lifecycle';
import { log } from '../logger';
import type { Job } from '../models';
import { BackOff } from './backoff';
import { claimNext, completeJob, failJob, releaseJob, renewLease } from './queue';
import { jobSettings } from './settings';
import { JobFailure, type JobHandler } from './types';

export interface WorkerOptions {
  handlers: readonly JobHandler[];
  /** Jobs run at once by this worker. */
  concurrency?: number;
  leaseMs?: number;
  pollMs?: number;
  stopGraceMs?: number;
  /** A name for logs and the `worker_id` column; made unique per worker. */
  name?: string;
}

/** Turns any error into the sentence stored on the job. */
export function failureReason(err: unknown, jobId: number): string {
  if (err instanceof JobFailure) return err.message;
  // Coded errors of the video and physics engines carry messages written for the user.
  const code = err instanceof Error ? (err as Error & { code?: unknown }).code : undefined;
  if (err instanceof Error && typeof code === 'string' && /^[A-Z][A-Z0-9_]+$/.test(code)) return err.message;
  return `Processing stopped on an unexpected error (reference job ${jobId}). Retry the job; if it fails again, tell your club admin.`;
}

export class JobWorker {
  readonly id: string;
  private readonly handlers: Map<string, JobHandler>;
  private readonly concurrency: number;
  private readonly leaseMs: number;
  private readonly pollMs: number;
  private readonly stopGraceMs: number;
  private running = false;
  private loops: Promise<void>[] = [];
  private wake: (() => void) | null = null;
  private readonly active = new Map<number, AbortController>();
  private readonly backOff: BackOff;

  constructor(options: WorkerOptions) {
    this.handlers = new Map(options.handlers.map((h) => [h.type, h]));
    this.concurrency = options.concurrency ?? 1;
    this.leaseMs = options.leaseMs ?? jobSettings.leaseMs;
    this.pollMs = options.pollMs ?? jobSettings.pollMs;
    this.stopGraceMs = options.stopGraceMs ?? jobSettings.stopGraceMs;
    this.id = `${options.name ?? 'worker'}@${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`;
    this.backOff = new BackOff(this.pollMs, this.id);
  }

  /** Starts claiming in the background. */
  start(): void {
    if (this.running) return;
    this.running = true;
    for (let slot = 0; slot < this.concurrency; slot++) this.loops.push(this.loop());
    log.info('Job worker started', { worker: this.id, concurrency: this.concurrency });
  }

  /**
   * Stops claiming, lets running jobs finish for up to the grace period, then aborts them and hands them
   * back to the queue (after their cleanup) so another worker starts them afresh.
   */
  async stop(graceMs?: number): Promise<void> {
    if (!this.running) return;
    const grace = Math.min(this.stopGraceMs, graceMs ?? this.stopGraceMs);
    this.running = false;
    this.wake?.();
    const done = Promise.all(this.loops);
    if (await timedOut(done, grace)) {
      for (const controller of this.active.values()) controller.abort(new WorkerStopping());
      await done;
    }
    this.loops = [];
    log.info('Job worker stopped', { worker: this.id });
  }

  /** True while the worker runs and its last claim reached the database (what the heartbeat reports). */
  healthy(): boolean {
    return this.running && this.backOff.failuresInRow === 0;
  }

  /** Claims and runs one job if any is claimable; true when one ran. For tests and scripts. */
  async runOnce(): Promise<boolean> {
    const claim = await claimNext(this.id, { types: [...this.handlers.keys()], leaseMs: this.leaseMs });
    if (!claim) return false;
    // A job's input was written by another process just before: its reads go to the primary, never a lagging replica.
    await onPrimary(() => this.execute(claim.job, claim.exhausted));
    return true;
  }

  /** Runs jobs until none is claimable; returns how many ran. For tests and scripts. */
  async drain(): Promise<number> {
    let count = 0;
    while (await this.runOnce()) count++;
    return count;
  }

  private async loop(): Promise<void> {
    while (this.running) {
      let ran = false;
      let pause = this.pollMs;
      try {
        ran = await this.runOnce();
        this.backOff.succeeded();
      } catch (err) {
        pause = this.backOff.failed(err);
      }
      if (!ran && this.running) await this.sleep(pause);
    }
  }

  private sleep(ms: number): Promise<void> {
    return new Promise((resolve) => {
      const timer = setTimeout(() => {
        this.wake = null;
        resolve();
      }, ms);
      this.wake = () => {
        clearTimeout(timer);
        this.wake = null;
        resolve();
      };
    });
  }

  private async execute(job: Job, exhausted: boolean): Promise<void> {
    const handler = this.handlers.get(job.type);
    if (!handler) {
      await failJob(job.id, this.id, `No worker knows the job type "${job.type}".`);
      return;
    }
    if (exhausted) {
      const reason = `The worker running this job stopped responding ${job.attempts} times. Retry it; if it fails again, the clip may be too large for the workers.`;
      await this.fail(handler, job, reason);
      return;
    }

    const controller = new AbortController();
    this.active.set(job.id, controller);
    let percent = 0;
    let written = 0;
    let lastWrite = 0;
    let lost = false;
    const renew = async () => {
      const ok = await renewLease(job.id, this.id, percent, this.leaseMs).catch((err: Error) => {
        log.warn('Job lease renewal failed', { job: job.id, error: err.message });
        return true;
      });
      if (!ok && !lost) {
        lost = true;
        controller.abort(new LeaseLost());
      }
    };
    const leaseTimer = setInterval(() => void renew(), Math.max(50, Math.floor(this.leaseMs / 3)));
    const progress = (p: number) => {
      if (!Number.isFinite(p)) return;
      percent = Math.max(percent, Math.min(99, Math.floor(p)));
      const now = Date.now();
      // Throttled: at most one write per 250 ms, and only when the whole per cent moved.
      if (percent > written && now - lastWrite >= 250) {
        written = percent;
        lastWrite = now;
        void renew();
      }
    };

    try {
      const result = await handler.run({ job, workerId: this.id, signal: controller.signal, progress });
      clearInterval(leaseTimer);
      if (lost) throw new LeaseLost();
      const ok = await completeJob(job.id, this.id, result);
      if (!ok) log.warn('Job finished after its lease was taken over; result dropped', { job: job.id, worker: this.id });
    } catch (err) {
      clearInterval(leaseTimer);
      const reasonForAbort = controller.signal.aborted ? controller.signal.reason : null;
      if (reasonForAbort instanceof LeaseLost || err instanceof LeaseLost) {
        // Another worker owns the job now and cleans up on its own run; touching its files would break that run.
        log.warn('Job lease lost; stopped working on it', { job: job.id, worker: this.id });
      } else if (reasonForAbort instanceof WorkerStopping) {
        await this.safeCleanup(handler, job);
        await releaseJob(job.id, this.id);
        log.info('Job handed back to the queue on stop', { job: job.id, worker: this.id });
      } else {
        const reason = failureReason(err, job.id);
        if (!(err instanceof JobFailure)) {
          log.error('Job failed', { job: job.id, type: job.type, error: (err as Error)?.message, stack: (err as Error)?.stack });
        }
        await this.fail(handler, job, reason);
      }
    } finally {
      this.active.delete(job.id);
    }
  }

  private async safeCleanup(handler: JobHandler, job: Job): Promise<void> {
    try {
      await handler.cleanup?.(job);
    } catch (err) {
      log.error('Job cleanup failed', { job: job.id, error: (err as Error).message, stack: (err as Error).stack });
    }
  }

  private async fail(handler: JobHandler, job: Job, reason: string): Promise<void> {
    await this.safeCleanup(handler, job);
    const ok = await failJob(job.id, this.id, reason);
    if (!ok) return;
    try {
      await handler.onFailed?.(job, reason);
    } catch (err) {
      log.error('Job failure bookkeeping failed', { job: job.id, error: (err as Error).message, stack: (err as Error).stack });
    }
  }
}

class WorkerStopping extends Error {
  constructor() {
    super('The worker is stopping.');
  }
}

class LeaseLost extends Error {
  constructor() {
    super('The job lease was taken over by another worker.');
  }
}
