/**
 * The browser tests' database: the connection settings the global setup and the tests share, and a query
 * helper for the few test steps that set up a state no screen can (a flight the fit flagged, say).
 */
import mariadb from 'mariadb';

export const dbSettings = {
  host: process.env.DB_HOST ?? '127.0.0.1',
  port: Number(process.env.DB_PORT ?? 3398),
  user: process.env.DB_USER ?? 'arcwright',
  password: process.env.DB_PASSWORD ?? 'arcwright-local',
};

/** The browser tests' own database (E2E_DB_NAME). */
export function e2eDbName(): string {
  return process.env.E2E_DB_NAME ?? 'arcwright_e2e';
}

/** Runs one statement on the browser tests' database. */
export async function e2eQuery<T = unknown>(sql: string, values: unknown[] = []): Promise<T> {
  const conn = await mariadb.createConnection({ ...dbSettings, database: e2eDbName(), connectTimeout: 5000 });
  try {
    return (await conn.query(sql, values)) as T;
  } finally {
    await conn.end();
  }
}
