/**
 * Database helpers for the test global setups: start the private MariaDB through scripts/db.sh (the same
 * logic `npm start` uses), and drop, recreate and migrate a test database on it.
 */
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import mariadb from 'mariadb';
import { config } from '../../server/config';
import { ROOT } from './root';

export { ROOT };

/** Connection settings of the server's configuration (environment, then .env, then defaults). */
export const dbSettings = {
  host: config.db.host,
  port: config.db.port,
  user: config.db.user,
  password: config.db.password,
};

/** Starts the private MariaDB when it is not running and makes sure the app user exists. */
export function ensurePrivateDb(): void {
  execFileSync('bash', [join(ROOT, 'scripts', 'db.sh'), 'start'], { cwd: ROOT, stdio: ['ignore', 'inherit', 'inherit'] });
}

function ident(name: string): string {
  if (!/^[A-Za-z0-9_]+$/.test(name)) throw new Error(`Refusing to use database name "${name}": letters, digits and _ only.`);
  return `\`${name}\``;
}

/** Drops and recreates a database (the app user holds the rights on the test databases). */
export async function recreateDatabase(name: string): Promise<void> {
  const conn = await mariadb.createConnection({ ...dbSettings, connectTimeout: 5000 });
  try {
    await conn.query(`DROP DATABASE IF EXISTS ${ident(name)}`);
    await conn.query(`CREATE DATABASE ${ident(name)} CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  } finally {
    await conn.end();
  }
}
