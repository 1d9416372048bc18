import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { collectPageErrors, DEMO_USERS, launchBrowser, newContext, screenshot, signIn } from './support/browser';
import { seriousViolations } from './support/axe';
import { demoClubId, waitForFittedDemoFlight } from './support/demo';

/**
 * Every screen for each role, on a desktop (1366 px) and on a phone (390 px): axe-core's WCAG 2.1 A/AA rules find no
 * serious or critical violation, and at 360 px no screen scrolls sideways. One browser; one signed-in page a role,
 * moved from screen to screen. Screenshots at 390 px: test-results/screenshots/phone-<role>-<screen>.png.
 */

const WIDTHS = { desktop: 1366, phone: 390, narrow: 360 } as const;

type Role = keyof typeof DEMO_USERS;

interface Screen {
  name: string;
  path: string;
}

/** A clip whose frames are extracted (the Trace stage shows), else null; some demo flights have no footage. */
async function clipWithFrames(page: Page): Promise<number | null> {
  const answer = await page.request.get(`/api/v1/clubs/${await demoClubId(page)}/clips`);
  const clips = ((await answer.json()) as { data?: { id: number; framesReady: boolean }[] }).data ?? [];
  return clips.find((c) => c.framesReady)?.id ?? null;
}

/** The screens a role opens from the rail and from one of the flights it may see. */
function screensFor(role: Role, flight: { id: number; sessionId: number; clipId: number; athleteId: number }, tracedClipId: number): Screen[] {
  const screens: Screen[] = [
    { name: 'overview', path: '/' },
    { name: 'sessions', path: '/sessions' },
    { name: 'session', path: `/sessions/${flight.sessionId}` },
    { name: 'session-report', path: `/sessions/${flight.sessionId}/report` },
    { name: 'clips', path: '/clips' },
    { name: 'clip', path: `/clips/${tracedClipId}` },
    { name: 'flights', path: '/flights' },
    { name: 'flight-report', path: `/flights/${flight.id}` },
    { name: 'progress', path: '/progress' },
    { name: 'planner', path: '/planner' },
  ];
  if (role === 'athlete') screens.push({ name: 'my-flights', path: '/my-flights' });
  else
    screens.push(
      { name: 'trace', path: `/clips/${tracedClipId}/trace` },
      { name: 'squad', path: '/squad' },
      { name: 'athlete', path: `/squad/athletes/${flight.athleteId}` },
    );
  if (role === 'admin') screens.push({ name: 'club', path: '/club' }, { name: 'billing', path: '/billing' });
  return screens;
}

/** Waits for the screen's data: no request in flight, no skeleton left. */
async function ready(page: Page): Promise<void> {
  await page.waitForLoadState('networkidle');
  await page.locator('.p-skeleton').first().waitFor({ state: 'detached', timeout: 10000 }).catch(() => undefined);
}

/** How far the page scrolls sideways, in CSS pixels (0 when it fits), and the outermost elements that stick out. */
async function sidewaysOverflow(page: Page): Promise<{ px: number; culprits: string }> {
  return page.evaluate(() => {
    const root = document.documentElement;
    const px = root.scrollWidth - root.clientWidth;
    if (px <= 0) return { px, culprits: '' };
    const sticksOut = (el: Element) => el.getBoundingClientRect().right > root.clientWidth + 1;
    const culprits = [...document.body.querySelectorAll('*')]
      .filter((el) => sticksOut(el) && !(el.parentElement && sticksOut(el.parentElement)))
      .slice(0, 3)
      .map((el) => `${el.tagName.toLowerCase()}.${[...el.classList].join('.')}`);
    return { px, culprits: culprits.join(', ') };
  });
}

describe('screens: accessibility and phone widths', () => {
  let browser: Browser;

  beforeAll(async () => {
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
  });

  it('has no serious axe violation on the public pages at desktop and phone widths', async () => {
    const context = await newContext(browser);
    const page = await context.newPage();
    const found: string[] = [];
    try {
      for (const [name, path] of [
        ['signin', '/signin'],
        ['signup', '/signup'],
      ] as const) {
        for (const width of [WIDTHS.desktop, WIDTHS.phone]) {
          await page.setViewportSize({ width, height: 860 });
          await page.goto(path);
          await ready(page);
          found.push(...(await seriousViolations(page)).map((v) => `${name} at ${width}px: ${v}`));
          if (width === WIDTHS.phone) await screenshot(page, `phone-${name}`);
        }
        await page.setViewportSize({ width: WIDTHS.narrow, height: 860 });
        const overflow = await sidewaysOverflow(page);
        if (overflow.px > 0) found.push(`${name} scrolls sideways by ${overflow.px}px at 360px (${overflow.culprits})`);
      }
    } finally {
      await context.close();
    }
    expect(found).toEqual([]);
  });

  for (const role of ['coach', 'athlete', 'admin'] as const) {
    it(`has no serious axe violation for the ${role} on any screen at 1366 and 390 px, and nothing scrolls sideways at 360 px`, async () => {
      const context = await newContext(browser);
      await context.addInitScript(() => {
        (window as unknown as { __ARCWRIGHT_NO_ANIMATION__: boolean }).__ARCWRIGHT_NO_ANIMATION__ = true;
      });
      const page = await context.newPage();
      const errors = collectPageErrors(page);
      const violations: string[] = [];
      const overflows: string[] = [];
      try {
        await signIn(page, DEMO_USERS[role].email);
        const flight = await waitForFittedDemoFlight(page);
        const tracedClipId = (await clipWithFrames(page)) ?? flight.clipId;
        for (const screen of screensFor(role, flight, tracedClipId)) {
          await page.setViewportSize({ width: WIDTHS.desktop, height: 860 });
          await page.goto(screen.path);
          await ready(page);
          violations.push(...(await seriousViolations(page)).map((v) => `${screen.name} at 1366px: ${v}`));

          await page.setViewportSize({ width: WIDTHS.phone, height: 860 });
          await ready(page);
          violations.push(...(await seriousViolations(page)).map((v) => `${screen.name} at 390px: ${v}`));
          await screenshot(page, `phone-${role}-${screen.name}`);
          if (screen.name === 'planner') {
            // The figures stay in view (sticky) while the last slider, far below them, is moved.
            await page.locator('[data-testid^="slider-"]').last().scrollIntoViewIfNeeded();
            const readouts = await page.getByTestId('planner-readouts').boundingBox();
            expect(readouts && readouts.y >= 0 && readouts.y + readouts.height <= 860, 'the Planner figures are in view').toBe(true);
          }

          await page.setViewportSize({ width: WIDTHS.narrow, height: 860 });
          await page.evaluate(() => new Promise<void>((done) => requestAnimationFrame(() => requestAnimationFrame(() => done()))));
          const overflow = await sidewaysOverflow(page);
          if (overflow.px > 0) overflows.push(`${screen.name} scrolls sideways by ${overflow.px}px at 360px (${overflow.culprits})`);
        }
      } finally {
        await context.close();
      }
      expect({ violations, overflows, errors }).toEqual({ violations: [], overflows: [], errors: [] });
    });
  }
});
