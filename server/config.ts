/**
 * Configuration from the environment, read once at start-up.
 * Every variable is documented in `.env.example`; the defaults serve the single-machine case
 * (`npm start` on 127.0.0.1 with the private MariaDB of `scripts/lib/mariadb.sh`).
 */
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { availableParallelism } from 'node:os';

// A `.env` in the working directory fills in variables the real environment does not set (Node's loader
// never overrides), so CI and scripts can still pass their own values. ENV_FILE=none skips it.
const envFileSetting = process.env.ENV_FILE ?? '.env';
if (envFileSetting !== 'none') {
  const envFile = resolve(process.cwd(), envFileSetting);
  if (existsSync(envFile)) process.loadEnvFile(envFile);
}

const env = process.env;

function str(name: string, fallback: string): string {
  const value = env[name];
  return value === undefined || value === '' ? fallback : value;
}

function int(name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const value = Number(raw);
  if (!Number.isInteger(value) || value < 0) {
    throw new Error(`Environment variable ${name} must be a whole number >= 0 (got "${raw}"). Fix it in .env or the environment.`);
  }
  return value;
}

function flag(name: string, fallback: boolean): boolean {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  return !['0', 'false', 'no', 'off'].includes(raw.toLowerCase());
}

function protocol(name: string, fallback: 'http' | 'https'): 'http' | 'https' {
  const value = str(name, fallback);
  if (value !== 'http' && value !== 'https') {
    throw new Error(`Environment variable ${name} must be http or https (got "${value}"). Fix it in .env or the environment.`);
  }
  return value;
}

/** Parses DB_REPLICAS (`db-r1:3306,db-r2`) into connection settings. */
function replicaList(raw: string, defaultPort: number, username: string, password: string) {
  return raw
    .split(',')
    .map((part) => part.trim())
    .filter((part) => part !== '')
    .map((part) => {
      const match = /^([^:\s]+)(?::(\d+))?$/.exec(part);
      if (!match) throw new Error(`DB_REPLICAS must list host or host:port separated by commas (got "${part}"). Fix it in .env or the environment.`);
      return { host: match[1]!, port: match[2] ? Number(match[2]) : defaultPort, username, password };
    });
}

function storageDriver(): 'local' | 's3' {
  const value = str('STORAGE_DRIVER', 'local');
  if (value !== 'local' && value !== 's3') {
    throw new Error(`Environment variable STORAGE_DRIVER must be local or s3 (got "${value}"). Fix it in .env or the environment.`);
  }
  return value;
}

const nodeEnv = str('NODE_ENV', 'development');
// Vitest sets VITEST=true in its workers; either signal puts the server in test mode.
const isTest = nodeEnv === 'test' || env.VITEST === 'true';
const host = str('HOST', '127.0.0.1');
const port = int('PORT', 4780);
const oauthFakePort = int('OAUTH_FAKE_PORT', 4781);
const oauthFakeBase = `http://127.0.0.1:${oauthFakePort}`;
const smtpFakePort = int('SMTP_FAKE_PORT', 4783);
const publicUrl = str('PUBLIC_URL', '');
const paymentFakePort = int('PAYMENT_FAKE_PORT', 4782);
const dataDir = resolve(process.cwd(), str('DATA_DIR', '.data'));

function webProcessCount(value: string | undefined): number {
  if (value === undefined || value.trim() === '') return 1;
  if (value.trim() === 'auto') return availableParallelism();
  const n = Number(value);
  if (!Number.isInteger(n) || n < 1 || n > 64) {
    throw new Error(`WEB_PROCESSES="${value}" is not a number of processes: give a whole number from 1 to 64, or auto (one per core).`);
  }
  return n;
}

/** The development session secret; fine on loopback, replaced through SESSION_SECRET anywhere else. */
export const DEFAULT_SESSION_SECRET = 'arcwright-local-session-secret-change-me';

export const config = {
  nodeEnv,
  isTest,
  isProduction: nodeEnv === 'production',
  host,
  port,
  /** Where the built client lives (served with an SPA fallback). Relative paths resolve from the working directory. */
  clientDir: resolve(process.cwd(), str('CLIENT_DIR', 'dist')),
  /** Prefix for redirects after Google sign-in; empty keeps them relative to the host that called back. */
  publicUrl,
  logLevel: str('LOG_LEVEL', isTest ? 'error' : 'info'),
  dataDir,
  db: {
    host: str('DB_HOST', '127.0.0.1'),
    port: int('DB_PORT', 3398),
    // Note: under Vitest the API tests always use their own database, whatever DB_NAME says,
    // so a stray .env can never point the test suite at the development data.
    name: isTest ? str('TEST_DB_NAME', 'arcwright_test') : str('DB_NAME', 'arcwright'),
    user: str('DB_USER', 'arcwright'),
    password: str('DB_PASSWORD', 'arcwright-local'),
    /**
     * Read replicas, `host[:port]` separated by commas (empty: every query goes to the primary). They share the
     * primary's database name and, unless DB_REPLICA_USER / DB_REPLICA_PASSWORD say otherwise, its user.
     */
    replicas: replicaList(str('DB_REPLICAS', ''), int('DB_PORT', 3398), str('DB_REPLICA_USER', str('DB_USER', 'arcwright')), str('DB_REPLICA_PASSWORD', str('DB_PASSWORD', 'arcwright-local'))),
    /**
     * Connections per pool and process: the primary's pool, and the replicas' pool when there are replicas, each
     * hold at most DB_POOL_MAX. A worker needs WORKER_CONCURRENCY + 2 (job, lease renewal, claim).
     */
    pool: {
      max: Math.max(1, int('DB_POOL_MAX', 10)),
      min: int('DB_POOL_MIN', 0),
      idleMs: int('DB_POOL_IDLE_SECONDS', 10) * 1000,
      acquireMs: int('DB_POOL_ACQUIRE_SECONDS', 20) * 1000,
    },
    logSql: flag('DB_LOG_SQL', false),
  },
  session: {
    secret: str('SESSION_SECRET', DEFAULT_SESSION_SECRET),
    cookieName: str('SESSION_COOKIE_NAME', 'arcwright.sid'),
    cookieSecure: flag('COOKIE_SECURE', false),
    maxAgeMs: int('SESSION_MAX_AGE_HOURS', 24 * 14) * 3600 * 1000,
  },
  rateLimit: {
    signinWindowMs: int('SIGNIN_RATE_LIMIT_WINDOW_MINUTES', 15) * 60 * 1000,
    signinMax: int('SIGNIN_RATE_LIMIT_MAX', 10),
    /** Failed sign-ins per IP address across all e-mails, in the same window. */
    signinAddressMax: int('SIGNIN_ADDRESS_RATE_LIMIT_MAX', 20),
    signupWindowMs: int('SIGNUP_RATE_LIMIT_WINDOW_MINUTES', 60) * 60 * 1000,
    signupMax: int('SIGNUP_RATE_LIMIT_MAX', 30),
    resetWindowMs: int('PASSWORD_RESET_RATE_LIMIT_WINDOW_MINUTES', 15) * 60 * 1000,
    resetMax: int('PASSWORD_RESET_RATE_LIMIT_MAX', 5),
  },
  /** Number of reverse proxies in front of the app (0 when it listens directly), for req.ip. */
  trustProxy: int('TRUST_PROXY', 0),
  fakes: {
    enabled: flag('FAKES', true),
    oauthPort: oauthFakePort,
    /** The invented person the OAuth fake approves when no `login_hint` is given. */
    oauthDefaultEmail: str('OAUTH_FAKE_EMAIL', 'wren.ashdown@fennickvale.example'),
    oauthDefaultName: str('OAUTH_FAKE_NAME', 'Wren Ashdown'),
    /** SMTP port of the local mail sink (server/fakes/smtp.ts). */
    smtpPort: smtpFakePort,
    /** HTTP port where the sink lists what it received; the app's /dev/mailbox reads it. */
    mailboxPort: int('MAILBOX_FAKE_PORT', 4784),
    /** Port of the payment-provider fake (server/fakes/payment.ts). */
    paymentPort: paymentFakePort,
  },
  /** Outgoing e-mail (invitations, password reset) over SMTP; the defaults reach the local sink. */
  mail: {
    host: str('SMTP_HOST', '127.0.0.1'),
    port: int('SMTP_PORT', smtpFakePort),
    /** True for implicit TLS (port 465 usually); false lets STARTTLS be negotiated when offered. */
    secure: flag('SMTP_SECURE', false),
    user: str('SMTP_USER', ''),
    password: str('SMTP_PASSWORD', ''),
    from: str('MAIL_FROM', 'Arcwright <no-reply@arcwright.example>'),
    /** Where links in e-mails point: the address people open the app at. */
    appUrl: str('APP_URL', publicUrl || `http://${host}:${port}`).replace(/\/+$/, ''),
  },
  /**
   * The payment provider, reached through its SDK. The defaults point at the local fake
   * (server/fakes/payment.ts); production sets the provider's host, port 443, https and real keys.
   */
  payment: {
    apiHost: str('PAYMENT_API_HOST', '127.0.0.1'),
    apiPort: int('PAYMENT_API_PORT', paymentFakePort),
    apiProtocol: protocol('PAYMENT_API_PROTOCOL', 'http'),
    secretKey: str('PAYMENT_SECRET_KEY', 'sk_test_arcwright_local'),
    /** Signs the provider's webhooks; the fake signs with the same value. */
    webhookSecret: str('PAYMENT_WEBHOOK_SECRET', 'whsec_arcwright_local_development_secret'),
    /** Where the fake delivers its webhooks (the app's webhook endpoint). */
    webhookUrl: str('PAYMENT_WEBHOOK_URL', `http://${host}:${port}/api/v1/billing/webhook`),
    /** Oldest webhook signature accepted, in seconds (the SDK's default is 300). */
    webhookToleranceSeconds: int('PAYMENT_WEBHOOK_TOLERANCE_SECONDS', 300),
  },
  billing: {
    /** A new club's free trial: its length and athlete seats. */
    trialDays: int('TRIAL_DAYS', 14),
    trialAthleteSeats: int('TRIAL_ATHLETE_SEATS', 10),
  },
  google: {
    enabled: flag('GOOGLE_SIGNIN', true),
    clientId: str('GOOGLE_CLIENT_ID', 'arcwright-local-client'),
    clientSecret: str('GOOGLE_CLIENT_SECRET', 'arcwright-local-secret'),
    authUrl: str('GOOGLE_AUTH_URL', `${oauthFakeBase}/authorize`),
    tokenUrl: str('GOOGLE_TOKEN_URL', `${oauthFakeBase}/token`),
    userinfoUrl: str('GOOGLE_USERINFO_URL', `${oauthFakeBase}/userinfo`),
    callbackUrl: str('GOOGLE_CALLBACK_URL', `${(publicUrl || `http://${host}:${port}`).replace(/\/+$/, '')}/api/v1/auth/google/callback`),
  },
  passwords: {
    /**
     * scrypt cost as log2(N) (`PASSWORD_SCRYPT_LOG_N`, default 17: OWASP's N = 2^17 with r = 8, p = 1).
     * Tests lower it for speed; a stored hash of another cost is re-hashed at its next sign-in.
     */
    scryptLogN: int('PASSWORD_SCRYPT_LOG_N', 17),
  },
  storage: {
    /** `local` (files under STORAGE_DIR, the default) or `s3` (an S3-compatible bucket; STORAGE_DIR then holds only scratch). */
    driver: storageDriver(),
    dir: resolve(process.cwd(), str('STORAGE_DIR', '.data/storage')),
    s3: {
      /** Empty for the provider's own endpoint; `http://127.0.0.1:9000` and the like for a self-hosted server. */
      endpoint: str('S3_ENDPOINT', ''),
      region: str('S3_REGION', 'us-east-1'),
      bucket: str('S3_BUCKET', 'arcwright-clips'),
      /** Empty keys leave the SDK's default chain (environment, instance or task role). */
      accessKeyId: str('S3_ACCESS_KEY_ID', ''),
      secretAccessKey: str('S3_SECRET_ACCESS_KEY', ''),
      forcePathStyle: flag('S3_FORCE_PATH_STYLE', true),
      /** Part size of multipart uploads in MiB (at least 5); parts in flight per upload. */
      partSizeBytes: int('S3_PART_MIB', 8) * 1024 * 1024,
      queueSize: int('S3_UPLOAD_QUEUE', 4),
      /** Create the bucket at start when it is missing (self-hosted servers that start empty). */
      createBucket: flag('S3_CREATE_BUCKET', false),
    },
  },
  uploads: {
    maxBytes: int('UPLOAD_MAX_BYTES', 1024 * 1024 * 1024),
    /** How long after its creation an unfinished resumable upload is kept; then it answers 410 and its bytes are removed. */
    resumableExpiryMs: int('UPLOAD_RESUME_HOURS', 24) * 3600 * 1000,
    /** How often the web process removes expired resumable uploads. */
    resumableSweepMs: int('UPLOAD_SWEEP_MINUTES', 15) * 60 * 1000,
  },
  /**
   * Web processes on this machine sharing the port (`WEB_PROCESSES`, default 1; server/web-processes.ts). More
   * than one lets the app use more than one core; `auto` takes one per core.
   */
  webProcesses: webProcessCount(process.env.WEB_PROCESSES),
  shutdown: {
    /**
     * On SIGTERM, how long requests in flight (uploads included) and running jobs may take before they are
     * cut (`SHUTDOWN_GRACE_MS`, default 25 s). Compose's stop_grace_period must be longer.
     */
    graceMs: int('SHUTDOWN_GRACE_MS', 25_000),
  },
};

export type Config = typeof config;
