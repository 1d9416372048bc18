/**
 * Global setup of the unit and API tests (vitest.config.ts): unless ARCWRIGHT_SKIP_DB=1, make sure the
 * private MariaDB runs, then drop, recreate and migrate the test database (TEST_DB_NAME, default
 * `arcwright_test`). Test files share it one at a time; fixtures use unique e-mails, so no file cleans up.
 */
import { Sequelize } from 'sequelize';
import { createMigrator } from '../../server/migrate';
import { dbSettings, ensurePrivateDb, recreateDatabase } from './db';

/** Applies every migration to a database with a connection of its own. */
export async function migrateDatabase(name: string): Promise<string[]> {
  const sequelize = new Sequelize(name, dbSettings.user, dbSettings.password, {
    dialect: 'mariadb',
    host: dbSettings.host,
    port: dbSettings.port,
    logging: false,
    timezone: '+00:00',
    define: { underscored: true },
  });
  try {
    const applied = await createMigrator(sequelize).up();
    return applied.map((m) => m.name);
  } finally {
    await sequelize.close();
  }
}

export default async function setup(): Promise<void> {
  if (process.env.ARCWRIGHT_SKIP_DB === '1') return;
  if (process.env.DB_PRIVATE !== '0') ensurePrivateDb();
  // Note: named from TEST_DB_NAME directly, not config.db.name: Vitest's main process need not be in test mode.
  const name = process.env.TEST_DB_NAME ?? 'arcwright_test';
  if (name === (process.env.DB_NAME ?? 'arcwright')) {
    throw new Error(`TEST_DB_NAME (${name}) equals DB_NAME: the tests drop their database. Give them their own name.`);
  }
  await recreateDatabase(name);
  await migrateDatabase(name);
}
