/**
 * Locks on resumable uploads that every web process honours, so that two processes never write the same upload
 * at once (a client resuming through another process while the first one still flushes the part it was cut in):
 * MariaDB's named locks (`GET_LOCK`), each on a connection of its own outside the pool, since a part may take
 * minutes and must not hold one of the pool's connections meanwhile. The lock's name is derived from the database
 * and the upload, as names are shared by every database of the server.
 *
 * Within one process the protocol's usual manners hold: a request that wants a lock held here asks the holder to
 * stop (its received bytes are kept) before it waits. A holder in another process cannot be asked; the request
 * waits for it, up to `waitSeconds`, and then answers that the upload is busy (a request that goes away meanwhile
 * stops waiting within a second).
 */
import { createHash } from 'node:crypto';
import { ERRORS, type Lock, type Locker, type RequestRelease } from '@tus/server';
import mariadb from 'mariadb';
import { config } from '../config';

/** As long as the protocol library's own locks wait for a holder. */
const DEFAULT_WAIT_SECONDS = 30;

type Connect = () => Promise<mariadb.Connection>;

function primaryConnection(): Promise<mariadb.Connection> {
  const { host, port, user, password, name } = config.db;
  return mariadb.createConnection({ host, port, user, password, database: name });
}

/** `aw-upload-` and 40 hex digits: within MariaDB's 64 characters for a lock name. */
export function lockName(database: string, uploadId: string): string {
  return `aw-upload-${createHash('sha1').update(`${database}\n${uploadId}`).digest('hex')}`;
}

export class DatabaseLocker implements Locker {
  /** Locks this process holds, by upload, with the way to ask their request to stop. */
  readonly held = new Map<string, RequestRelease>();

  constructor(
    readonly waitSeconds = DEFAULT_WAIT_SECONDS,
    readonly connect: Connect = primaryConnection,
  ) {}

  newLock(id: string): Lock {
    return new DatabaseLock(id, this);
  }
}

class DatabaseLock implements Lock {
  private connection: mariadb.Connection | null = null;

  constructor(
    private readonly id: string,
    private readonly locker: DatabaseLocker,
  ) {}

  async lock(signal: AbortSignal, requestRelease: RequestRelease): Promise<void> {
    if (signal.aborted) throw ERRORS.ABORTED;
    await this.locker.held.get(this.id)?.();
    const connection = await this.locker.connect();
    const name = lockName(config.db.name, this.id);
    const until = Date.now() + this.locker.waitSeconds * 1000;
    try {
      // Waits of a second at a time, so that a request that goes away stops waiting.
      for (;;) {
        const rows = (await connection.query('SELECT GET_LOCK(?, ?) AS got', [name, Math.min(1, this.locker.waitSeconds)])) as { got: number | null }[];
        if (Number(rows[0]?.got) === 1) break;
        if (signal.aborted) throw ERRORS.ABORTED;
        if (Date.now() >= until) throw ERRORS.ERR_LOCK_TIMEOUT;
      }
    } catch (err) {
      await connection.end().catch(() => connection.destroy());
      throw err;
    }
    this.connection = connection;
    this.locker.held.set(this.id, requestRelease);
  }

  async unlock(): Promise<void> {
    const connection = this.connection;
    if (!connection) return;
    this.connection = null;
    this.locker.held.delete(this.id);
    try {
      await connection.query('SELECT RELEASE_LOCK(?)', [lockName(config.db.name, this.id)]);
      await connection.end();
    } catch {
      // Closing the connection releases its locks all the same.
      connection.destroy();
    }
  }
}

let shared: DatabaseLocker | null = null;

/** The locker of this process's resumable uploads. */
export function uploadLocker(): DatabaseLocker {
  shared ??= new DatabaseLocker();
  return shared;
}
