/**
 * Page speed bench (`npm run bench lighthouse`, part of `npm run bench`): Lighthouse (from npm, mobile
 * settings: a mid-range phone on a slow 4G link, simulated) drives the machine's Chromium (CHROME_PATH,
 * default /usr/bin/chromium, through chrome-launcher) against the production build served by the app on
 * 127.0.0.1 with the demo club, and prints the performance and accessibility scores of
 * - the sign-in page: performance ≥ 90, accessibility ≥ 95;
 * - a flight report, signed in as the demo coach (the session cookie goes with every request Lighthouse
 *   makes): performance ≥ 75, accessibility ≥ 95.
 * Each page is measured LH_RUNS times (default 3) and the median run is printed, with its paint metrics
 * and the JavaScript it transferred. Nothing is downloaded; everything runs offline.
 * The client is built into `dist-bench` first (LH_CLIENT_DIR names another folder; LH_BUILD=0 keeps what is
 * there). The demo club lives in its own database (`arcwright_bench_lighthouse`, LH_DB_NAME), seeded once and
 * reused; its clips are kept in `.data/bench-lighthouse-storage`.
 * LH_REPORT_DIR=<folder> keeps every run's full Lighthouse report there (`<page>-<run>.json`, open it in a
 * Lighthouse report viewer or read its audits) to see where the time goes.
 * Nothing asserts a score: the figures depend on the machine (and on what else runs on it).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { availableParallelism, loadavg } from 'node:os';
import { join, resolve } from 'node:path';
import * as chromeLauncher from 'chrome-launcher';
import lighthouse from 'lighthouse';
import { ensureBenchDatabase, freePort, passwordSignIn, printTable, productionEnv, ROOT, startProductionApp } from './support/production-app';

const DB_NAME = process.env.LH_DB_NAME ?? 'arcwright_bench_lighthouse';
const CLIENT_DIR = resolve(ROOT, process.env.LH_CLIENT_DIR ?? 'dist-bench');
const STORAGE_DIR = join(ROOT, '.data', 'bench-lighthouse-storage');
const RUNS = Math.max(1, Number(process.env.LH_RUNS ?? 3));
const CHROME_PATH = process.env.CHROME_PATH ?? '/usr/bin/chromium';
const REPORT_DIR = process.env.LH_REPORT_DIR ? resolve(process.env.LH_REPORT_DIR) : null;

/** The demo club's coach (server/seeders/0001-demo-club.ts). */
const COACH = { email: 'coach@fennickvale.example', password: 'arcwright-demo' };

interface Page {
  name: string;
  path: string;
  signedIn: boolean;
  performance: number;
  accessibility: number;
}

interface Run {
  performance: number;
  accessibility: number;
  fcpMs: number;
  lcpMs: number;
  tbtMs: number;
  cls: number;
  scriptKiB: number;
  totalKiB: number;
  /** Accessibility audits that failed, by id. */
  failed: string[];
}

/** `node --import tsx <script>` from the repository root; throws with its output when it fails. */
function runScript(script: string, env: NodeJS.ProcessEnv): void {
  const run = spawnSync(process.execPath, ['--import', 'tsx', script], { cwd: ROOT, env, encoding: 'utf8' });
  if (run.status !== 0) throw new Error(`${script} failed for ${DB_NAME}:\n${run.stdout}\n${run.stderr}`);
}

async function api<T>(base: string, path: string, cookie: string): Promise<T> {
  const answer = await fetch(`${base}/api/v1${path}`, { headers: { cookie } });
  if (!answer.ok) throw new Error(`GET ${path} answered ${answer.status}: ${await answer.text()}`);
  return ((await answer.json()) as { data: T }).data;
}

/** The demo club's first fitted flight; the app's worker fits them after a fresh seed (a minute or two). */
async function fittedFlight(base: string, cookie: string, log: () => string): Promise<number> {
  const me = await api<{ memberships: { clubId: number }[] }>(base, '/auth/me', cookie);
  const clubId = me.memberships[0]!.clubId;
  const deadline = Date.now() + 300_000;
  while (Date.now() < deadline) {
    const flights = await api<{ id: number; latestFit: unknown }[]>(base, `/clubs/${clubId}/flights?status=fitted&pageSize=5`, cookie);
    const flight = flights.find((f) => f.latestFit !== null);
    if (flight) return flight.id;
    await new Promise((r) => setTimeout(r, 2000));
  }
  throw new Error(`No demo flight was fitted within 5 minutes:\n${log()}`);
}

/** One Lighthouse run of `url` in a fresh Chromium (no cache, no storage), mobile settings. */
async function measure(url: string, cookie: string | null, reportName: string): Promise<Run> {
  const chrome = await chromeLauncher.launch({
    chromePath: CHROME_PATH,
    chromeFlags: ['--headless=new', '--no-sandbox', '--disable-gpu', '--disable-dev-shm-usage', '--no-first-run'],
  });
  try {
    const result = await lighthouse(url, {
      port: chrome.port,
      output: 'json',
      logLevel: 'error',
      onlyCategories: ['performance', 'accessibility'],
      ...(cookie ? { extraHeaders: { Cookie: cookie } } : {}),
    });
    if (!result) throw new Error(`Lighthouse gave no result for ${url}`);
    const { lhr } = result;
    if (lhr.runtimeError) throw new Error(`Lighthouse could not load ${url}: ${lhr.runtimeError.message}`);
    if (REPORT_DIR) {
      mkdirSync(REPORT_DIR, { recursive: true });
      writeFileSync(join(REPORT_DIR, `${reportName}.json`), JSON.stringify(lhr, null, 1));
    }
    const numeric = (id: string) => lhr.audits[id]?.numericValue ?? NaN;
    const items = (lhr.audits['resource-summary']?.details as { items?: { resourceType: string; transferSize: number }[] } | undefined)?.items ?? [];
    const size = (type: string) => (items.find((i) => i.resourceType === type)?.transferSize ?? 0) / 1024;
    const a11y = lhr.categories.accessibility!;
    return {
      performance: Math.round((lhr.categories.performance!.score ?? 0) * 100),
      accessibility: Math.round((a11y.score ?? 0) * 100),
      fcpMs: numeric('first-contentful-paint'),
      lcpMs: numeric('largest-contentful-paint'),
      tbtMs: numeric('total-blocking-time'),
      cls: numeric('cumulative-layout-shift'),
      scriptKiB: size('script'),
      totalKiB: size('total'),
      failed: a11y.auditRefs.filter((ref) => ref.weight > 0 && lhr.audits[ref.id]?.score === 0).map((ref) => ref.id),
    };
  } finally {
    chrome.kill();
  }
}

/** The run with the median performance score (Lighthouse's own advice for noisy machines). */
function median(runs: Run[]): Run {
  return [...runs].sort((a, b) => a.performance - b.performance)[Math.floor(runs.length / 2)]!;
}

function verdict(score: number, target: number): string {
  return `≥ ${target} ${score >= target ? 'met' : 'MISSED'}`;
}

export async function run(): Promise<void> {
  if (!existsSync(CHROME_PATH)) throw new Error(`No Chromium at ${CHROME_PATH}: install Debian's chromium or set CHROME_PATH.`);
  if (process.env.LH_BUILD !== '0' || !existsSync(join(CLIENT_DIR, 'index.html'))) {
    execFileSync(process.execPath, [join(ROOT, 'node_modules', 'vite', 'bin', 'vite.js'), 'build', '--outDir', CLIENT_DIR, '--emptyOutDir', '--logLevel', 'warn'], {
      cwd: ROOT,
      stdio: ['ignore', 'inherit', 'inherit'],
    });
  }

  await ensureBenchDatabase(DB_NAME);
  mkdirSync(STORAGE_DIR, { recursive: true });
  const env = productionEnv(DB_NAME, await freePort(), {
    CLIENT_DIR,
    STORAGE_DIR,
    // The in-process worker fits the demo flights after the first seed.
    WORKERS_IN_WEB: '1',
    ENV_FILE: 'none',
  });
  // The seeders are idempotent: a second run finds the demo club and leaves it.
  runScript('server/cli/migrate.ts', { ...env, NODE_ENV: 'development' });
  runScript('server/cli/seed.ts', { ...env, NODE_ENV: 'development' });

  const app = await startProductionApp(env);
  const { base } = app;
  try {
    const cookie = await passwordSignIn(base, COACH.email, COACH.password);
    const flightId = await fittedFlight(base, cookie, app.output);
    const pages: Page[] = [
      { name: 'sign-in', path: '/signin', signedIn: false, performance: 90, accessibility: 95 },
      { name: 'flight report', path: `/flights/${flightId}`, signedIn: true, performance: 75, accessibility: 95 },
    ];
    console.log(
      `Lighthouse ${RUNS}× per page (median run), mobile settings, ${CHROME_PATH}; client ${CLIENT_DIR.replace(`${ROOT}/`, '')}; ` +
        `load average ${loadavg()[0]!.toFixed(1)} on ${availableParallelism()} cores before the run (the scores hold only for a machine otherwise idle)`,
    );
    const rows: string[][] = [];
    const failures: string[] = [];
    for (const page of pages) {
      const runs: Run[] = [];
      for (let i = 0; i < RUNS; i++) {
        const measureOnce = () => measure(`${base}${page.path}`, page.signedIn ? cookie : null, `${page.name.replace(/\W+/g, '-')}-${i + 1}`);
        // On a busy machine Lighthouse now and then gives up on a page (a protocol timeout): one more try.
        runs.push(
          await measureOnce().catch((err: unknown) => {
            console.log(`${page.name}, run ${i + 1}: ${err instanceof Error ? err.message : String(err)}; trying again`);
            return measureOnce();
          }),
        );
      }
      const m = median(runs);
      rows.push([
        page.name,
        String(m.performance),
        runs.map((r) => r.performance).join('/'),
        String(m.accessibility),
        (m.fcpMs / 1000).toFixed(1),
        (m.lcpMs / 1000).toFixed(1),
        m.tbtMs.toFixed(0),
        m.cls.toFixed(3),
        m.scriptKiB.toFixed(0),
        m.totalKiB.toFixed(0),
        `perf ${verdict(m.performance, page.performance)}, a11y ${verdict(m.accessibility, page.accessibility)}`,
      ]);
      if (m.failed.length > 0) failures.push(`${page.name}: accessibility audits failed: ${m.failed.join(', ')}`);
    }
    printTable(['page', 'perf', 'runs', 'a11y', 'FCP s', 'LCP s', 'TBT ms', 'CLS', 'JS KiB', 'all KiB', 'target'], rows);
    for (const line of failures) console.log(line);
  } finally {
    await app.stop();
  }
}
