/**
 * Global setup of the browser tests (vitest.e2e.config.ts): a fresh database `arcwright_e2e` (E2E_DB_NAME)
 * migrated and seeded with the demo club, then the fakes (OAuth stand-in, payment provider, SMTP sink) and the
 * app (serving the built client from dist/) started as child processes on free ports (E2E_PORT default 4790,
 * E2E_OAUTH_PORT default 4791, E2E_PAYMENT_PORT default 4792, E2E_SMTP_PORT default 4794, E2E_MAILBOX_PORT
 * default 4795; the payment fake's webhooks go to the app).
 * The app's URL is provided to tests as `inject('baseUrl')`, set as E2E_BASE_URL and written to
 * test-results/e2e-base-url.txt. Server output goes to test-results/e2e-server.log. Teardown stops both.
 */
import { execFileSync, spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createWriteStream, existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import mariadb from 'mariadb';
import type { TestProject } from 'vitest/node';
import { dbSettings, e2eDbName } from './support/db';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
  }
}

const HOST = '127.0.0.1';
const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
// The built client to serve; parallel local runs may build into their own folder (vite build --outDir).
const clientDir = process.env.E2E_CLIENT_DIR ? join(ROOT, process.env.E2E_CLIENT_DIR) : join(ROOT, 'dist');

// Note: this project (tsconfig.e2e.json) cannot import tests/support, so the two database steps are repeated here.

/** Starts the private MariaDB when needed, with the same script as npm start. */
function ensurePrivateDb(): void {
  execFileSync('bash', [join(ROOT, 'scripts', 'db.sh'), 'start'], { cwd: ROOT, stdio: ['ignore', 'inherit', 'inherit'] });
}

async function recreateDatabase(name: string): Promise<void> {
  if (!/^[A-Za-z0-9_]+$/.test(name)) throw new Error(`Refusing to use database name "${name}": letters, digits and _ only.`);
  const conn = await mariadb.createConnection({ ...dbSettings, connectTimeout: 5000 });
  try {
    await conn.query(`DROP DATABASE IF EXISTS \`${name}\``);
    await conn.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  } finally {
    await conn.end();
  }
}

function portIsFree(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const server = createServer();
    server.once('error', () => resolve(false));
    server.listen(port, HOST, () => server.close(() => resolve(true)));
  });
}

/** The preferred port when free, else one the system picks. */
async function freePort(preferred: number): Promise<number> {
  if (await portIsFree(preferred)) return preferred;
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, HOST, () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

async function waitForHealth(url: string, child: ChildProcess, seconds: number): Promise<void> {
  const deadline = Date.now() + seconds * 1000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`The process for ${url} exited with code ${child.exitCode}; see test-results/e2e-server.log.`);
    try {
      const res = await fetch(url);
      if (res.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${url} did not answer within ${seconds} s; see test-results/e2e-server.log.`);
}

function stop(child: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) {
      resolve();
      return;
    }
    const timer = setTimeout(() => child.kill('SIGKILL'), 5000);
    child.once('exit', () => {
      clearTimeout(timer);
      resolve();
    });
    child.kill('SIGTERM');
  });
}

export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const resultsDir = join(ROOT, 'test-results');
  mkdirSync(resultsDir, { recursive: true });
  if (!existsSync(join(clientDir, 'index.html'))) {
    throw new Error('dist/index.html is missing: build the client first with `npx vite build` (npm test does it).');
  }
  if (process.env.ARCWRIGHT_SKIP_DB !== '1' && process.env.DB_PRIVATE !== '0') ensurePrivateDb();
  const dbName = e2eDbName();
  if (dbName === (process.env.DB_NAME ?? 'arcwright')) {
    throw new Error(`E2E_DB_NAME (${dbName}) equals DB_NAME: the browser tests drop their database. Give them their own name.`);
  }
  await recreateDatabase(dbName);

  const appPort = await freePort(Number(process.env.E2E_PORT ?? 4790));
  const oauthPort = await freePort(Number(process.env.E2E_OAUTH_PORT ?? 4791));
  const smtpPort = await freePort(Number(process.env.E2E_SMTP_PORT ?? 4794));
  const mailboxPort = await freePort(Number(process.env.E2E_MAILBOX_PORT ?? 4795));
  const paymentPort = await freePort(Number(process.env.E2E_PAYMENT_PORT ?? 4792));
  const baseUrl = `http://${HOST}:${appPort}`;
  const oauthBase = `http://${HOST}:${oauthPort}`;
  const paymentBase = `http://${HOST}:${paymentPort}`;

  // The children are ordinary servers, not Vitest workers: drop Vitest's variables so they use DB_NAME.
  const env: NodeJS.ProcessEnv = Object.fromEntries(Object.entries(process.env).filter(([key]) => !key.startsWith('VITEST')));
  Object.assign(env, {
    // The local stand-ins run beside it, which a production process refuses (server/startup-checks.ts).
    NODE_ENV: 'development',
    HOST,
    PORT: String(appPort),
    DB_HOST: dbSettings.host,
    DB_PORT: String(dbSettings.port),
    DB_USER: dbSettings.user,
    DB_PASSWORD: dbSettings.password,
    DB_NAME: dbName,
    CLIENT_DIR: clientDir,
    STORAGE_DIR: join(ROOT, '.data', 'e2e-storage'),
    OAUTH_FAKE_PORT: String(oauthPort),
    FAKES: '1',
    SMTP_FAKE_PORT: String(smtpPort),
    MAILBOX_FAKE_PORT: String(mailboxPort),
    SMTP_HOST: HOST,
    SMTP_PORT: String(smtpPort),
    APP_URL: baseUrl,
    GOOGLE_SIGNIN: '1',
    GOOGLE_AUTH_URL: `${oauthBase}/authorize`,
    GOOGLE_TOKEN_URL: `${oauthBase}/token`,
    GOOGLE_USERINFO_URL: `${oauthBase}/userinfo`,
    // A cheaper scrypt than the production default keeps the many sign-ins of the browser tests quick.
    PASSWORD_SCRYPT_LOG_N: process.env.PASSWORD_SCRYPT_LOG_N ?? '14',
    GOOGLE_CALLBACK_URL: `${baseUrl}/api/v1/auth/google/callback`,
    PAYMENT_FAKE_PORT: String(paymentPort),
    PAYMENT_API_HOST: HOST,
    PAYMENT_API_PORT: String(paymentPort),
    PAYMENT_API_PROTOCOL: 'http',
    PAYMENT_WEBHOOK_URL: `${baseUrl}/api/v1/billing/webhook`,
    PUBLIC_URL: '',
    SIGNUP_RATE_LIMIT_MAX: '1000',
    LOG_LEVEL: process.env.E2E_LOG_LEVEL ?? 'warn',
    // Everything the servers need is set here; a developer's .env must not change the test setup.
    ENV_FILE: 'none',
  });

  for (const script of ['server/cli/migrate.ts', 'server/cli/seed.ts']) {
    const run = spawnSync(process.execPath, ['--import', 'tsx', script], { cwd: ROOT, env, encoding: 'utf8' });
    if (run.status !== 0) throw new Error(`${script} failed for ${dbName}:\n${run.stdout}\n${run.stderr}`);
  }

  const log = createWriteStream(join(resultsDir, 'e2e-server.log'), { flags: 'w' });
  const children: ChildProcess[] = [];
  const start = (script: string) => {
    const child = spawn(process.execPath, ['--import', 'tsx', script], { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] });
    child.stdout?.pipe(log, { end: false });
    child.stderr?.pipe(log, { end: false });
    children.push(child);
    return child;
  };
  const teardown = async () => {
    await Promise.all(children.map(stop));
    log.end();
  };

  try {
    const fakes = start('server/fakes/run.ts');
    await waitForHealth(`${oauthBase}/health`, fakes, 30);
    await waitForHealth(`http://${HOST}:${mailboxPort}/health`, fakes, 30);
    await waitForHealth(`${paymentBase}/health`, fakes, 30);
    const app = start('server/index.ts');
    await waitForHealth(`${baseUrl}/api/v1/health`, app, 60);
  } catch (err) {
    await teardown();
    throw err;
  }

  process.env.E2E_BASE_URL = baseUrl;
  writeFileSync(join(resultsDir, 'e2e-base-url.txt'), `${baseUrl}\n`);
  project.provide('baseUrl', baseUrl);
  return teardown;
}
