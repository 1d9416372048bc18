import { execFileSync } from 'node:child_process';
import { mkdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_USERS, launchBrowser, newContext, SCREENSHOT_DIR, screenshot, settle, signIn, withPage } from './support/browser';
import { apiWrite, demoClubId, waitForFittedDemoFlight, waitForFittedDemoFlightWithFrames, type ApiFlight } from './support/demo';

/**
 * Display units in the browser: the demo club switched to imperial shows feet, mph and °F (and no metric figure)
 * on the Flight report, the Planner and the Session report; a member's own choice overrides the club's; the
 * Session report prints to a PDF whose first page is rendered to PNG; chart tooltips show a name as text.
 */

/** A number followed by a metric unit: 12 m, 3.4 m/s, 15 °C, 0.43 kg, 220 mm, 1013 hPa, 1.2 kg/m³, 5 g, 22 cm. */
const METRIC_FIGURE = /\d\s?(?:m\/s|km\/h|°C|kg\/m³|kg|hPa|mm|cm|m|g)(?![A-Za-z/²³])/;

/** A page of a fresh context with finished charts (src/components/charts/echarts-setup.ts reads the flag). */
function onPage(browser: Browser, run: (page: Page, errors: string[]) => Promise<void>): Promise<void> {
  return withPage(browser, async (page, errors) => {
    await page.addInitScript(() => {
      (window as unknown as { __ARCWRIGHT_NO_ANIMATION__: boolean }).__ARCWRIGHT_NO_ANIMATION__ = true;
    });
    try {
      await run(page, errors);
    } catch (error) {
      // The page's own errors say more than a timeout.
      if (errors.length > 0 && error instanceof Error) error.message += `\nPage errors:\n${errors.join('\n')}`;
      throw error;
    }
  });
}

/** The visible text of the page's content (rail excluded: its units choice names both systems). */
async function contentText(page: Page): Promise<string> {
  await settle(page);
  return page.locator('main').innerText();
}

/** Names people typed (venues such as "Korrow Heights Ground (1,600 m)") are theirs, not figures the app converts. */
let typedNames: string[] = [];

function expectImperialOnly(shown: string, where: string): void {
  const text = typedNames.reduce((t, name) => t.split(name).join(''), shown);
  const metric = text.match(new RegExp(`.{0,30}${METRIC_FIGURE.source}.{0,10}`));
  expect(metric?.[0] ?? null, `${where} shows a metric figure`).toBeNull();
}

async function setClubUnits(page: Page, units: 'metric' | 'imperial'): Promise<void> {
  await apiWrite(page, 'PATCH', `/clubs/${await demoClubId(page)}`, { units });
}

describe('Display units', () => {
  let browser: Browser;
  let flight: ApiFlight;
  /** The club admin's page, signed in for the whole file: it switches the club's units and renames an athlete. */
  let adminContext: BrowserContext;
  let admin: Page;

  beforeAll(async () => {
    browser = await launchBrowser();
    adminContext = await newContext(browser);
    admin = await adminContext.newPage();
    await signIn(admin, DEMO_USERS.admin.email);
    flight = await waitForFittedDemoFlightWithFrames(admin);
    const sessions = (await (await admin.request.get(`/api/v1/clubs/${await demoClubId(admin)}/sessions`)).json()) as { data: { venue: string }[] };
    typedNames = sessions.data.map((s) => s.venue).filter((v) => METRIC_FIGURE.test(v));
    await setClubUnits(admin, 'imperial');
  }, 90000);

  afterAll(async () => {
    // The other browser tests read the demo club in metric.
    await setClubUnits(admin, 'metric').catch(() => undefined);
    await adminContext?.close();
    await browser?.close();
  });

  it('shows ft, mph and °F and no metric figure on the Flight report, Planner and Session report when the club is on imperial', async () => {
    await onPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.coach.email);

      await page.goto(`/flights/${flight.id}`);
      await page.getByTestId('report-conditions').waitFor();
      await page.getByTestId('trajectory-chart').locator('canvas').waitFor();
      const report = await contentText(page);
      expect(report).toMatch(/\d ft\b/);
      expect(report).toMatch(/\d mph\b/);
      expect(report).toMatch(/\d °F\b/);
      expect(report).toMatch(/lb\/ft³/);
      expectImperialOnly(report, 'the Flight report');
      await screenshot(page, 'units-imperial-report');

      await page.goto(`/planner?flight=${flight.id}`);
      await page.getByTestId('readout-carry-value').waitFor();
      await page.locator('[data-testid="planner-carry-map"] canvas').first().waitFor();
      // The carry map's grid comes from its Web Worker, off the page's thread.
      expect(page.workers().map((w) => w.url()).some((url) => url.includes('carry-map.worker'))).toBe(true);
      const planner = await contentText(page);
      expect(planner).toMatch(/\d ft\b/);
      expect(planner).toMatch(/\d mph\b/);
      expect(planner).toMatch(/°F/);
      expectImperialOnly(planner, 'the Planner');
      // The temperature and altitude settings are typed in °F and ft.
      await expect(page.getByTestId('slider-temperatureK').textContent()).resolves.toMatch(/°F/);
      await expect(page.getByTestId('slider-altitudeM').textContent()).resolves.toMatch(/ft/);
      await screenshot(page, 'units-imperial-planner');

      await page.goto(`/sessions/${flight.sessionId}/report`);
      await page.getByTestId('session-flights').waitFor();
      const session = await contentText(page);
      expect(session).toMatch(/\d ft\b/);
      expect(session).toMatch(/\d mph\b/);
      expect(session).toMatch(/°F/);
      expectImperialOnly(session, 'the Session report');
      await screenshot(page, 'units-imperial-session-report');

      // Every other screen with measurements: no metric figure either.
      const screens: [string, string][] = [
        ['/', 'the Overview'],
        ['/sessions', 'Sessions'],
        [`/sessions/${flight.sessionId}`, 'a Session'],
        ['/clips', 'Clips'],
        [`/clips/${flight.clipId}`, 'a Clip'],
        [`/clips/${flight.clipId}/trace?flight=${flight.id}`, 'Trace'],
        ['/flights', 'Flights'],
        ['/progress', 'Progress'],
        ['/club', 'the Club screen'],
      ];
      for (const [path, where] of screens) {
        await page.goto(path);
        await page.getByTestId('page-title').waitFor();
        expectImperialOnly(await contentText(page), where);
      }
      await page.goto(`/clips/${flight.clipId}/trace?flight=${flight.id}`);
      await page.getByTestId('trace-panel-switch').getByText('Calibrate').click();
      await expect.poll(async () => (await page.getByTestId('calib-mpp').textContent()) ?? '').toMatch(/in\/px$/);
      await screenshot(page, 'units-imperial-trace');
      expect(errors).toEqual([]);
    });
    // The athlete's own screens follow the club's units too.
    await onPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.athlete.email);
      for (const [path, where] of [
        ['/my-flights', 'My flights'],
        ['/flights', 'Flights (athlete)'],
        ['/progress', 'Progress (athlete)'],
      ] as [string, string][]) {
        await page.goto(path);
        await page.getByTestId('page-title').waitFor();
        expectImperialOnly(await contentText(page), where);
      }
      await screenshot(page, 'units-imperial-my-flights-progress');
      await page.goto('/my-flights');
      await page.getByTestId('page-title').waitFor();
      const shown = await contentText(page);
      expect(shown).toMatch(/\d ft\b|\d mph\b/);
      await screenshot(page, 'units-imperial-my-flights');
      expect(errors).toEqual([]);
    });
  });

  it('stores a temperature, altitude and wind typed in °F, ft and mph in SI when a coach of an imperial club creates a session', async () => {
    await onPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.coach.email);
      await page.goto('/sessions');
      await page.getByTestId('sessions-table').waitFor();
      await page.getByTestId('primary-action').click();
      const venue = `Fennick Vale, east pitch ${Date.now().toString(36)}`;
      await page.getByTestId('session-venue').fill(venue);
      for (const [id, value] of [['airTemperatureK', '50'], ['altitudeM', '1000'], ['windSpeedMps', '10']]) {
        await page.locator(`#cond-${id}`).fill(value);
        await page.locator(`#cond-${id}`).press('Tab');
      }
      await expect(page.locator('#cond-airTemperatureK').inputValue()).resolves.toBe('50 °F');
      await expect(page.locator('#cond-altitudeM').inputValue()).resolves.toBe('1000 ft');
      await expect(page.locator('#cond-windSpeedMps').inputValue()).resolves.toBe('10 mph');
      await page.getByTestId('session-save').click();
      await page.getByTestId('session-dialog').waitFor({ state: 'detached' });

      const clubId = await demoClubId(page);
      const listed = (await (await page.request.get(`/api/v1/clubs/${clubId}/sessions?venue=${encodeURIComponent(venue)}`)).json()) as {
        data: { id: number; conditions: { airTemperatureK: number; altitudeM: number; windSpeedMps: number } }[];
      };
      expect(listed.data).toHaveLength(1);
      const { conditions } = listed.data[0];
      // 50 °F = 283.15 K; 1000 ft = 304.8 m; 10 mph = 4.4704 m/s (exact definitions, NIST SP 811 appendix B).
      expect(conditions.airTemperatureK).toBeCloseTo(283.15, 6);
      expect(conditions.altitudeM).toBeCloseTo(304.8, 6);
      expect(conditions.windSpeedMps).toBeCloseTo(4.4704, 6);
      await apiWrite(page, 'DELETE', `/clubs/${clubId}/sessions/${listed.data[0].id}`, undefined);
      expect(errors).toEqual([]);
    });
  });

  it('shows metric to a member who chose metric although the club is on imperial, and the club’s again after choosing it', async () => {
    await onPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.athlete.email);
      const own = await waitForFittedDemoFlight(page);
      await page.goto(`/flights/${own.id}`);
      await page.getByTestId('report-conditions').waitFor();
      await expect.poll(() => contentText(page)).toMatch(/\d mph\b/);

      await page.getByTestId('units-choice-select').click();
      await page.getByRole('option', { name: 'Metric (m, m/s, °C)' }).click();
      await expect.poll(() => contentText(page)).toMatch(/\d m\/s\b/);
      expect(await contentText(page)).not.toMatch(/\d mph\b/);
      await screenshot(page, 'units-override-metric');

      // The choice is stored on the account: a reload keeps it.
      await page.reload();
      await page.getByTestId('report-conditions').waitFor();
      await expect.poll(() => contentText(page)).toMatch(/\d m\/s\b/);

      await page.getByTestId('units-choice-select').click();
      await page.getByRole('option', { name: "Club's (imperial)" }).click();
      await expect.poll(() => contentText(page)).toMatch(/\d mph\b/);
      expect(errors).toEqual([]);
    });
  });

  it('prints the Session report to a PDF whose first page holds the flights, consistency and scatter in imperial', async () => {
    await onPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.coach.email);
      await page.goto(`/sessions/${flight.sessionId}/report`);
      await page.getByTestId('session-flights').waitFor();
      await page.getByTestId('consistency').waitFor();
      await settle(page);
      await page.emulateMedia({ media: 'print' });
      expect(await page.getByTestId('rail').isVisible()).toBe(false);
      expect(await page.getByTestId('print-session-report').isVisible()).toBe(false);
      await expect(page.getByTestId('session-report-print-head').isVisible()).resolves.toBe(true);

      mkdirSync(SCREENSHOT_DIR, { recursive: true });
      const pdfPath = join(SCREENSHOT_DIR, 'session-report.pdf');
      await page.pdf({ path: pdfPath, format: 'A4', printBackground: true });
      expect(statSync(pdfPath).size).toBeGreaterThan(20000);
      const text = execFileSync('pdftotext', ['-layout', pdfPath, '-']).toString('utf8');
      expect(text).toContain('Consistency');
      expect(text).toContain('Launch speed and angle');
      expect(text).toMatch(/\d mph/);
      expect(text).toMatch(/\d ft/);
      expect(text).toContain(DEMO_USERS.athlete.name);
      const pngBase = join(SCREENSHOT_DIR, 'session-report-print-page');
      execFileSync('pdftoppm', ['-png', '-r', '70', '-f', '1', '-l', '1', '-singlefile', pdfPath, pngBase]);
      const png = readFileSync(`${pngBase}.png`);
      expect(png.subarray(1, 4).toString('latin1')).toBe('PNG');
      await page.emulateMedia({ media: 'screen' });
      expect(errors).toEqual([]);
    });
  });

  it('shows an athlete’s name in a chart tooltip as the characters typed, never as markup', async () => {
    const clubId = await demoClubId(admin);
    // Every athlete of the session gets a name with markup, so whichever point is on top shows one.
    const listed = (await (await admin.request.get(`/api/v1/clubs/${clubId}/flights?sessionId=${flight.sessionId}&pageSize=100`)).json()) as {
      data: { athleteId: number; athleteName: string }[];
    };
    const originals = new Map(listed.data.map((f) => [f.athleteId, f.athleteName]));
    for (const [athleteId, name] of originals) await apiWrite(admin, 'PATCH', `/clubs/${clubId}/athletes/${athleteId}`, { displayName: `<b>x</b> ${name}` });
    try {
      await onPage(browser, async (page, errors) => {
        await signIn(page, DEMO_USERS.coach.email);
        await page.goto(`/sessions/${flight.sessionId}/report`);
        const chart = page.locator('.session-report__section', { hasText: 'Launch speed and angle' });
        const canvas = chart.locator('canvas').first();
        await canvas.waitFor();
        // The flights table comes first: bring the chart into the viewport, where the mouse can reach it.
        await canvas.scrollIntoViewIfNeeded();
        await settle(page);
        const box = (await canvas.boundingBox())!;
        // Sweep the plot until a point's tooltip shows.
        let shown = false;
        for (let y = box.y + 40; y < box.y + box.height - 45 && !shown; y += 8) {
          for (let x = box.x + 56; x < box.x + box.width - 20 && !shown; x += 8) {
            await page.mouse.move(x, y);
            shown = (await chart.innerText()).includes('<b>x</b> ');
          }
        }
        expect(shown).toBe(true);
        expect(await chart.locator('b').count()).toBe(0);
        await screenshot(page, 'units-tooltip-escaped');
        expect(errors).toEqual([]);
      });
    } finally {
      for (const [athleteId, name] of originals)
        await apiWrite(admin, 'PATCH', `/clubs/${clubId}/athletes/${athleteId}`, { displayName: name }).catch(() => undefined);
    }
  });
});
