/**
 * The one Sequelize instance (MariaDB dialect) and a transaction helper.
 * Models are initialised on it by `server/models/index.ts`; the schema changes only through migrations.
 */
import { Sequelize, type Transaction } from 'sequelize';
import { config } from './config';
import { log } from './logger';

/**
 * Shared naming convention: tables snake_case plural, columns snake_case (`underscored`),
 * attributes camelCase in TypeScript. Timestamps are `created_at`/`updated_at`, stored in UTC.
 */
export const sequelize = new Sequelize(config.db.name, config.db.user, config.db.password, {
  dialect: 'mariadb',
  host: config.db.host,
  port: config.db.port,
  logging: config.db.logSql ? (sql: string) => log.debug(sql) : false,
  timezone: '+00:00',
  define: { underscored: true },
  pool: { max: config.db.poolMax, min: 0, idle: 10_000, acquire: 20_000 },
  dialectOptions: { connectTimeout: 5_000 },
});

/** Runs `work` in a managed transaction: committed when it resolves, rolled back when it throws. */
export function withTransaction<T>(work: (transaction: Transaction) => Promise<T>): Promise<T> {
  return sequelize.transaction(work);
}

/**
 * Checks the connection and explains what to do when the database cannot be reached.
 * @throws Error with an actionable message.
 */
export async function checkDatabase(): Promise<void> {
  try {
    await sequelize.authenticate();
  } catch (err) {
    const reason = err instanceof Error ? err.message : String(err);
    throw new Error(
      `Cannot reach MariaDB at ${config.db.host}:${config.db.port} (database "${config.db.name}", user "${config.db.user}"): ${reason}. ` +
        'Start the private database with `npm run db:start` (or `npm start`), or set DB_HOST/DB_PORT/DB_USER/DB_PASSWORD.',
    );
  }
}
