/**
 * The sweep a worker runs at start: work folders under `<storage>/.work` left by a process that was
 * killed. A job's folder goes unless that very attempt is running under a live lease; an upload's folder
 * goes when its process on this host is gone, or (from another host) when it is older than a day.
 * Folders of other purposes are left alone unless they are older than a day.
 */
import { readdir, rm, stat } from 'node:fs/promises';
import { join } from 'node:path';
import { QueryTypes } from 'sequelize';
import { sequelize } from '../db';
import { errorFields, log } from '../logger';
import { storage } from '../storage';
import { uploadOwnerGone, workFolderOwner } from '../storage/work-names';

const FOREIGN_MAX_AGE_MS = 24 * 3600 * 1000;

async function runningAttempts(jobIds: number[]): Promise<Map<number, number>> {
  if (jobIds.length === 0) return new Map();
  const rows = await sequelize.query<{ id: number; attempts: number }>(
    `SELECT id, attempts FROM jobs WHERE id IN (:ids) AND status = 'running' AND lease_until >= NOW(3)`,
    { type: QueryTypes.SELECT, replacements: { ids: jobIds } },
  );
  return new Map(rows.map((r) => [Number(r.id), Number(r.attempts)]));
}

/** Removes stale work folders; returns the names removed. Never throws (a failed sweep must not stop a worker). */
export async function removeStaleWorkFolders(now = Date.now()): Promise<string[]> {
  const root = storage().workRoot();
  let names: string[];
  try {
    names = (await readdir(root, { withFileTypes: true })).filter((e) => e.isDirectory()).map((e) => e.name);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ENOENT') log.warn('Could not read the work folder', { root, ...errorFields(err) });
    return [];
  }
  try {
    const owners = names.map((name) => ({ name, owner: workFolderOwner(name) }));
    const running = await runningAttempts(owners.flatMap(({ owner }) => (owner.kind === 'job' ? [owner.jobId] : [])));
    const removed: string[] = [];
    for (const { name, owner } of owners) {
      const path = join(root, name);
      let stale: boolean;
      if (owner.kind === 'job') stale = running.get(owner.jobId) !== owner.attempt;
      else {
        const gone = owner.kind === 'upload' ? uploadOwnerGone(owner) : null;
        stale = gone ?? now - (await stat(path)).mtimeMs > FOREIGN_MAX_AGE_MS;
      }
      if (!stale) continue;
      await rm(path, { recursive: true, force: true });
      removed.push(name);
    }
    if (removed.length > 0) log.info('Removed work folders left by stopped processes', { count: removed.length, folders: removed });
    return removed;
  } catch (err) {
    log.warn('The sweep of stale work folders failed; it runs again at the next start', errorFields(err));
    return [];
  }
}
