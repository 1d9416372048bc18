/**
 * `npm run migrate` applies pending migrations; `npm run migrate -- --down` reverts the latest one
 * (`--down=N` reverts N); `--status` lists applied and pending ones.
 */
import { checkDatabase, sequelize } from '../db';
import { createMigrator, migrateDown, migrateUp } from '../migrate';

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  await checkDatabase();
  const down = args.find((a) => a === '--down' || a.startsWith('--down='));
  if (down) {
    const steps = down.includes('=') ? Number(down.split('=')[1]) : 1;
    if (!Number.isInteger(steps) || steps < 1) throw new Error('Use --down or --down=N with N a whole number of at least 1.');
    const reverted = await migrateDown(steps);
    console.log(reverted.length > 0 ? `Reverted: ${reverted.join(', ')}` : 'Nothing to revert.');
  } else if (args.includes('--status')) {
    const migrator = createMigrator();
    const executed = await migrator.executed();
    const pending = await migrator.pending();
    for (const m of executed) console.log(`applied  ${m.name}`);
    for (const m of pending) console.log(`pending  ${m.name}`);
  } else {
    const applied = await migrateUp();
    console.log(applied.length > 0 ? `Applied ${applied.length} migration(s): ${applied.join(', ')}` : 'The database schema is up to date.');
  }
}

main()
  .catch((err: unknown) => {
    console.error(err instanceof Error ? err.message : String(err));
    process.exitCode = 1;
  })
  .finally(() => sequelize.close());
