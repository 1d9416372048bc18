/**
 * The locks on resumable uploads shared by web processes (MariaDB named locks): one holder at a time per upload,
 * whichever process asks; a waiter gives up after its wait, or soon after its request goes away; within one
 * process the holder is asked to stop first.
 */
import { ERRORS } from '@tus/server';
import { describe, expect, it } from 'vitest';
import { DatabaseLocker, lockName } from '../../../server/services/upload-locks';

const never = () => new AbortController().signal;

describe('locks on resumable uploads', () => {
  it('lets one process hold an upload while another waits, and hands it over on release', async () => {
    const first = new DatabaseLocker(5);
    const second = new DatabaseLocker(5);
    const held = first.newLock('a'.repeat(32));
    await held.lock(never(), () => {});
    let taken = false;
    const waiting = second.newLock('a'.repeat(32));
    const acquired = waiting.lock(never(), () => {}).then(() => (taken = true));
    await new Promise((r) => setTimeout(r, 300));
    expect(taken).toBe(false);
    // Another upload is not held up meanwhile.
    const unrelated = second.newLock('b'.repeat(32));
    await unrelated.lock(never(), () => {});
    await unrelated.unlock();
    await held.unlock();
    await acquired;
    expect(taken).toBe(true);
    await waiting.unlock();
  });

  it('gives up after its wait with the protocol’s lock timeout', async () => {
    const first = new DatabaseLocker(1);
    const held = first.newLock('c'.repeat(32));
    await held.lock(never(), () => {});
    await expect(new DatabaseLocker(1).newLock('c'.repeat(32)).lock(never(), () => {})).rejects.toBe(ERRORS.ERR_LOCK_TIMEOUT);
    await held.unlock();
  });

  it('stops waiting within a second when the waiting request goes away', async () => {
    const held = new DatabaseLocker().newLock('d'.repeat(32));
    await held.lock(never(), () => {});
    const gone = new AbortController();
    const started = Date.now();
    const waiting = new DatabaseLocker(20).newLock('d'.repeat(32)).lock(gone.signal, () => {});
    setTimeout(() => gone.abort(), 200);
    await expect(waiting).rejects.toBe(ERRORS.ABORTED);
    expect(Date.now() - started).toBeLessThan(5000);
    await held.unlock();
  });

  it('asks the holder in the same process to stop before waiting for it', async () => {
    const locker = new DatabaseLocker(5);
    const held = locker.newLock('e'.repeat(32));
    let asked = false;
    await held.lock(never(), async () => {
      asked = true;
      await held.unlock();
    });
    const next = locker.newLock('e'.repeat(32));
    await next.lock(never(), () => {});
    expect(asked).toBe(true);
    await next.unlock();
  });

  it('names locks by database and upload within MariaDB’s 64 characters', () => {
    const name = lockName('arcwright_test_with_a_rather_long_database_name', 'f'.repeat(32));
    expect(name).toMatch(/^aw-upload-[0-9a-f]{40}$/);
    expect(name.length).toBeLessThanOrEqual(64);
    expect(lockName('one', 'f'.repeat(32))).not.toBe(lockName('two', 'f'.repeat(32)));
  });
});
