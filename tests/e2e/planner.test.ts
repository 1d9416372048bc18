import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { collectPageErrors, DEMO_USERS, launchBrowser, newContext, screenshot, settle, signIn } from './support/browser';

/**
 * The Planner in the browser: a coach opens it from a fitted demo flight, moves the speed slider with the keyboard,
 * reads the best angle, asks for the speed of a target carry and sees the carry map; an athlete's picker lists
 * only their own flights.
 */

interface ApiFlight {
  id: number;
  athleteName: string;
  status: string;
  latestFit: { id: number } | null;
}

async function clubId(page: Page): Promise<number> {
  const me = (await (await page.request.get('/api/v1/auth/me')).json()) as { data: { memberships: { clubId: number }[] } };
  return me.data.memberships[0].clubId;
}

async function listFlights(page: Page): Promise<ApiFlight[]> {
  const answer = await page.request.get(`/api/v1/clubs/${await clubId(page)}/flights?pageSize=200`);
  return ((await answer.json()) as { data: ApiFlight[] }).data;
}

const isFitted = (f: ApiFlight) => f.latestFit !== null && ['fitted', 'reviewed', 'needs_attention'].includes(f.status);

/** The e2e worker fits the demo flights after seeding: wait up to a minute for the first one. */
async function waitForFittedFlight(page: Page): Promise<ApiFlight> {
  const deadline = Date.now() + 60000;
  while (Date.now() < deadline) {
    const fitted = (await listFlights(page)).find((f) => isFitted(f) && f.status !== 'needs_attention');
    if (fitted) return fitted;
    await page.waitForTimeout(1000);
  }
  throw new Error('No demo flight was fitted within 60 s: see test-results/e2e-server.log for the worker.');
}

/** The number at the start of a readout such as "41.3 m". */
async function readNumber(page: Page, testId: string): Promise<number> {
  const text = (await page.getByTestId(testId).textContent()) ?? '';
  const value = Number.parseFloat(text.replace('−', '-'));
  if (!Number.isFinite(value)) throw new Error(`"${testId}" shows no number: "${text}"`);
  return value;
}

describe('Planner', () => {
  let browser: Browser;
  let context: BrowserContext;

  beforeAll(async () => {
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser.close();
  });

  async function freshPage(): Promise<{ page: Page; errors: string[] }> {
    context = await newContext(browser);
    await context.addInitScript(() => {
      (window as unknown as { __ARCWRIGHT_NO_ANIMATION__: boolean }).__ARCWRIGHT_NO_ANIMATION__ = true;
    });
    const page = await context.newPage();
    return { page, errors: collectPageErrors(page) };
  }

  it('moves the carry up with the speed slider, shows a best angle below 45° and a carry map when a coach starts from a fitted flight', async () => {
    const { page, errors } = await freshPage();
    await signIn(page, DEMO_USERS.coach.email);
    const flight = await waitForFittedFlight(page);

    await page.getByTestId('rail-planner').click();
    await page.waitForURL(/\/planner/);
    await page.goto(`/planner?flight=${flight.id}`);
    await page.getByTestId('planner-source').waitFor();
    await expect(page.getByTestId('planner-source').textContent()).resolves.toContain(`Flight ${flight.id}`);
    await page.getByTestId('readout-carry-value').waitFor();
    const carryBefore = await readNumber(page, 'readout-carry-value');
    const speedBefore = Number(await page.locator('[data-testid="slider-speed"] [role="slider"]').getAttribute('aria-valuenow'));

    const handle = page.locator('[data-testid="slider-speed"] [role="slider"]');
    await handle.focus();
    for (let i = 0; i < 20; i++) await handle.press('ArrowRight');
    await expect.poll(async () => readNumber(page, 'readout-carry-value')).toBeGreaterThan(carryBefore);
    const speedAfter = Number(await handle.getAttribute('aria-valuenow'));
    expect(speedAfter).toBeGreaterThan(speedBefore);
    await expect(page.getByTestId('readout-carry').textContent()).resolves.toMatch(/\+\d+\.\d m vs fitted/);

    const best = await readNumber(page, 'planner-best-angle-value');
    expect(best).toBeGreaterThan(5);
    expect(best).toBeLessThan(45);

    await page.locator('#planner-target-carry').fill('40');
    await page.locator('#planner-target-carry').press('Tab');
    await expect.poll(async () => (await page.getByTestId('planner-target-speed').textContent()) ?? '').toMatch(/^\s*\d+\.\d m\/s\s*$/);
    await expect(page.getByTestId('planner-target-speed-best').textContent()).resolves.toMatch(/\d+\.\d m\/s/);

    await page.locator('[data-testid="planner-carry-map"] canvas').first().waitFor();
    await expect(page.getByTestId('sens-speed').textContent()).resolves.toMatch(/\+\d+\.\d\d m/);
    await settle(page);
    await screenshot(page, 'planner-coach');
    expect(errors).toEqual([]);
    await context.close();
  });

  it('works from a blank setup with a catalogue ball when no flight is chosen', async () => {
    const { page, errors } = await freshPage();
    await signIn(page, DEMO_USERS.coach.email);
    await page.goto('/planner');
    await page.getByTestId('readout-carry-value').waitFor();
    const carry = await readNumber(page, 'readout-carry-value');
    expect(carry).toBeGreaterThan(10);
    const handle = page.locator('[data-testid="slider-angleDeg"] [role="slider"]');
    await handle.focus();
    for (let i = 0; i < 10; i++) await handle.press('ArrowLeft');
    await expect(page.getByTestId('readout-carry').textContent()).resolves.toMatch(/vs start/);
    await page.locator('[data-testid="planner-carry-map"] canvas').first().waitFor();
    await screenshot(page, 'planner-blank');
    expect(errors).toEqual([]);
    await context.close();
  });

  it('lists only the athlete\'s own fitted flights in the picker when an athlete opens the Planner', async () => {
    const { page, errors } = await freshPage();
    await signIn(page, DEMO_USERS.athlete.email);
    // Wait until the worker fitted at least one of the athlete's flights (the server scopes the list to them).
    let own: ApiFlight[] = [];
    await expect.poll(async () => (own = (await listFlights(page)).filter(isFitted)).length, { timeout: 60000, interval: 1000 }).toBeGreaterThan(0);
    const allOwn = await listFlights(page);
    await page.getByTestId('rail-planner').click();
    await page.waitForURL(/\/planner/);
    await page.getByTestId('planner-flight-picker').click();
    const options = page.locator('.p-select-overlay [role="option"]');
    await options.first().waitFor();
    const labels = await options.allTextContents();
    // More may have been fitted since the list above was read, never more than the athlete's own flights.
    expect(labels.length).toBeGreaterThanOrEqual(own.length);
    expect(labels.length).toBeLessThanOrEqual(allOwn.length);
    for (const label of labels) expect(label.startsWith(DEMO_USERS.athlete.name)).toBe(true);
    expect(allOwn.every((f) => f.athleteName === DEMO_USERS.athlete.name)).toBe(true);
    await screenshot(page, 'planner-athlete-picker');
    expect(errors).toEqual([]);
    await context.close();
  });
});
