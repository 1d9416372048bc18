/** A job worker for tests: every handler, short timings, driven by the test (`drain()`), never started in the background. */
import { JOB_HANDLERS } from '../../../server/jobs/handlers';
import { JobWorker } from '../../../server/jobs/worker';

export function testWorker(name = 'test', leaseMs = 30_000): JobWorker {
  return new JobWorker({ handlers: JOB_HANDLERS, name, leaseMs, pollMs: 20, stopGraceMs: 2000 });
}
