/**
 * `npm run seed`: seeds the demo data (idempotent; run after `npm run migrate`).
 */
import { checkDatabase, sequelize } from '../db';
import { pendingMigrations } from '../migrate';
import { runSeeders } from '../seeders';

async function main(): Promise<void> {
  await checkDatabase();
  const pending = await pendingMigrations();
  if (pending.length > 0) throw new Error(`The database has ${pending.length} pending migration(s). Run \`npm run migrate\` first.`);
  for (const line of await runSeeders()) console.log(line);
}

main()
  .catch((err: unknown) => {
    console.error(err instanceof Error ? err.message : String(err));
    process.exitCode = 1;
  })
  .finally(() => sequelize.close());
