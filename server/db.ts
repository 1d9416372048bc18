/**
 * The one Sequelize instance (MariaDB dialect, with optional read replicas: see `db-routing.ts`) and a transaction helper.
 * Models are initialised on it by `server/models/index.ts`; the schema changes only through migrations.
 */
import { Sequelize, type Options, type Transaction } from 'sequelize';
import { config } from './config';
import { installReadRouting } from './db-routing';
import { log } from './logger';

/** Connection settings of one database server. */
export interface DbServer {
  host: string;
  port: number;
  username: string;
  password: string;
  /** Another database name than the primary's (tests use one on the same server as a stand-in replica). */
  database?: string;
}

/**
 * The Sequelize options for the configured servers: the primary alone, or the primary for writes and the
 * replicas (`DB_REPLICAS`) for plain reads, each with a pool of `DB_POOL_MAX` connections per process.
 *
 * Shared naming convention: tables snake_case plural, columns snake_case (`underscored`),
 * attributes camelCase in TypeScript. Timestamps are `created_at`/`updated_at`, stored in UTC.
 */
export function sequelizeOptions(primary: DbServer, replicas: DbServer[], pool: { max: number; min: number; idleMs: number; acquireMs: number }): Options {
  return {
    dialect: 'mariadb',
    host: primary.host,
    port: primary.port,
    logging: config.db.logSql ? (sql: string) => log.debug(sql) : false,
    timezone: '+00:00',
    define: { underscored: true },
    pool: { max: pool.max, min: pool.min, idle: pool.idleMs, acquire: pool.acquireMs },
    dialectOptions: { connectTimeout: 5_000 },
    ...(replicas.length > 0 ? { replication: { write: primary, read: replicas } } : {}),
  };
}

const primaryServer: DbServer = { host: config.db.host, port: config.db.port, username: config.db.user, password: config.db.password };

export const sequelize = new Sequelize(
  config.db.name,
  config.db.user,
  config.db.password,
  sequelizeOptions(primaryServer, config.db.replicas, config.db.pool),
);
installReadRouting(sequelize);

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
