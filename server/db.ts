/**
 * The one Sequelize instance (MariaDB dialect, with optional read replicas: see `db-routing.ts`) and a transaction helper.
 * Models are initialised on it by `server/models/index.ts`; the schema changes only through migrations.
 */
import { Sequelize, Transaction, type Options } from 'sequelize';
import { config } from './config';
import { isLockConflict } from './db-errors';
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

export interface TransactionOptions {
  /**
   * READ COMMITTED takes no gap locks, so writers that delete and re-insert the rows of *different*
   * parents (the points of two flights, the calibrations of two clips) do not deadlock on the gap between
   * them; the default is the server's REPEATABLE READ.
   */
  readCommitted?: boolean;
  /** Runs after a lost lock conflict, before `work` runs again (undo what `work` did outside the database). */
  beforeRetry?: () => Promise<void> | void;
}

/** How often a transaction that lost a lock conflict runs again before the conflict reaches the caller. */
export const LOCK_CONFLICT_RETRIES = 4;

/**
 * Runs `work` in a managed transaction: committed when it resolves, rolled back when it throws. A
 * transaction that loses a deadlock or a lock wait runs again (up to LOCK_CONFLICT_RETRIES times, after a
 * short random pause), so `work` must do nothing outside the database that cannot be repeated, or undo it
 * in `beforeRetry`.
 */
export async function withTransaction<T>(work: (transaction: Transaction) => Promise<T>, options: TransactionOptions = {}): Promise<T> {
  const settings = options.readCommitted ? { isolationLevel: Transaction.ISOLATION_LEVELS.READ_COMMITTED } : {};
  for (let attempt = 0; ; attempt += 1) {
    try {
      return await sequelize.transaction(settings, work);
    } catch (err) {
      if (!isLockConflict(err) || attempt >= LOCK_CONFLICT_RETRIES) throw err;
      log.debug('A transaction lost a lock conflict; running it again', { attempt: attempt + 1 });
      await options.beforeRetry?.();
      await new Promise((resolve) => setTimeout(resolve, 5 + Math.random() * 20 * 2 ** attempt));
    }
  }
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
