import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { collectPageErrors, DEMO_USERS, launchBrowser, newContext, screenshot, signIn } from './support/browser';

/**
 * Flights and the Flight report in the browser, on the demo club (seeded by the global setup; its worker fits the
 * demo flights): a coach filters the list, opens a report, reads the metrics and charts, prints and marks it
 * reviewed; the athlete sees only her own flights and gets the not-found page for someone else's report.
 */

const FIT_WAIT_MS = 60000;

async function openPage(browser: Browser): Promise<{ context: BrowserContext; page: Page; errors: string[] }> {
  const context = await newContext(browser);
  // Finished charts for screenshots (src/components/charts/echarts-setup.ts reads this flag).
  await context.addInitScript(() => {
    (window as unknown as { __ARCWRIGHT_NO_ANIMATION__: boolean }).__ARCWRIGHT_NO_ANIMATION__ = true;
  });
  const page = await context.newPage();
  return { context, page, errors: collectPageErrors(page) };
}

/** Reloads the Flights list until the worker has fitted at least one demo flight. */
async function waitForFittedFlight(page: Page): Promise<void> {
  const deadline = Date.now() + FIT_WAIT_MS;
  await page.goto('/flights');
  for (;;) {
    await page.getByTestId('flights-table').waitFor();
    if ((await page.locator('[data-testid="flights-table"] [data-status="fitted"]').count()) > 0) return;
    if (Date.now() > deadline) throw new Error('No demo flight was fitted within 60 s: is the e2e worker running? See test-results/e2e-server.log.');
    await page.waitForTimeout(2000);
    await page.reload();
  }
}

/** The flights the table shows: id (from the report link) and athlete name. */
async function listedFlights(page: Page): Promise<{ id: number; athlete: string }[]> {
  return page.locator('[data-testid="flights-table"] [data-testid="flight-link"]').evaluateAll((links) =>
    links.map((a) => ({ id: Number((a.getAttribute('href') ?? '').split('/').pop()), athlete: (a.textContent ?? '').trim() })),
  );
}

async function pickOption(page: Page, testId: string, name: string): Promise<void> {
  await page.getByTestId(testId).click();
  await page.getByRole('option', { name, exact: true }).click();
}

describe('Flights and the Flight report', () => {
  let browser: Browser;
  let otherAthletesFlightId = 0;

  beforeAll(async () => {
    browser = await launchBrowser();
  }, 60000);

  afterAll(async () => {
    await browser?.close();
  });

  it('filters, opens a report with metrics and charts, prints and marks it reviewed when a coach reviews a flight', async () => {
    const { context, page, errors } = await openPage(browser);
    try {
      await signIn(page, DEMO_USERS.coach.email);
      await page.getByTestId('rail-flights').click();
      await expect.poll(() => page.getByTestId('page-title').textContent()).toBe('Flights');
      await waitForFittedFlight(page);

      const all = await listedFlights(page);
      expect(all.length).toBeGreaterThanOrEqual(2);
      // A month of demo flights is more than one page: the table pages through them on the server.
      const count = page.getByTestId('flights-count');
      expect((await count.textContent())?.replace(/\s+/g, ' ').trim()).toMatch(/^1–25 of (\d+) flights$/);
      await page.locator('[data-testid="flights-table"] .p-paginator-next').click();
      await expect.poll(async () => (await count.textContent())?.replace(/\s+/g, ' ').trim()).toMatch(/^26–50 of \d+ flights$/);
      const second = await listedFlights(page);
      expect(second).toHaveLength(25);
      expect(second.some((f) => all.some((g) => g.id === f.id))).toBe(false);
      await screenshot(page, 'report-flights-page-2');
      await page.locator('[data-testid="flights-table"] .p-paginator-first').click();
      await expect.poll(async () => (await count.textContent())?.replace(/\s+/g, ' ').trim()).toMatch(/^1–25 of/);
      otherAthletesFlightId = all.find((f) => f.athlete !== DEMO_USERS.athlete.name)?.id ?? 0;
      expect(otherAthletesFlightId).toBeGreaterThan(0);

      await pickOption(page, 'filter-status', 'fitted');
      // The server filters: wait until the page in view is the filtered one.
      await expect
        .poll(async () => [...new Set(await page.locator('[data-testid="flights-table"] [data-testid="flight-status"]').evaluateAll((tags) => tags.map((t) => t.getAttribute('data-status'))))])
        .toEqual(['fitted']);
      const statuses = await page.locator('[data-testid="flights-table"] [data-testid="flight-status"]').evaluateAll((tags) => tags.map((t) => t.getAttribute('data-status')));
      expect(statuses.length).toBeGreaterThan(0);
      expect(new Set(statuses)).toEqual(new Set(['fitted']));
      // The standard-conditions carry and C_d come from each flight's fit history after the table shows.
      await expect.poll(() => page.locator('[data-testid="flights-table"] tbody tr').first().textContent()).toMatch(/±/);
      await screenshot(page, 'report-flights');

      await page.locator('[data-testid="flights-table"] tbody tr').first().click();
      await page.waitForURL(/\/flights\/\d+$/);
      await page.locator('[data-metric="launchSpeed"]').waitFor();
      expect(await page.locator('[data-metric="launchSpeed"] td').textContent()).toMatch(/\d+\.\d+ ± \d+\.\d+ m\/s/);
      expect(await page.locator('[data-metric="carry"] td').textContent()).toMatch(/\d+\.\d+( ± \d+\.\d+)? m/);
      await page.locator('[data-testid="trajectory-chart"] canvas').waitFor();
      const canvas = await page.locator('[data-testid="trajectory-chart"] canvas').boundingBox();
      expect(canvas?.width ?? 0).toBeGreaterThan(300);
      expect(canvas?.height ?? 0).toBeGreaterThan(200);
      // The speed and residual charts further down the page draw when they come into view.
      for (const chart of ['speed-chart', 'residual-chart']) {
        await page.getByTestId(chart).scrollIntoViewIfNeeded();
        await page.locator(`[data-testid="${chart}"] canvas`).waitFor();
      }
      expect(await page.getByTestId('report-cautions').textContent()).toMatch(/Landing zone/);
      await screenshot(page, 'report-coach');

      // Print layout: the rail and the page's buttons stay off paper.
      await page.emulateMedia({ media: 'print' });
      expect(await page.getByTestId('rail').isVisible()).toBe(false);
      expect(await page.getByTestId('print-report').isVisible()).toBe(false);
      await screenshot(page, 'report-print');
      await page.emulateMedia({ media: 'screen' });

      const action = page.getByTestId('primary-action');
      await expect.poll(() => action.textContent()).toMatch(/Mark reviewed/);
      await action.click();
      await page.locator('[data-testid="flight-report"] [data-testid="flight-status"][data-status="reviewed"]').waitFor();
      await expect.poll(() => action.textContent()).toMatch(/Open trace/);

      // The report hands its flight to the Planner.
      const reportPath = new URL(page.url()).pathname;
      const flightId = reportPath.split('/').pop();
      await page.getByTestId('open-planner').click();
      await page.waitForURL((url) => url.pathname === '/planner');
      expect(new URL(page.url()).searchParams.get('flight')).toBe(flightId);
      await page.goBack();
      await page.getByTestId('flight-report').waitFor();

      // Back in the list, the reviewed flight has left the "fitted" filter.
      await page.getByTestId('rail-flights').click();
      await page.getByTestId('flights-table').waitFor();
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('shows only her own flights and the not-found page for another athlete\'s report when the athlete signs in', async () => {
    expect(otherAthletesFlightId).toBeGreaterThan(0);
    const { context, page, errors } = await openPage(browser);
    try {
      await signIn(page, DEMO_USERS.athlete.email);
      await page.getByTestId('rail-flights').click();
      await page.getByTestId('flights-table').waitFor();
      await expect.poll(async () => (await listedFlights(page)).length).toBeGreaterThan(0);
      const mine = await listedFlights(page);
      expect(new Set(mine.map((f) => f.athlete))).toEqual(new Set([DEMO_USERS.athlete.name]));
      expect(await page.getByTestId('filter-athlete').count()).toBe(0);
      await screenshot(page, 'report-athlete-flights');

      await page.locator('[data-testid="flights-table"] [data-testid="flight-link"]').first().click();
      await page.locator('[data-testid="flight-report"]').waitFor();
      await expect.poll(() => page.getByTestId('primary-action').textContent()).toMatch(/Open trace/);
      // The athlete's profile (birth year) arrives after the flight: wait for the caution it brings.
      await expect.poll(() => page.getByTestId('report-cautions').textContent()).toMatch(/Young athlete/);
      await screenshot(page, 'report-athlete');

      await page.goto(`/flights/${otherAthletesFlightId}`);
      await page.getByText('There is no page at this address.').waitFor();
      expect(new URL(page.url()).pathname).toBe(`/flights/${otherAthletesFlightId}`);
      expect(await page.locator('[data-metric]').count()).toBe(0);
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
