/**
 * The production app as the API and page-speed benches run it: a database of the bench's own on the
 * project's MariaDB, `server/index.ts` started with NODE_ENV=production on a free port of 127.0.0.1
 * (password sign-in only, no local stand-ins), a password sign-in, and the benches' table printer.
 */
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { join } from 'node:path';
import mariadb from 'mariadb';
import { ROOT } from '../../../tests/support/root';
import { freePort } from '../../../tests/support/process';

export { freePort, ROOT };
export const HOST = '127.0.0.1';

/**
 * Starts the private MariaDB when needed, grants the app user `name` (scripts/lib/mariadb.sh) and creates the
 * database when it is missing. Points DB_NAME of this process at it before the server modules read their config.
 */
export async function ensureBenchDatabase(name: string): Promise<void> {
  if (!/^[A-Za-z0-9_]+$/.test(name)) throw new Error(`Bench database "${name}": letters, digits and _ only.`);
  process.env.DB_NAME = name;
  const { config } = await import('../../../server/config');
  if (process.env.DB_PRIVATE !== '0') {
    execFileSync('bash', [join(ROOT, 'scripts', 'db.sh'), 'start'], { cwd: ROOT, stdio: ['ignore', 'inherit', 'inherit'], env: { ...process.env, BENCH_DB_NAME: name } });
  }
  const { host, port, user, password } = config.db;
  const conn = await mariadb.createConnection({ host, port, user, password, connectTimeout: 5000 });
  try {
    await conn.query(`CREATE DATABASE IF NOT EXISTS \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  } finally {
    await conn.end();
  }
}

export interface ProductionApp {
  base: string;
  child: ChildProcess;
  output: () => string;
  stop: () => Promise<void>;
}

/** The environment of the production app on `dbName` at `port`; `extra` adds or overrides variables. */
export function productionEnv(dbName: string, port: number, extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  return {
    ...process.env,
    NODE_ENV: 'production',
    DB_NAME: dbName,
    HOST,
    PORT: String(port),
    FAKES: '0',
    // Production refuses the local OAuth stand-in's URLs; the benches sign in with a password only.
    GOOGLE_SIGNIN: '0',
    WORKERS_IN_WEB: '0',
    LOG_LEVEL: 'warn',
    SESSION_SECRET: 'bench-only-session-secret-not-for-production',
    ...extra,
  };
}

/**
 * Starts `server/index.ts` with `env` (and `nodeOptions` before it, e.g. a CPU profile) and resolves once its
 * readiness probe answers (a minute at most).
 */
export async function startProductionApp(env: NodeJS.ProcessEnv, nodeOptions: string[] = []): Promise<ProductionApp> {
  const child = spawn(process.execPath, [...nodeOptions, '--import', 'tsx', 'server/index.ts'], { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] });
  let text = '';
  child.stdout?.on('data', (d: Buffer) => (text += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (text += d.toString()));
  const output = () => text;
  const stop = async () => {
    if (child.exitCode !== null || child.signalCode !== null) return;
    child.kill('SIGTERM');
    await once(child, 'exit');
  };
  const base = `http://${HOST}:${env.PORT}`;
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`The app stopped (exit ${child.exitCode}):\n${output()}`);
    try {
      if ((await fetch(`${base}/api/v1/health`)).ok) return { base, child, output, stop };
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  await stop();
  throw new Error(`The app did not answer /api/v1/health within a minute:\n${output()}`);
}

function cookieOf(response: Response): string {
  return response.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
}

/** Signs in with a password through the API (CSRF token first) and answers the session cookie. */
export async function passwordSignIn(base: string, email: string, password: string): Promise<string> {
  const csrf = await fetch(`${base}/api/v1/auth/csrf`);
  const token = ((await csrf.json()) as { data: { csrfToken: string } }).data.csrfToken;
  const answer = await fetch(`${base}/api/v1/auth/signin`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-csrf-token': token, cookie: cookieOf(csrf) },
    body: JSON.stringify({ email, password }),
  });
  if (!answer.ok) throw new Error(`${email} could not sign in: ${answer.status} ${await answer.text()}`);
  return cookieOf(answer);
}

/** Prints a table: the first and last columns left-aligned, the figures between them right-aligned. */
export function printTable(head: string[], rows: string[][]): void {
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (cells: string[]) => cells.map((c, i) => (i === 0 || i === cells.length - 1 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join('  ');
  console.log(line(head));
  console.log(widths.map((w) => '-'.repeat(w)).join('  '));
  for (const r of rows) console.log(line(r));
}
