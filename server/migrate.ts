/**
 * Schema migrations with umzug over Sequelize's queryInterface (never `sync()`).
 * Files: `server/migrations/NNNN-<name>.ts`, each exporting `up` and `down` typed as `MigrationFn`.
 * Numbering: 0001–0099 foundation, 0100–0199 sessions/clips/flights/jobs. Applied names are kept in
 * the table `schema_migrations`.
 */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { QueryTypes, type QueryInterface, type Sequelize } from 'sequelize';
import { Umzug, type MigrationParams, type UmzugStorage } from 'umzug';
import { sequelize as defaultSequelize } from './db';
import { log } from './logger';

/** What every migration file exports: `export const up: MigrationFn = async ({ context: qi }) => {...}`. */
export type MigrationFn = (params: MigrationParams<QueryInterface>) => Promise<void>;

const MIGRATIONS_DIR = fileURLToPath(new URL('./migrations/', import.meta.url));
const TABLE = 'schema_migrations';

/** Keeps the applied migration names with plain SQL, so the bookkeeping needs no model and no sync(). */
function storage(sequelize: Sequelize): UmzugStorage<QueryInterface> {
  const ensure = () =>
    sequelize.query(
      `CREATE TABLE IF NOT EXISTS \`${TABLE}\` (name VARCHAR(255) NOT NULL PRIMARY KEY, applied_at DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4`,
    );
  return {
    async logMigration({ name }) {
      await ensure();
      await sequelize.query(`INSERT INTO \`${TABLE}\` (name) VALUES (?)`, { replacements: [name] });
    },
    async unlogMigration({ name }) {
      await ensure();
      await sequelize.query(`DELETE FROM \`${TABLE}\` WHERE name = ?`, { replacements: [name] });
    },
    async executed() {
      await ensure();
      const rows = await sequelize.query<{ name: string }>(`SELECT name FROM \`${TABLE}\` ORDER BY name`, { type: QueryTypes.SELECT });
      return rows.map((row) => row.name);
    },
  };
}

function migrationFiles(): string[] {
  return readdirSync(MIGRATIONS_DIR)
    .filter((file) => /^\d{4}-[a-z0-9-]+\.ts$/.test(file))
    .sort();
}

export function createMigrator(sequelize: Sequelize = defaultSequelize): Umzug<QueryInterface> {
  return new Umzug<QueryInterface>({
    context: sequelize.getQueryInterface(),
    storage: storage(sequelize),
    logger: undefined,
    migrations: migrationFiles().map((file) => {
      const load = async () => (await import(pathToFileURL(join(MIGRATIONS_DIR, file)).href)) as { up: MigrationFn; down: MigrationFn };
      return {
        name: file.replace(/\.ts$/, ''),
        up: async (params: MigrationParams<QueryInterface>) => (await load()).up(params),
        down: async (params: MigrationParams<QueryInterface>) => (await load()).down(params),
      };
    }),
  });
}

/** Applies every pending migration; returns the names applied. */
export async function migrateUp(sequelize: Sequelize = defaultSequelize): Promise<string[]> {
  const applied = await createMigrator(sequelize).up();
  for (const m of applied) log.info(`migration applied: ${m.name}`);
  return applied.map((m) => m.name);
}

/** Reverts the most recent `steps` migrations (default one); returns the names reverted. */
export async function migrateDown(steps = 1, sequelize: Sequelize = defaultSequelize): Promise<string[]> {
  const reverted = await createMigrator(sequelize).down({ step: steps });
  for (const m of reverted) log.info(`migration reverted: ${m.name}`);
  return reverted.map((m) => m.name);
}

/** Names of migrations not yet applied. */
export async function pendingMigrations(sequelize: Sequelize = defaultSequelize): Promise<string[]> {
  return (await createMigrator(sequelize).pending()).map((m) => m.name);
}
