/**
 * The processes a fault or load bench runs against: a private MariaDB of its own (own datadir under
 * `.data/`, own port, so stopping it touches nobody else's), the app and workers as child processes.
 */
import { execFileSync } from 'node:child_process';
import { mkdtemp, readdir, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Sequelize } from 'sequelize';
import { ROOT } from '../../../tests/support/root';
import { freePort, startProcess, waitUntil, type ServerProcess } from '../../../tests/support/process';

export interface BenchDatabase {
  env: Record<string, string>;
  /** A connection of the bench itself, to check what the app stored. */
  sql: Sequelize;
  stop: () => void;
  start: () => void;
  close: () => Promise<void>;
}

/** Starts (or reuses) the bench's private MariaDB, creates its database and applies the migrations. */
export async function benchDatabase(name: string, port: number): Promise<BenchDatabase> {
  const env: Record<string, string> = {
    DB_DIR: join(ROOT, '.data', `mariadb-${name}`),
    DB_PORT: String(port),
    DB_NAME: `arcwright_${name}`,
    DB_HOST: '127.0.0.1',
    DB_PRIVATE: '1',
    ENV_FILE: 'none',
  };
  const db = (command: 'start' | 'stop') =>
    execFileSync('bash', [join(ROOT, 'scripts', 'db.sh'), command], { cwd: ROOT, env: { ...process.env, ...env }, stdio: ['ignore', 'ignore', 'inherit'] });
  db('start');
  execFileSync(process.execPath, ['--import', 'tsx', 'server/cli/migrate.ts'], { cwd: ROOT, env: { ...process.env, ...env, NODE_ENV: 'development' }, stdio: ['ignore', 'ignore', 'inherit'] });
  const sql = new Sequelize(env.DB_NAME!, process.env.DB_USER ?? 'arcwright', process.env.DB_PASSWORD ?? 'arcwright-local', {
    dialect: 'mariadb',
    host: '127.0.0.1',
    port,
    logging: false,
    pool: { max: 2, min: 0 },
  });
  return { env, sql, stop: () => db('stop'), start: () => db('start'), close: () => sql.close() };
}

export interface BenchApp {
  proc: ServerProcess;
  base: string;
  storageDir: string;
}

/** Starts `server/index.ts` on a free port against the bench database; resolves once it listens. */
export async function benchApp(db: BenchDatabase, extra: Record<string, string> = {}): Promise<BenchApp> {
  const port = await freePort();
  const storageDir = extra.STORAGE_DIR ?? (await mkdtemp(join(tmpdir(), 'arcwright-bench-storage-')));
  const proc = startProcess('server/index.ts', { ...db.env, PORT: String(port), HOST: '127.0.0.1', STORAGE_DIR: storageDir, WORKERS_IN_WEB: '0', LOG_LEVEL: 'warn', ...extra });
  const base = `http://127.0.0.1:${port}`;
  await waitUntil(
    `the app to answer on ${base}`,
    async () => {
      if (proc.child.exitCode !== null) throw new Error(`the app exited:\n${proc.output()}`);
      return fetch(`${base}/api/v1/health/live`).then((r) => (r.ok ? true : null), () => null);
    },
    60_000,
    200,
  );
  return { proc, base, storageDir };
}

/** Stops the app (SIGTERM, waited for) and removes its storage, then closes and stops the bench database. */
export async function tearDown(app: BenchApp | null, db: BenchDatabase): Promise<void> {
  if (app) {
    if (app.proc.child.exitCode === null) app.proc.child.kill('SIGTERM');
    await app.proc.exited;
    await rm(app.storageDir, { recursive: true, force: true });
  }
  await db.close();
  db.stop();
}

/** Pids of the direct children of `pid`, with their command lines (from /proc). */
export async function childProcesses(pid: number): Promise<{ pid: number; cmdline: string }[]> {
  const out: { pid: number; cmdline: string }[] = [];
  for (const entry of await readdir('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = await readFile(`/proc/${entry}/stat`, 'utf8');
      const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
      if (ppid === pid) out.push({ pid: Number(entry), cmdline: (await readFile(`/proc/${entry}/cmdline`, 'utf8')).replace(/\0/g, ' ').trim() });
    } catch {
      // Gone while we looked.
    }
  }
  return out;
}

/** Processes whose command line mentions `needle` (a storage folder: ffmpeg left running on its files). */
export async function processesMentioning(needle: string): Promise<number[]> {
  const out: number[] = [];
  for (const entry of await readdir('/proc')) {
    if (!/^\d+$/.test(entry) || Number(entry) === process.pid) continue;
    try {
      if ((await readFile(`/proc/${entry}/cmdline`, 'utf8')).includes(needle)) out.push(Number(entry));
    } catch {
      // Gone while we looked.
    }
  }
  return out;
}
