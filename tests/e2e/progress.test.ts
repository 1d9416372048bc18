import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { collectPageErrors, DEMO_USERS, launchBrowser, newContext, screenshot, signIn } from './support/browser';

/**
 * The Session report and Progress in the browser, on the demo club (seeded by the global setup; its worker fits the
 * demo flights): a coach opens a session's report and an athlete's progress; the athlete sees only her own.
 */

const FIT_WAIT_MS = 60000;

interface FlightBrief {
  id: number;
  sessionId: number;
  status: string;
  athleteName: string;
}

async function openPage(browser: Browser): Promise<{ context: BrowserContext; page: Page; errors: string[] }> {
  const context = await newContext(browser);
  // Finished charts for screenshots (src/components/charts/echarts-setup.ts reads this flag).
  await context.addInitScript(() => {
    (window as unknown as { __ARCWRIGHT_NO_ANIMATION__: boolean }).__ARCWRIGHT_NO_ANIMATION__ = true;
  });
  const page = await context.newPage();
  return { context, page, errors: collectPageErrors(page) };
}

/** The signed-in user's flights through the API, with the session cookie of the page. */
async function flightsOf(page: Page): Promise<FlightBrief[]> {
  return page.evaluate(async () => {
    const me = (await (await fetch('/api/v1/auth/me')).json()) as { data: { memberships: { clubId: number }[] } };
    const clubId = me.data.memberships[0].clubId;
    const list = (await (await fetch(`/api/v1/clubs/${clubId}/flights?pageSize=200`)).json()) as { data: FlightBrief[] };
    return list.data.map((f) => ({ id: f.id, sessionId: f.sessionId, status: f.status, athleteName: f.athleteName }));
  });
}

/** Polls until a demo session holds a fitted (or reviewed) flight of `athleteName`; answers that session's id and its flight count. */
async function waitForFittedSession(page: Page, athleteName: string): Promise<{ sessionId: number; flightCount: number }> {
  const deadline = Date.now() + FIT_WAIT_MS;
  for (;;) {
    const flights = await flightsOf(page);
    const fitted = flights.find((f) => f.athleteName === athleteName && (f.status === 'fitted' || f.status === 'reviewed'));
    if (fitted) return { sessionId: fitted.sessionId, flightCount: flights.filter((f) => f.sessionId === fitted.sessionId).length };
    if (Date.now() > deadline) throw new Error('No demo flight was fitted within 60 s: is the e2e worker running? See test-results/e2e-server.log.');
    await page.waitForTimeout(2000);
  }
}

describe('Session report and Progress', () => {
  let browser: Browser;

  beforeAll(async () => {
    browser = await launchBrowser();
  }, 60000);

  afterAll(async () => {
    await browser?.close();
  });

  it('shows the flights, consistency and scatter of a session and an athlete\'s progress when a coach opens them', async () => {
    const { context, page, errors } = await openPage(browser);
    try {
      await signIn(page, DEMO_USERS.coach.email);
      const { sessionId, flightCount } = await waitForFittedSession(page, DEMO_USERS.athlete.name);

      // The Session screen links to its report.
      await page.goto(`/sessions/${sessionId}`);
      await page.getByTestId('open-session-report').click();
      await page.waitForURL((url) => url.pathname === `/sessions/${sessionId}/report`);
      await expect.poll(() => page.getByTestId('page-title').textContent()).toMatch(/^Session report · /);
      await page.getByTestId('session-flights').waitFor();
      await expect.poll(() => page.locator('[data-testid="session-flights"] [data-testid="session-flight-link"]').count()).toBe(flightCount);
      expect(await page.locator('[data-testid="session-flights"] tbody tr').first().textContent()).toMatch(/m\/s/);
      expect(await page.locator('[data-testid="consistency-row"]').count()).toBeGreaterThan(0);
      await page.locator('[data-testid="speed-angle-chart"] canvas').waitFor();
      const canvas = await page.locator('[data-testid="speed-angle-chart"] canvas').boundingBox();
      expect(canvas?.width ?? 0).toBeGreaterThan(250);
      expect(canvas?.height ?? 0).toBeGreaterThan(200);
      await screenshot(page, 'progress-session-report');

      // Print layout: the rail and the page's buttons stay off paper.
      await page.emulateMedia({ media: 'print' });
      expect(await page.getByTestId('rail').isVisible()).toBe(false);
      expect(await page.getByTestId('print-session-report').isVisible()).toBe(false);
      await page.emulateMedia({ media: 'screen' });

      // A row opens its Flight report.
      await page.locator('[data-testid="session-flight-link"]').first().click();
      await page.waitForURL(/\/flights\/\d+$/);
      await page.getByTestId('flight-report').waitFor();

      await page.getByTestId('rail-progress').click();
      await expect.poll(() => page.getByTestId('page-title').textContent()).toBe('Progress');
      await page.getByTestId('progress-athlete').click();
      await page.getByRole('option', { name: DEMO_USERS.athlete.name, exact: true }).click();
      await page.locator('[data-testid="progress-chart-speed"] canvas').waitFor();
      expect(new URL(page.url()).searchParams.get('athlete')).toMatch(/^\d+$/);
      expect(await page.locator('[data-testid="progress-summary-row"]').count()).toBeGreaterThan(0);
      await page.locator('[data-testid="progress-chart-angle"] canvas').waitFor();
      await screenshot(page, 'progress-coach');
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('shows only her own progress and no athlete picker when the athlete signs in', async () => {
    const { context, page, errors } = await openPage(browser);
    try {
      await signIn(page, DEMO_USERS.athlete.email);
      const { sessionId } = await waitForFittedSession(page, DEMO_USERS.athlete.name);
      const mine = await flightsOf(page);
      expect(new Set(mine.map((f) => f.athleteName))).toEqual(new Set([DEMO_USERS.athlete.name]));

      await page.getByTestId('rail-progress').click();
      await expect.poll(() => page.getByTestId('page-title').textContent()).toBe('Progress');
      await page.locator('[data-testid="progress-chart-speed"] canvas').waitFor();
      expect(await page.getByTestId('progress-athlete').count()).toBe(0);
      await page.getByText('Your launch and carry over the sessions.').waitFor();
      await screenshot(page, 'progress-athlete');

      // Her session report lists her flights only.
      await page.goto(`/sessions/${sessionId}/report`);
      await page.getByTestId('session-flights').waitFor();
      await expect.poll(() => page.locator('[data-testid="session-flight-link"]').count()).toBeGreaterThan(0);
      const names = await page.locator('[data-testid="session-flight-link"]').allTextContents();
      expect(new Set(names.map((n) => n.trim()))).toEqual(new Set([DEMO_USERS.athlete.name]));
      await screenshot(page, 'progress-athlete-session-report');
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
