import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { collectPageErrors, DEMO_USERS, launchBrowser, newContext, screenshot, signIn } from './support/browser';
import { renderClip, type Truth } from './support/clips';
import { goToFrame, imageToPage, waitForFrame } from './support/trace-page';

/**
 * The way from a clip to a traced, calibrated flight in the browser: a coach creates a session, uploads a
 * generated slow-motion clip, waits for processing, marks the ball once, lets auto-follow trace it, calibrates,
 * saves and fits; then the athlete of the flight looks at it read-only.
 */

// The generated scene: 640×360 at 120 fps filmed, 30 fps played back; 640 / 36 px per metre (the generator's default).
const WIDTH = 640;
const HEIGHT = 360;
const CAPTURE_FPS = 120;
const PX_PER_M = WIDTH / 36;
const LAUNCH_X = WIDTH * 0.08;
const GROUND_Y = HEIGHT * 0.85;
/** Length of the scale line drawn along the ground, m. */
const SCALE_M = 10;

async function pickOption(page: Page, testId: string, name: string | RegExp): Promise<void> {
  await page.getByTestId(testId).click();
  await page.getByRole('option', { name }).first().click();
}

describe('Trace: from an uploaded clip to a traced, calibrated flight', () => {
  let browser: Browser;
  let workDir: string;
  let clip: { videoPath: string; truth: Truth };
  let clipUrl = '';
  let traceUrl = '';

  beforeAll(async () => {
    workDir = mkdtempSync(join(tmpdir(), 'arcwright-e2e-trace-'));
    clip = renderClip(join(workDir, 'fennick-punt-slowmo.mp4'), {
      width: WIDTH,
      height: HEIGHT,
      captureFps: CAPTURE_FPS,
      playbackFps: 30,
      durationS: 2.2,
      ballRadiusPx: 6,
      seed: 7,
    });
    browser = await launchBrowser();
  }, 120000);

  afterAll(async () => {
    await browser?.close();
    if (workDir) rmSync(workDir, { recursive: true, force: true });
  });

  async function withPage(run: (page: Page, errors: string[]) => Promise<void>): Promise<void> {
    const context: BrowserContext = await newContext(browser);
    const page = await context.newPage();
    const errors = collectPageErrors(page);
    try {
      await run(page, errors);
    } finally {
      await context.close();
    }
  }

  it('uploads, follows, calibrates, saves and fits when a coach traces a clip', async () => {
    await withPage(async (page, errors) => {
      await signIn(page, DEMO_USERS.coach.email);

      // Sessions: create one for today with its conditions.
      await page.getByTestId('rail-sessions').click();
      await page.getByTestId('sessions-table').waitFor();
      await screenshot(page, 'trace-01-sessions');
      await page.getByTestId('primary-action').click();
      const venue = `Fennick Vale, west pitch ${Date.now().toString(36)}`;
      await page.getByTestId('session-venue').fill(venue);
      await page.locator('#cond-airTemperatureK').fill('14');
      await page.locator('#cond-airTemperatureK').press('Tab');
      await page.locator('#cond-windSpeedMps').fill('2.5');
      await page.locator('#cond-windSpeedMps').press('Tab');
      await page.getByTestId('wind-direction-missing').waitFor();
      // Across the field: no wind along the flight, like the generated clip.
      await page.locator('#cond-windDirectionDeg').fill('90');
      await page.locator('#cond-windDirectionDeg').press('Tab');
      await expect(page.locator('#cond-airTemperatureK').inputValue()).resolves.toBe('14 °C');
      await screenshot(page, 'trace-02-session-dialog');
      await page.getByTestId('session-save').click();
      await page.getByTestId('session-dialog').waitFor({ state: 'detached' });
      await page.getByRole('link', { name: venue }).click();
      await page.getByTestId('session-facts').waitFor();
      await expect(page.getByTestId('session-facts').textContent()).resolves.toContain('14.0 °C');

      // Upload the generated slow-motion clip with its recording rate.
      await page.getByTestId('primary-action').click();
      await page.getByTestId('upload-file').setInputFiles(clip.videoPath);
      await page.getByTestId('upload-slowmo').click();
      await page.getByTestId('upload-fps').locator('input').fill(String(CAPTURE_FPS));
      await page.getByTestId('upload-submit').click();
      await page.getByTestId('upload-dialog').waitFor({ state: 'detached', timeout: 60000 });
      const card = page.getByTestId('clip-card').first();
      await card.waitFor();
      await screenshot(page, 'trace-03-uploaded');

      // Processing: the status moves from processing to ready.
      await card.locator('[data-testid="clip-status"][data-status="ready"]').waitFor({ timeout: 90000 });
      await expect(card.textContent()).resolves.toContain('recorded at 120 fps');
      await screenshot(page, 'trace-04-processed');
      await card.getByTestId('clip-trace').click();
      await page.waitForURL(/\/clips\/\d+\/trace/);
      traceUrl = new URL(page.url()).pathname;
      clipUrl = traceUrl.replace(/\/trace$/, '');
      await waitForFrame(page);

      // A flight for the athlete Isla Brackwater.
      await page.getByTestId('flight-add').click();
      await pickOption(page, 'flight-athlete', /Isla Brackwater/);
      await pickOption(page, 'flight-action', 'Punt');
      await pickOption(page, 'flight-ball', /Association football/);
      await page.getByTestId('flight-save').click();
      await page.getByTestId('flight-dialog').waitFor({ state: 'detached' });
      const item = page.getByTestId('flight-item').first();
      await expect(item.getByTestId('flight-status').getAttribute('data-status')).resolves.toBe('uploaded');

      // Mark the ball once, a few frames after launch, where the generator says it is.
      const start = clip.truth.frames[clip.truth.launchFrame + 4];
      await goToFrame(page, start.frame);
      const at = await imageToPage(page, start);
      await page.mouse.click(at.x, at.y);
      await expect(page.getByTestId('track-state').textContent()).resolves.toContain('unsaved');
      await screenshot(page, 'trace-05-first-mark');

      // Auto-follow from there: the job's marks replace the track.
      await page.getByTestId('trace-follow').click();
      await expect.poll(async () => (await page.getByTestId('points-table').locator('tbody tr').count()), { timeout: 60000 }).toBeGreaterThan(100);
      await expect.poll(async () => item.getByTestId('flight-status').getAttribute('data-status')).toBe('traced');
      await expect(page.getByTestId('follow-error').count()).resolves.toBe(0);
      const followed = await page.getByTestId('points-table').locator('tbody tr').count();
      await goToFrame(page, start.frame + 40);
      await screenshot(page, 'trace-06-followed');

      // Review: remove the last mark and save.
      await page.getByTestId('points-table').locator('tbody tr').last().click();
      await page.keyboard.press('Delete');
      await expect.poll(async () => page.getByTestId('points-table').locator('tbody tr').count()).toBe(followed - 1);
      await page.keyboard.press('Control+z');
      await expect.poll(async () => page.getByTestId('points-table').locator('tbody tr').count()).toBe(followed);
      await page.keyboard.press('Control+Shift+z');
      await expect.poll(async () => page.getByTestId('points-table').locator('tbody tr').count()).toBe(followed - 1);
      await page.getByTestId('primary-action').click();
      await expect.poll(async () => page.getByTestId('track-state').textContent()).toContain(`${followed - 1} marks saved`);

      // Calibrate: a 10 m line along the ground from the launch point, the origin under the release.
      await page.getByTestId('trace-panel-switch').getByText('Calibrate').click();
      await page.getByTestId('calibration-panel').waitFor();
      await page.getByTestId('calib-tool-scale').click();
      const a = await imageToPage(page, { x: LAUNCH_X, y: GROUND_Y });
      const b = await imageToPage(page, { x: LAUNCH_X + SCALE_M * PX_PER_M, y: GROUND_Y });
      await page.mouse.move(a.x, a.y);
      await page.mouse.down();
      await page.mouse.move(b.x, b.y, { steps: 8 });
      await page.mouse.up();
      await page.getByTestId('calib-tool-origin').click();
      await page.mouse.click(a.x, a.y);
      await page.getByTestId('calib-distance').locator('input').fill(String(SCALE_M));
      await page.getByTestId('calib-distance').locator('input').press('Tab');
      const mmPerPx = Number.parseFloat((await page.getByTestId('calib-mpp').textContent()) ?? '');
      // The line is drawn on screen pixels, so it is only as exact as the zoom allows: within 2 %.
      expect(mmPerPx).toBeGreaterThan((1000 / PX_PER_M) * 0.98);
      expect(mmPerPx).toBeLessThan((1000 / PX_PER_M) * 1.02);
      await screenshot(page, 'trace-07-calibration');
      await page.getByTestId('calib-save').click();
      await page.getByTestId('calib-saved').waitFor();

      // Fit: the flight leaves "traced".
      await page.getByTestId('trace-panel-switch').getByText('Mark the ball').click();
      await page.getByTestId('trace-fit').click();
      await expect
        .poll(async () => item.getByTestId('flight-status').getAttribute('data-status'), { timeout: 60000 })
        .toMatch(/^(fitted|needs_attention)$/);
      const path = await screenshot(page, 'trace-08-fitted');
      expect(statSync(path).size).toBeGreaterThan(20_000);

      // The clip page lists the flight and the calibration.
      await page.goto(clipUrl);
      await page.getByTestId('clip-calibration').waitFor();
      await page.locator('[data-testid="clip-flights"][data-loaded="true"]').waitFor();
      await expect(page.getByTestId('clip-flights').textContent()).resolves.toContain('Isla Brackwater');
      await screenshot(page, 'trace-09-clip');
      expect(errors).toEqual([]);
    });
  }, 300000);

  it('shows the track without editing tools when the flight\'s athlete opens it', async () => {
    expect(traceUrl).not.toBe('');
    await withPage(async (page, errors) => {
      await signIn(page, DEMO_USERS.athlete.email);
      await page.getByTestId('rail-clips').click();
      await page.getByTestId('clips-table').waitFor();
      await page.goto(traceUrl);
      await waitForFrame(page);
      await page.getByTestId('points-table').waitFor();
      expect(await page.getByTestId('trace-follow').count()).toBe(0);
      expect(await page.getByTestId('flight-add').count()).toBe(0);
      expect(await page.getByTestId('trace-panel-switch').count()).toBe(0);
      await expect(page.getByTestId('flight-item').first().textContent()).resolves.toContain('Isla Brackwater');
      await screenshot(page, 'trace-10-athlete');
      expect(errors).toEqual([]);
    });
  }, 120000);
});
