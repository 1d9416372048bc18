/** Classifying the database's errors (no dependencies, so the HTTP layer can use it without the connection). */

/** MariaDB's answers when a statement lost a lock conflict: the transaction was rolled back and may simply run again. */
const LOCK_CONFLICT_ERRNOS = new Set([1213 /* ER_LOCK_DEADLOCK */, 1205 /* ER_LOCK_WAIT_TIMEOUT */]);

/** True when `err` means the transaction lost a deadlock or waited too long for a lock (not that it was wrong). */
export function isLockConflict(err: unknown): boolean {
  const original = (err as { original?: { errno?: unknown }; parent?: { errno?: unknown } } | null)?.original ??
    (err as { parent?: { errno?: unknown } } | null)?.parent ??
    (err as { errno?: unknown } | null);
  return typeof original?.errno === 'number' && LOCK_CONFLICT_ERRNOS.has(original.errno);
}
