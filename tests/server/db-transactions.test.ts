import request from 'supertest';
import { DatabaseError } from 'sequelize';
import { describe, expect, it } from 'vitest';
import { LOCK_CONFLICT_RETRIES, withTransaction } from '../../server/db';
import { isLockConflict } from '../../server/db-errors';
import { testApp } from '../support/app';

/** What Sequelize throws when MariaDB picked this transaction as a deadlock's victim. */
function deadlock(): DatabaseError {
  const original = Object.assign(new Error('Deadlock found when trying to get lock; try restarting transaction'), { errno: 1213, code: 'ER_LOCK_DEADLOCK', sql: 'INSERT …', parameters: {} });
  return new DatabaseError(original);
}

describe('transactions that lose a lock conflict', () => {
  it('knows a deadlock and a lock wait timeout from other database errors', () => {
    expect(isLockConflict(deadlock())).toBe(true);
    const waited = new DatabaseError(Object.assign(new Error('Lock wait timeout exceeded'), { errno: 1205, sql: '', parameters: {} }));
    expect(isLockConflict(waited)).toBe(true);
    const duplicate = new DatabaseError(Object.assign(new Error('Duplicate entry'), { errno: 1062, sql: '', parameters: {} }));
    expect(isLockConflict(duplicate)).toBe(false);
    expect(isLockConflict(new Error('plain'))).toBe(false);
  });

  it('run again after a deadlock, and undo outside work before each new run', async () => {
    let runs = 0;
    let undone = 0;
    const answer = await withTransaction(
      async () => {
        runs += 1;
        if (runs < 3) throw deadlock();
        return 'saved';
      },
      { beforeRetry: () => void (undone += 1) },
    );
    expect(answer).toBe('saved');
    expect(runs).toBe(3);
    expect(undone).toBe(2);
  });

  it('give up after the retries and let other errors through at once', async () => {
    let runs = 0;
    await expect(withTransaction(async () => { runs += 1; throw deadlock(); })).rejects.toThrow(/Deadlock/);
    expect(runs).toBe(LOCK_CONFLICT_RETRIES + 1);
    runs = 0;
    await expect(withTransaction(async () => { runs += 1; throw new Error('not a lock problem'); })).rejects.toThrow('not a lock problem');
    expect(runs).toBe(1);
  });

  it('answer a conflict that outlasts the retries as 409 with what to do, not 500', async () => {
    const app = testApp({
      extraApiRoutes: (api) => {
        api.get('/test-only/deadlock', () => {
          throw deadlock();
        });
      },
    });
    const res = await request(app).get('/api/v1/test-only/deadlock');
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CONFLICT');
    expect(res.body.error.message).toMatch(/saved at the same moment\. Try again/);
  });
});
