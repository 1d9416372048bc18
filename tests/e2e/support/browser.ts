/**
 * Browser-test support: Debian's Chromium driven by playwright-core (never `playwright install`),
 * the base URL of the server the e2e global setup started, screenshots as test artefacts, and the demo sign-ins.
 */
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { expect, inject } from 'vitest';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
  }
}

/** Chromium installed by apt (package `chromium`). */
export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

/**
 * As root the sandbox cannot be used; the machine has no network beyond its package registries,
 * so every background fetch of the browser is switched off.
 */
export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-dev-shm-usage',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];

export const SCREENSHOT_DIR = resolve('test-results', 'screenshots');
const BASE_URL_FILE = resolve('test-results', 'e2e-base-url.txt');

/** The demo club's sign-ins (seeded by the server; see the contract). */
export const DEMO_PASSWORD = 'arcwright-demo';
export const DEMO_USERS = {
  admin: { email: 'admin@fennickvale.example', name: 'Maren Holloway' },
  coach: { email: 'coach@fennickvale.example', name: 'Teodor Quill' },
  athlete: { email: 'athlete@fennickvale.example', name: 'Isla Brackwater' },
} as const;
export const DEMO_CLUB = 'Fennick Vale Sporting Club';

/** The app's URL: vitest's `inject('baseUrl')` from the global setup, else the file it writes. */
export function baseUrl(): string {
  let injected: string | undefined;
  try {
    injected = inject('baseUrl');
  } catch {
    injected = undefined;
  }
  if (injected) return injected.replace(/\/$/, '');
  if (process.env.E2E_BASE_URL) return process.env.E2E_BASE_URL.replace(/\/$/, '');
  if (existsSync(BASE_URL_FILE)) return readFileSync(BASE_URL_FILE, 'utf8').trim().replace(/\/$/, '');
  throw new Error(
    `No base URL for the browser tests: run them with "npx vitest run --config vitest.e2e.config.ts" (its global setup starts the app), or write the app's URL into ${BASE_URL_FILE}.`,
  );
}

export async function launchBrowser(): Promise<Browser> {
  if (!existsSync(CHROMIUM_PATH)) {
    throw new Error(`Chromium is not at ${CHROMIUM_PATH}. Install it with "apt-get install -y chromium" or set CHROMIUM_PATH.`);
  }
  return chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS, headless: true });
}

/** A fresh context (no cookies, no storage) at the app's base URL. */
export async function newContext(browser: Browser): Promise<BrowserContext> {
  const context = await browser.newContext({
    baseURL: baseUrl(),
    viewport: { width: 1366, height: 860 },
    deviceScaleFactor: 1,
    locale: 'en-GB',
    timezoneId: 'Europe/London',
    reducedMotion: 'reduce',
  });
  context.setDefaultTimeout(15000);
  return context;
}

/** A page of a fresh context whose charts draw without animation (for screenshots of finished charts), with its errors collected. */
export async function openChartPage(browser: Browser): Promise<{ context: BrowserContext; page: Page; errors: string[] }> {
  const context = await newContext(browser);
  // src/components/charts/echarts-setup.ts reads this flag.
  await context.addInitScript(() => {
    (window as unknown as { __ARCWRIGHT_NO_ANIMATION__: boolean }).__ARCWRIGHT_NO_ANIMATION__ = true;
  });
  const page = await context.newPage();
  return { context, page, errors: collectPageErrors(page) };
}

/** Collects uncaught page errors, so a test can assert the app threw none. */
export function collectPageErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (error) => errors.push(error.message));
  return errors;
}

/**
 * Runs `run` on a page of a fresh context, with the page errors collected; a failure keeps a screenshot of the
 * page as it was (`failed-<test name>.png`) to read beside the error.
 */
export async function withPage(browser: Browser, run: (page: Page, errors: string[]) => Promise<void>): Promise<void> {
  const context = await newContext(browser);
  const page = await context.newPage();
  const errors = collectPageErrors(page);
  try {
    await run(page, errors);
  } catch (error) {
    await page.screenshot({ path: `${SCREENSHOT_DIR}/failed-${expect.getState().currentTestName?.replace(/\W+/g, '-').slice(-80)}.png` }).catch(() => undefined);
    throw error;
  } finally {
    await context.close();
  }
}

/**
 * Waits until the page is still: fonts loaded, no network in flight, no skeleton left, and any ECharts
 * animation (about a second) finished.
 */
export async function settle(page: Page): Promise<void> {
  await page.waitForLoadState('networkidle');
  await page.evaluate(async () => {
    await document.fonts.ready;
  });
  await page.locator('.p-skeleton').first().waitFor({ state: 'detached', timeout: 10000 }).catch(() => undefined);
  if ((await page.locator('[_echarts_instance_]').count()) > 0) await page.waitForTimeout(1200);
  // Two frames so that layout after the last change is painted.
  await page.evaluate(() => new Promise<void>((done) => requestAnimationFrame(() => requestAnimationFrame(() => done()))));
}

/** Saves `test-results/screenshots/NAME.png` after the page settled; returns its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await settle(page);
  const path = join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path, fullPage: true, animations: 'disabled' });
  return path;
}

/** Signs in through the form and waits for the shell. */
export async function signIn(page: Page, email: string, password: string = DEMO_PASSWORD): Promise<void> {
  await page.goto('/signin');
  await page.getByLabel('E-mail').fill(email);
  await page.locator('#signin-password').fill(password);
  await page.getByTestId('signin-submit').click();
  await page.getByTestId('rail').waitFor();
}

/** Signs out through the rail and waits for the sign-in page. */
export async function signOut(page: Page): Promise<void> {
  await page.getByTestId('sign-out').click();
  await page.waitForURL(/\/signin/);
  await page.getByTestId('signin-form').waitFor();
}

/** The route names of the rail's entries, top to bottom. */
export async function railEntries(page: Page): Promise<string[]> {
  const ids = await page.locator('[data-testid="rail"] a[data-testid^="rail-"]').evaluateAll((links) =>
    links.map((link) => link.getAttribute('data-testid') ?? ''),
  );
  return ids.map((id) => id.replace(/^rail-/, ''));
}

