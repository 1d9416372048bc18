/**
 * Every migration applies, reverts and re-applies on an empty scratch database (TEST_DB_NAME + "_migrations"),
 * so `npm run migrate -- --down` works for each step.
 */
import { QueryTypes, Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createMigrator } from '../../server/migrate';
import { dbSettings, recreateDatabase } from '../support/db';

const scratch = `${process.env.TEST_DB_NAME ?? 'arcwright_test'}_migrations`;
let sequelize: Sequelize;

async function tables(): Promise<string[]> {
  const rows = await sequelize.query<{ name: string }>(
    'SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ? ORDER BY table_name',
    { replacements: [scratch], type: QueryTypes.SELECT },
  );
  return rows.map((r) => r.name).filter((n) => n !== 'schema_migrations');
}

beforeAll(async () => {
  await recreateDatabase(scratch);
  sequelize = new Sequelize(scratch, dbSettings.user, dbSettings.password, {
    dialect: 'mariadb',
    host: dbSettings.host,
    port: dbSettings.port,
    logging: false,
    define: { underscored: true },
  });
});

afterAll(async () => {
  await sequelize.close();
});

describe('migrations', () => {
  it('applies every migration, reverts them one by one and applies them again', async () => {
    const migrator = createMigrator(sequelize);
    const all = (await migrator.pending()).map((m) => m.name);
    expect(all.slice(0, 5)).toEqual(['0001-users', '0002-clubs', '0003-memberships', '0004-athlete-profiles', '0005-auth-sessions']);
    await migrator.up();
    const full = await tables();
    expect(full).toEqual(expect.arrayContaining(['athlete_profiles', 'auth_sessions', 'clubs', 'memberships', 'users']));
    for (let i = all.length - 1; i >= 0; i -= 1) {
      const [reverted] = await migrator.down({ step: 1 });
      expect(reverted.name).toBe(all[i]);
    }
    expect(await tables()).toEqual([]);
    await migrator.up();
    expect(await tables()).toEqual(full);
    expect((await migrator.pending()).length).toBe(0);
  });

  it('creates the unique indexes the accounts rely on', async () => {
    const rows = await sequelize.query<{ table: string; index: string }>(
      `SELECT DISTINCT table_name AS \`table\`, index_name AS \`index\` FROM information_schema.statistics
       WHERE table_schema = ? AND non_unique = 0 AND index_name <> 'PRIMARY'`,
      { replacements: [scratch], type: QueryTypes.SELECT },
    );
    const names = rows.map((r) => `${r.table}.${r.index}`);
    expect(names).toEqual(
      expect.arrayContaining([
        'users.users_email_unique',
        'users.users_google_sub_unique',
        'memberships.memberships_user_club_unique',
        'athlete_profiles.athlete_profiles_club_user_unique',
      ]),
    );
  });
});
