import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, DEMO_PASSWORD, DEMO_USERS, launchBrowser, screenshot, SCREENSHOT_DIR, signIn, withPage } from './support/browser';
import { seriousViolations } from './support/axe';
import { demoClubId, waitForFittedDemoFlightWithFrames, type ApiFlight } from './support/demo';

/**
 * The Trace screen without a mouse: a coach signs in, opens a clip, steps frames, marks and moves a mark with the
 * keyboard cursor, saves and opens the flight report, all by keys. And on a 390 px phone with touch: every control
 * is a 44 px target, two fingers zoom, one pans, a tap marks, a resting finger aims with the magnifier, and the
 * nudge arrows move the mark. Screenshots: test-results/screenshots/trace-keys-*.png and trace-touch-*.png.
 */

interface Point {
  x: number;
  y: number;
}

/** Presses Tab (Shift + Tab backwards) until the focused element matches `selector`; fails when it never does. */
async function tabTo(page: Page, selector: string, backwards = false, presses = 120): Promise<void> {
  for (let i = 0; i < presses; i += 1) {
    if (await page.evaluate((sel) => document.activeElement?.matches(sel) ?? false, selector)) return;
    await page.keyboard.press(backwards ? 'Shift+Tab' : 'Tab');
  }
  throw new Error(`Tab never reached ${selector}; the focus is on ${await page.evaluate(() => document.activeElement?.outerHTML.slice(0, 160))}`);
}

async function frameNow(page: Page): Promise<number> {
  return Number((await page.getByTestId('frame-now').textContent())?.trim().split(' ')[0]);
}

async function waitForFrame(page: Page): Promise<void> {
  await page.locator('[data-testid="trace-viewer"][data-ready="true"]').waitFor({ timeout: 15000 });
}

/** The keyboard cursor's image position, from the canvas's data attribute. */
async function keyCursor(page: Page): Promise<Point | null> {
  const value = await page.getByTestId('trace-canvas').getAttribute('data-key-cursor');
  if (!value) return null;
  const [x, y] = value.split(',').map(Number);
  return { x, y };
}

/** The mark of a frame as the points table shows it (image px), or null when the frame has none. */
async function markAt(page: Page, frame: number): Promise<Point | null> {
  const row = page.locator(`[data-testid="points-row"][data-frame="${frame}"]`);
  if ((await row.count()) === 0) return null;
  const [x, y] = ((await row.locator('td').nth(2).textContent()) ?? '').split(',').map((v) => Number(v.trim()));
  return { x, y };
}

async function view(page: Page): Promise<{ scale: number; offsetX: number; offsetY: number }> {
  const [scale, offsetX, offsetY] = ((await page.getByTestId('trace-viewer').getAttribute('data-view')) ?? '1,0,0').split(',').map(Number);
  return { scale, offsetX, offsetY };
}

/** Page position of an image pixel under the viewer's zoom and pan. */
async function imageToPage(page: Page, p: Point): Promise<Point> {
  const v = await view(page);
  const box = await page.getByTestId('trace-viewer').boundingBox();
  if (!box) throw new Error('The frame viewer is not on screen.');
  return { x: box.x + p.x * v.scale + v.offsetX, y: box.y + p.y * v.scale + v.offsetY };
}

/**
 * What is wrong with the page's tab stops: a stop without a name, a stop hidden from sight (a stray input), a button
 * or a role=button element inside another one.
 */
async function tabStopProblems(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const problems: string[] = [];
    const focusable = [...document.querySelectorAll<HTMLElement>('a[href], button, input, select, textarea, [tabindex]')].filter(
      (el) => el.tabIndex >= 0 && !(el as HTMLButtonElement).disabled && el.getClientRects().length > 0,
    );
    for (const el of focusable) {
      const labelledBy = (el.getAttribute('aria-labelledby') ?? '')
        .split(/\s+/)
        .map((id) => document.getElementById(id)?.textContent ?? '')
        .join(' ');
      const labels = 'labels' in el ? [...((el as HTMLInputElement).labels ?? [])].map((l) => l.textContent ?? '').join(' ') : '';
      const name = [el.getAttribute('aria-label'), labelledBy, labels, el.getAttribute('title'), el.getAttribute('placeholder'), el.textContent].join(' ').trim();
      const box = el.getBoundingClientRect();
      const what = `${el.tagName.toLowerCase()}${el.className ? `.${String(el.className).split(' ')[0]}` : ''}`;
      if (!name) problems.push(`${what} has no name`);
      // A PrimeVue switch lays its (named) input over the switch; anything else of a pixel or less is hidden.
      if (box.width <= 1 || box.height <= 1 || getComputedStyle(el).visibility === 'hidden') problems.push(`${what} is in the tab order but not visible`);
    }
    if (focusable.length < 20) problems.push(`only ${focusable.length} tab stops found`);
    for (const el of document.querySelectorAll('button button, button [role="button"], [role="button"] button, [role="button"] [role="button"]')) {
      problems.push(`${el.tagName.toLowerCase()} "${el.textContent?.trim().slice(0, 40)}" is inside another button`);
    }
    return problems;
  });
}

/** The clip's first flight with frames and marks in range, and a frame of it that holds a mark. */
async function demoTarget(page: Page): Promise<{ flight: ApiFlight; frame: number }> {
  const flight = await waitForFittedDemoFlightWithFrames(page);
  const clubId = await demoClubId(page);
  const answer = (await (await page.request.get(`/api/v1/clubs/${clubId}/flights/${flight.id}/points`)).json()) as { data?: { frame: number }[] };
  const frames = (answer.data ?? []).map((p) => p.frame);
  // A frame in the middle of the track: marks before and after it, inside the flight's frames.
  const frame = frames[Math.floor(frames.length / 2)] ?? 0;
  return { flight, frame };
}

describe('Trace by keyboard and by finger', () => {
  let browser: Browser;

  beforeAll(async () => {
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
  });

  it('signs in, opens a clip, steps frames, marks and moves a mark, saves and opens the report without the mouse', async () => {
    await withPage(browser, async (page, errors) => {
      await page.goto('/signin');
      await tabTo(page, '#signin-email');
      await page.keyboard.type(DEMO_USERS.coach.email);
      await tabTo(page, '#signin-password');
      await page.keyboard.type(DEMO_PASSWORD);
      await page.keyboard.press('Enter');
      await page.getByTestId('rail').waitFor();

      const { flight, frame } = await demoTarget(page);
      // The clip by its address, then its Trace action by Tab and Enter.
      await page.goto(`/clips/${flight.clipId}`);
      await page.getByTestId('primary-action').waitFor();
      await tabTo(page, '[data-testid="primary-action"]');
      await page.keyboard.press('Enter');
      await page.waitForURL(/\/trace/);
      await page.getByTestId('flight-list').waitFor();
      await waitForFrame(page);

      // The flight from the list, by its button.
      await tabTo(page, `[data-flight-id="${flight.id}"] .flights__main`);
      await page.keyboard.press('Enter');
      await page.locator(`[data-flight-id="${flight.id}"].is-selected`).waitFor();
      await page.getByTestId('points-table').waitFor();
      // Every stop in the tab order is visible and named, and no button sits inside another button.
      expect(await tabStopProblems(page)).toEqual([]);

      // To the frame with G and the jump box, then step by keys on the viewer: → and . forward, , back.
      await page.keyboard.press('g');
      await page.keyboard.type(String(frame - 2));
      await page.keyboard.press('Enter');
      await expect.poll(() => frameNow(page)).toBe(frame - 2);
      await tabTo(page, '[data-testid="trace-canvas"]', true);
      await page.keyboard.press('ArrowRight');
      await page.keyboard.press('.');
      await page.keyboard.press('.');
      await page.keyboard.press(',');
      await expect.poll(() => frameNow(page)).toBe(frame);
      await waitForFrame(page);
      // The focus ring is drawn over the picture.
      await expect(page.locator('.trace-canvas__ring').evaluate((el) => getComputedStyle(el).display)).resolves.toBe('block');

      // Remove the mark of this frame, then place one with the keyboard cursor.
      const before = await markAt(page, frame);
      expect(before).not.toBeNull();
      await page.keyboard.press('Delete');
      await expect.poll(() => markAt(page, frame)).toBeNull();
      await page.keyboard.press('Enter');
      const start = await keyCursor(page);
      expect(start, 'Enter on the viewer starts the keyboard cursor').not.toBeNull();
      await expect(page.getByTestId('trace-key-hint').textContent()).resolves.toContain('Marking by keys');
      await page.keyboard.press('ArrowRight');
      await page.keyboard.press('ArrowRight');
      await page.keyboard.press('Shift+ArrowDown');
      const aimed = { x: start!.x + 2, y: start!.y + 10 };
      await expect.poll(() => keyCursor(page)).toEqual(aimed);
      await page.keyboard.press('Enter');
      await expect.poll(() => markAt(page, frame)).toEqual(aimed);
      await screenshot(page, 'trace-keys-01-placed');

      // Move it: the cursor, then Enter again.
      await page.keyboard.press('ArrowLeft');
      await page.keyboard.press('ArrowUp');
      await page.keyboard.press('Enter');
      const moved = { x: aimed.x - 1, y: aimed.y - 1 };
      await expect.poll(() => markAt(page, frame)).toEqual(moved);
      // Esc ends marking by keys; the arrows step frames again, and the M key starts the cursor again.
      await page.keyboard.press('Escape');
      expect(await keyCursor(page)).toBeNull();
      await page.keyboard.press('ArrowRight');
      await expect.poll(() => frameNow(page)).toBe(frame + 1);
      await page.keyboard.press('m');
      expect(await keyCursor(page)).not.toBeNull();
      await page.keyboard.press('Escape');
      // The help lists the keys of marking by keys; Esc closes it.
      await page.keyboard.press('?');
      await expect(page.getByTestId('shortcuts-help').textContent()).resolves.toMatch(/Marking by keys.*Move the cursor 1 px.*Mark the ball at the cursor/);
      // Not a full-page shot: resizing the page for one closes the popover. After its fade-in.
      await page.waitForTimeout(400);
      await page.screenshot({ path: `${SCREENSHOT_DIR}/trace-keys-02-help.png` });
      expect(await seriousViolations(page)).toEqual([]);
      await page.keyboard.press('Escape');
      await page.getByTestId('shortcuts-help').waitFor({ state: 'detached' });

      // The marks' rows: one tab stop, the arrows go from row to row and to their frames.
      await tabTo(page, '[data-testid="points-row"]');
      const rowFrames = await page.getByTestId('points-row').evaluateAll((rows) => rows.map((r) => Number(r.getAttribute('data-frame'))));
      await page.keyboard.press('Home');
      await expect.poll(() => frameNow(page)).toBe(rowFrames[0]);
      await page.keyboard.press('ArrowDown');
      await expect.poll(() => frameNow(page)).toBe(rowFrames[1]);
      expect(await page.evaluate(() => [document.activeElement?.getAttribute('data-frame'), document.activeElement?.getAttribute('aria-current')])).toEqual([
        String(rowFrames[1]),
        'true',
      ]);

      // Save (the page's action), then the report.
      await tabTo(page, '[data-testid="primary-action"]', true);
      await page.keyboard.press('Enter');
      await expect.poll(async () => (await page.getByTestId('track-state').textContent())?.trim()).toMatch(/marks saved/);
      const saved = (await (await page.request.get(`/api/v1/clubs/${await demoClubId(page)}/flights/${flight.id}/points`)).json()) as {
        data: { frame: number; xPx: number; yPx: number }[];
      };
      const kept = saved.data.find((p) => p.frame === frame);
      expect(kept && { x: kept.xPx, y: kept.yPx }).toEqual(moved);
      await tabTo(page, '[data-testid="trace-report-link"]');
      await page.keyboard.press('Enter');
      await page.waitForURL(new RegExp(`/flights/${flight.id}$`));
      await page.getByTestId('flight-report').waitFor();
      expect(errors).toEqual([]);
    });
  });

  it('on a 390 px phone with touch: 44 px targets, pinch-zoom, drag-pan, a tap marks, the magnifier aims, the arrows nudge', async () => {
    const context = await browser.newContext({
      baseURL: baseUrl(),
      viewport: { width: 390, height: 844 },
      deviceScaleFactor: 1,
      hasTouch: true,
      isMobile: true,
      locale: 'en-GB',
      timezoneId: 'Europe/London',
      reducedMotion: 'reduce',
    });
    context.setDefaultTimeout(15000);
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (error) => errors.push(error.message));
    try {
      await signIn(page, DEMO_USERS.coach.email);
      const { flight, frame } = await demoTarget(page);
      await page.goto(`/clips/${flight.clipId}/trace?flight=${flight.id}`);
      await page.getByTestId('points-table').waitFor();
      await waitForFrame(page);
      const jump = page.getByTestId('frame-jump').locator('input');
      await jump.fill(String(frame));
      await jump.press('Enter');
      await expect.poll(() => frameNow(page)).toBe(frame);
      await waitForFrame(page);
      await screenshot(page, 'trace-touch-01-phone');

      // Every control of the stage and the side panels is a 44 × 44 px target, the slider's handle too.
      const small = await page.evaluate(() =>
        [...document.querySelectorAll('.trace .p-button, .trace .p-togglebutton, .trace .p-slider-handle, .trace [data-testid="frame-jump"] input, .trace a.trace__report')]
          .map((el) => ({ el, box: el.getBoundingClientRect() }))
          .filter(({ box }) => box.width > 0 && box.height > 0 && (box.width < 44 || box.height < 44))
          .map(({ el, box }) => `${el.getAttribute('aria-label') ?? el.textContent?.trim() ?? el.className} ${Math.round(box.width)}×${Math.round(box.height)}`),
      );
      expect(small).toEqual([]);
      const sideways = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(sideways).toBeLessThanOrEqual(0);

      const box = await page.getByTestId('trace-viewer').boundingBox();
      if (!box) throw new Error('The frame viewer is not on screen.');
      const cdp = await context.newCDPSession(page);
      const touch = (type: 'touchStart' | 'touchMove' | 'touchEnd', points: Point[]) =>
        cdp.send('Input.dispatchTouchEvent', { type, touchPoints: points.map((p, i) => ({ x: p.x, y: p.y, id: i + 1, radiusX: 4, radiusY: 4, force: 1 })) });
      const mid = { x: box.x + box.width / 2, y: box.y + box.height / 2 };

      // Pinch: the fingers spread from 60 to 180 px apart; the zoom triples about their midpoint.
      const v0 = await view(page);
      const pinned = { x: (mid.x - box.x - v0.offsetX) / v0.scale, y: (mid.y - box.y - v0.offsetY) / v0.scale };
      await touch('touchStart', [{ x: mid.x - 30, y: mid.y }, { x: mid.x + 30, y: mid.y }]);
      for (let d = 40; d <= 90; d += 10) await touch('touchMove', [{ x: mid.x - d, y: mid.y }, { x: mid.x + d, y: mid.y }]);
      await touch('touchEnd', []);
      const v1 = await view(page);
      expect(v1.scale / v0.scale).toBeCloseTo(3, 1);
      const still = await imageToPage(page, pinned);
      expect(Math.abs(still.x - mid.x)).toBeLessThan(1.5);
      expect(Math.abs(still.y - mid.y)).toBeLessThan(1.5);
      await screenshot(page, 'trace-touch-02-pinched');

      // Drag-pan with one finger: the picture follows it, nothing is marked.
      const marksBefore = await page.getByTestId('points-row').count();
      await touch('touchStart', [mid]);
      for (let d = 10; d <= 50; d += 10) await touch('touchMove', [{ x: mid.x + d, y: mid.y + d / 2 }]);
      await touch('touchEnd', []);
      const v2 = await view(page);
      expect(v2.offsetX - v1.offsetX).toBeCloseTo(50, 0);
      expect(v2.offsetY - v1.offsetY).toBeCloseTo(25, 0);
      expect(await page.getByTestId('points-row').count()).toBe(marksBefore);

      // A tap marks the ball where the finger lands.
      const target = { x: mid.x + 12, y: mid.y - 8 };
      await page.touchscreen.tap(target.x, target.y);
      const expected = { x: Math.round(((target.x - box.x - v2.offsetX) / v2.scale) * 10) / 10, y: Math.round(((target.y - box.y - v2.offsetY) / v2.scale) * 10) / 10 };
      await expect.poll(async () => {
        const m = await markAt(page, frame);
        return m ? Math.hypot(m.x - expected.x, m.y - expected.y) : Infinity;
      }).toBeLessThan(0.3);
      const tapped = (await markAt(page, frame))!;

      // Rest a finger: the magnifier shows; slide and lift: the mark goes where the finger was lifted.
      await touch('touchStart', [{ x: mid.x - 20, y: mid.y + 10 }]);
      await page.locator('[data-testid="trace-canvas"][data-aiming="true"]').waitFor();
      await touch('touchMove', [{ x: mid.x - 14, y: mid.y + 14 }]);
      await screenshot(page, 'trace-touch-03-magnifier');
      await touch('touchEnd', []);
      const aimedAt = { x: Math.round(((mid.x - 14 - box.x - v2.offsetX) / v2.scale) * 10) / 10, y: Math.round(((mid.y + 14 - box.y - v2.offsetY) / v2.scale) * 10) / 10 };
      await expect.poll(async () => {
        const m = await markAt(page, frame);
        return m ? Math.hypot(m.x - aimedAt.x, m.y - aimedAt.y) : Infinity;
      }).toBeLessThan(0.3);
      expect(await markAt(page, frame)).not.toEqual(tapped);
      const aimed = (await markAt(page, frame))!;

      // The nudge arrows move it a pixel at a time.
      await page.getByTestId('trace-nudge-right').tap();
      await page.getByTestId('trace-nudge-right').tap();
      await page.getByTestId('trace-nudge-up').tap();
      await expect.poll(() => markAt(page, frame)).toEqual({ x: Math.round((aimed.x + 2) * 10) / 10, y: Math.round((aimed.y - 1) * 10) / 10 });
      await screenshot(page, 'trace-touch-04-nudged');

      // axe finds nothing serious on Trace here, nor at desktop width.
      const found = (await seriousViolations(page)).map((v) => `390px: ${v}`);
      await page.setViewportSize({ width: 1366, height: 860 });
      found.push(...(await seriousViolations(page)).map((v) => `1366px: ${v}`));
      expect(found).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
