/**
 * Which database server a query goes to when read replicas are configured (`DB_REPLICAS`).
 *
 * Sequelize sends writes and every query of a transaction to the primary, and plain reads (`SELECT` outside a
 * transaction) to the replicas in turn. Replicas lag behind the primary, so a request that has written reads
 * its own writes from the primary: each request (and each job a worker runs) gets a scope, and the first query
 * in it that is not a plain read sets the scope's `primary` flag; from then on the scope's reads ask for the
 * primary too (`useMaster`). Jobs run with the flag set from the start, because their input was written by
 * another process an instant before. Tables whose rows must never be read stale (sign-in sessions, users and
 * memberships, which a request reads right after the previous request wrote them) always read from the primary.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import type { NextFunction, Request, Response } from 'express';
import type { Sequelize } from 'sequelize';

interface ReadScope {
  primary: boolean;
}

const scopes = new AsyncLocalStorage<ReadScope>();

/**
 * Tables read from the primary always: who is signed in, and their memberships (the authorization of every
 * request). A stale copy would sign a member out or refuse them a club in the request right after sign-up,
 * sign-in or joining; they are small reads by key.
 */
const PRIMARY_ONLY_TABLES = new Set(['auth_sessions', 'users', 'memberships']);

/** Runs `work` in a fresh scope: reads may use replicas until it writes. */
export function inReadScope<T>(work: () => T): T {
  return scopes.run({ primary: false }, work);
}

/** Runs `work` with every read on the primary (jobs, scripts that read what they just wrote elsewhere). */
export function onPrimary<T>(work: () => T): T {
  return scopes.run({ primary: true }, work);
}

/** True when the current scope reads from the primary (it wrote, or began so). */
export function readsFromPrimary(): boolean {
  return scopes.getStore()?.primary ?? false;
}

/** Express middleware: one read scope per request. */
export function readScopePerRequest(_req: Request, _res: Response, next: NextFunction): void {
  inReadScope(next);
}

interface QueryOptionsSeen {
  type?: string;
  useMaster?: boolean;
  transaction?: unknown;
  model?: { tableName?: string };
}

/** Installs the routing on a Sequelize instance (harmless without replicas: every query then goes to the one server). */
export function installReadRouting(sequelize: Sequelize): void {
  sequelize.addHook('beforePoolAcquire', (options: unknown) => {
    const seen = options as QueryOptionsSeen | undefined;
    if (!seen) return;
    if (readsFromPrimary() || (seen.model?.tableName && PRIMARY_ONLY_TABLES.has(seen.model.tableName))) seen.useMaster = true;
  });
  sequelize.addHook('afterQuery', (options: unknown) => {
    const seen = options as QueryOptionsSeen | undefined;
    const scope = scopes.getStore();
    if (scope && !scope.primary && seen?.type !== 'SELECT') scope.primary = true;
  });
}
