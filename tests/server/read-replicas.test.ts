import { DataTypes, Model, QueryTypes, Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { config } from '../../server/config';
import { sequelizeOptions, type DbServer } from '../../server/db';
import { inReadScope, installReadRouting, onPrimary } from '../../server/db-routing';
import { recreateDatabase } from '../support/db';

// A second database on the same server stands in for a replica: it holds different rows, so each read shows
// which server answered it.
const replicaName = `${config.db.name}_replica`;
const primary: DbServer = { host: config.db.host, port: config.db.port, username: config.db.user, password: config.db.password };
let db: Sequelize;

class AuthSessionProbe extends Model {
  declare sid: string;
}

async function origin(): Promise<string> {
  const rows = await db.query<{ origin: string }>('SELECT origin FROM replica_probe', { type: QueryTypes.SELECT });
  return rows[0]!.origin;
}

beforeAll(async () => {
  await recreateDatabase(replicaName);
  db = new Sequelize(config.db.name, config.db.user, config.db.password, {
    ...sequelizeOptions(primary, [{ ...primary, database: replicaName }], { max: 2, min: 0, idleMs: 1000, acquireMs: 5000 }),
    logging: false,
  });
  installReadRouting(db);
  AuthSessionProbe.init({ sid: { type: DataTypes.STRING(36), primaryKey: true } }, { sequelize: db, tableName: 'auth_sessions', timestamps: false });
  const replica = new Sequelize(replicaName, config.db.user, config.db.password, { dialect: 'mariadb', host: primary.host, port: primary.port, logging: false });
  try {
    await replica.query('CREATE TABLE replica_probe (origin VARCHAR(20) NOT NULL, n INT NOT NULL DEFAULT 0)');
    await replica.query("INSERT INTO replica_probe (origin) VALUES ('replica')");
    await replica.query('CREATE TABLE auth_sessions (sid VARCHAR(36) PRIMARY KEY)');
  } finally {
    await replica.close();
  }
  await db.query('DROP TABLE IF EXISTS replica_probe');
  await db.query('CREATE TABLE replica_probe (origin VARCHAR(20) NOT NULL, n INT NOT NULL DEFAULT 0)');
  await db.query("INSERT INTO replica_probe (origin) VALUES ('primary')");
  await db.query("INSERT INTO auth_sessions (sid, created_at, updated_at) VALUES ('replica-probe-session', NOW(), NOW())");
});

afterAll(async () => {
  await db.query('DROP TABLE IF EXISTS replica_probe');
  await db.query("DELETE FROM auth_sessions WHERE sid = 'replica-probe-session'");
  await db.query(`DROP DATABASE IF EXISTS \`${replicaName}\``);
  await db.close();
});

describe('read replication', () => {
  it('sends a plain read outside any scope to a replica', async () => {
    expect(await origin()).toBe('replica');
  });

  it('reads from a replica until the request writes, then from the primary for the rest of the request', async () => {
    const seen = await inReadScope(async () => {
      const before = await origin();
      await db.query('UPDATE replica_probe SET n = n + 1');
      const after = await origin();
      return { before, after };
    });
    expect(seen).toEqual({ before: 'replica', after: 'primary' });
    // The next request starts on the replicas again.
    expect(await inReadScope(() => origin())).toBe('replica');
  });

  it('keeps the scopes of concurrent requests apart', async () => {
    const [writer, reader] = await Promise.all([
      inReadScope(async () => {
        await db.query('UPDATE replica_probe SET n = n + 1');
        return origin();
      }),
      inReadScope(async () => {
        await new Promise((resolve) => setTimeout(resolve, 50));
        return origin();
      }),
    ]);
    expect({ writer, reader }).toEqual({ writer: 'primary', reader: 'replica' });
  });

  it('runs every read inside a transaction on the primary', async () => {
    const inside = await inReadScope(() =>
      db.transaction(async (transaction) => {
        const rows = await db.query<{ origin: string }>('SELECT origin FROM replica_probe', { type: QueryTypes.SELECT, transaction });
        return rows[0]!.origin;
      }),
    );
    expect(inside).toBe('primary');
  });

  it('reads on the primary throughout a job scope, before any write', async () => {
    expect(await onPrimary(() => origin())).toBe('primary');
  });

  it('reads sign-in sessions from the primary always', async () => {
    expect(await AuthSessionProbe.findByPk('replica-probe-session')).not.toBeNull();
  });
});
