/**
 * Names of work folders that say who owns them, so that a process starting later can tell the folders
 * of a process that was killed (or of a job that no longer runs) from those still in use:
 * - `upload-<host>-<pid>-<instance>-XXXXXX`: a multipart upload being received by one app process;
 * - `job-<jobId>-a<attempt>-XXXXXX`: one attempt of a job (a re-claim counts a new attempt).
 */
import { randomBytes } from 'node:crypto';
import { hostname } from 'node:os';

/** Distinguishes this process from an earlier one that had the same pid (a restarted container). */
export const PROCESS_INSTANCE = randomBytes(4).toString('hex');

function safeHost(): string {
  return hostname().replace(/[^a-z0-9]/gi, '').slice(0, 40) || 'host';
}

export function uploadWorkPurpose(): string {
  return `upload-${safeHost()}-${process.pid}-${PROCESS_INSTANCE}`;
}

export function jobWorkPurpose(job: { id: number; attempts: number }): string {
  return `job-${job.id}-a${job.attempts}`;
}

export type WorkFolderOwner =
  | { kind: 'upload'; host: string; pid: number; instance: string }
  | { kind: 'job'; jobId: number; attempt: number }
  | { kind: 'other' };

/** Who a work folder belongs to, from its name. */
export function workFolderOwner(name: string): WorkFolderOwner {
  const upload = /^upload-([a-z0-9]+)-(\d+)-([0-9a-f]{8})-/i.exec(name);
  if (upload) return { kind: 'upload', host: upload[1]!, pid: Number(upload[2]), instance: upload[3]! };
  const job = /^job-(\d+)-a(\d+)-/.exec(name);
  if (job) return { kind: 'job', jobId: Number(job[1]), attempt: Number(job[2]) };
  return { kind: 'other' };
}

/** True when the upload folder's process is gone: this host, and its pid is dead or is ours from an earlier life. */
export function uploadOwnerGone(owner: { host: string; pid: number; instance: string }): boolean | null {
  if (owner.host !== safeHost()) return null;
  if (owner.pid === process.pid) return owner.instance !== PROCESS_INSTANCE;
  try {
    process.kill(owner.pid, 0);
    return false;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'ESRCH';
  }
}
