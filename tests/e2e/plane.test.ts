import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_USERS, launchBrowser, screenshot, signIn, withPage } from './support/browser';
import { renderClip, type Truth } from './support/clips';

/**
 * The four-point plane calibration on the Trace screen: a coach uploads a clip filmed by a camera turned 30°
 * from square to the plane of flight, follows the ball from one click, picks "Plane (four points)", clicks the
 * corners of the 8 m × 3 m rectangle standing in that plane (first in a crossed order, which the panel refuses),
 * enters its size, sees the outline, sets the origin, saves and fits.
 */

/** The generator's tilted clip (tests/support/clips CLIP_SPECS.tilted; this project cannot import it). */
const SPEC = { width: 640, height: 360, captureFps: 60, durationS: 2.6, ballRadiusPx: 6, pxPerMetre: 24, launchXPx: 40, speedMps: 16, angleDeg: 40, seed: 37, tilt: { yawDeg: 30, rectangle: { fromXM: 2, widthM: 8, heightM: 3 } } };

interface Point {
  x: number;
  y: number;
}

/** Screen position of an image pixel, from the viewer's current zoom and pan (its data-view attribute). */
async function imageToPage(page: Page, p: Point): Promise<Point> {
  const viewer = page.getByTestId('trace-viewer');
  const [scale, ox, oy] = ((await viewer.getAttribute('data-view')) ?? '1,0,0').split(',').map(Number);
  const box = await viewer.boundingBox();
  if (!box) throw new Error('The frame viewer is not on screen.');
  return { x: box.x + p.x * scale + ox, y: box.y + p.y * scale + oy };
}

/** Clicks an image pixel, with the viewer scrolled into view first (entering a size can scroll the page past it). */
async function clickImage(page: Page, p: Point): Promise<void> {
  await page.getByTestId('trace-viewer').scrollIntoViewIfNeeded();
  const at = await imageToPage(page, p);
  await page.mouse.click(at.x, at.y);
}

async function waitForFrame(page: Page): Promise<void> {
  await page.locator('[data-testid="trace-viewer"][data-ready="true"]').waitFor({ timeout: 15000 });
}

async function pickOption(page: Page, testId: string, name: string | RegExp): Promise<void> {
  await page.getByTestId(testId).click();
  await page.getByRole('option', { name }).first().click();
}

/** The latest fit of the clip's flight, through the API with the page's session. */
async function latestFitOf(page: Page, clipId: number): Promise<{ launchSpeedMps: number; launchAngleDeg: number } | null> {
  return page.evaluate(async (id) => {
    const me = (await (await fetch('/api/v1/auth/me')).json()) as { data: { memberships: { clubId: number }[] } };
    const clubId = me.data.memberships[0]!.clubId;
    const flights = (await (await fetch(`/api/v1/clubs/${clubId}/flights?pageSize=200`)).json()) as { data: { id: number; clipId: number }[] };
    const flight = flights.data.find((f) => f.clipId === id);
    if (!flight) return null;
    const detail = (await (await fetch(`/api/v1/clubs/${clubId}/flights/${flight.id}`)).json()) as { data: { latestFit: { launchSpeedMps: number; launchAngleDeg: number } | null } };
    return detail.data.latestFit;
  }, clipId);
}

describe('Trace: the plane (four points) calibration on a tilted camera', () => {
  let browser: Browser;
  let workDir: string;
  let clip: { videoPath: string; truth: Truth };

  beforeAll(async () => {
    workDir = mkdtempSync(join(tmpdir(), 'arcwright-e2e-plane-'));
    clip = renderClip(join(workDir, 'fennick-throw-tilted.mp4'), SPEC);
    browser = await launchBrowser();
  }, 120000);

  afterAll(async () => {
    await browser?.close();
    if (workDir) rmSync(workDir, { recursive: true, force: true });
  });

  it('calibrates on the four corners of the rectangle, refusing a crossed order, and fits the flight', async () => {
    await withPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.coach.email);
      const plane = clip.truth.plane!;

      // A session, and the clip uploaded into it.
      await page.getByTestId('rail-sessions').click();
      await page.getByTestId('sessions-table').waitFor();
      await page.getByTestId('primary-action').click();
      const venue = `Fennick Vale, east pitch ${Date.now().toString(36)}`;
      await page.getByTestId('session-venue').fill(venue);
      await page.getByTestId('session-save').click();
      await page.getByTestId('session-dialog').waitFor({ state: 'detached' });
      await page.getByRole('link', { name: venue }).click();
      await page.getByTestId('session-facts').waitFor();
      await page.getByTestId('primary-action').click();
      await page.getByTestId('upload-file').setInputFiles(clip.videoPath);
      await page.getByTestId('upload-submit').click();
      await page.getByTestId('upload-dialog').waitFor({ state: 'detached', timeout: 60000 });
      const card = page.getByTestId('clip-card').first();
      await card.locator('[data-testid="clip-status"][data-status="ready"]').waitFor({ timeout: 90000 });
      await card.getByTestId('clip-trace').click();
      await page.waitForURL(/\/clips\/\d+\/trace/);
      const clipId = Number(/\/clips\/(\d+)\/trace/.exec(page.url())![1]);
      await waitForFrame(page);

      // A flight, followed from one click two frames after the launch.
      await page.getByTestId('flight-add').click();
      await pickOption(page, 'flight-athlete', /Isla Brackwater/);
      await pickOption(page, 'flight-action', 'Long throw');
      await pickOption(page, 'flight-ball', /Association football/);
      await page.getByTestId('flight-save').click();
      await page.getByTestId('flight-dialog').waitFor({ state: 'detached' });
      const start = clip.truth.frames[clip.truth.launchFrame + 2]!;
      const jump = page.getByTestId('frame-jump').locator('input');
      await jump.fill(String(start.frame));
      await jump.press('Enter');
      await waitForFrame(page);
      await clickImage(page, start);
      await page.getByTestId('trace-follow').click();
      await expect.poll(async () => page.getByTestId('points-table').locator('tbody tr').count(), { timeout: 60000 }).toBeGreaterThan(100);

      // The plane method: corners clicked in a crossed order are refused with a message that says what to do.
      await page.getByTestId('trace-panel-switch').getByText('Calibrate').click();
      await page.getByTestId('calibration-panel').waitFor();
      await page.getByTestId('calib-method').getByText('Plane (four points)').click();
      await page.getByTestId('calib-plane-width').locator('input').fill('8');
      await page.getByTestId('calib-plane-width').locator('input').press('Tab');
      await page.getByTestId('calib-plane-height').locator('input').fill('3');
      await page.getByTestId('calib-plane-height').locator('input').press('Tab');
      const [bl, br, tr, tl] = plane.corners as [Point, Point, Point, Point];
      for (const p of [bl, tr, br, tl]) await clickImage(page, p);
      await clickImage(page, plane.origin);
      await expect
        .poll(async () => (await page.getByTestId('calib-corners-error').textContent()) ?? '')
        .toMatch(/^The outline of the four corners crosses itself or bends inwards, so they are not in order round the rectangle: click them in turn, bottom left, bottom right, top right, top left\.$/);
      await expect(page.getByTestId('calib-save').isDisabled()).resolves.toBe(true);
      await screenshot(page, 'plane-01-crossed');

      // Cleared and clicked in order: the outline closes and the scale at the origin shows.
      await page.getByTestId('calib-clear-corners').click();
      for (const p of [bl, br, tr, tl]) await clickImage(page, p);
      await expect(page.getByTestId('calib-corners').textContent()).resolves.toBe('4 of 4');
      await expect(page.getByTestId('calib-corners-error').count()).resolves.toBe(0);
      const mmPerPx = Number.parseFloat((await page.getByTestId('calib-mpp').textContent()) ?? '');
      // Between the square-on picture's 1000 / 24 mm and half as much again (the origin is on the far side).
      expect(mmPerPx).toBeGreaterThan(1000 / SPEC.pxPerMetre);
      expect(mmPerPx).toBeLessThan(1500 / SPEC.pxPerMetre);
      await screenshot(page, 'plane-02-outline');
      await page.getByTestId('calib-save').click();
      await page.getByTestId('calib-saved').waitFor();

      // Fit: the calibration's refit, then the figures against the generator's launch (clicks are whole screen pixels).
      await page.getByTestId('trace-panel-switch').getByText('Mark the ball').click();
      await page.getByTestId('trace-fit').click();
      await expect.poll(async () => (await latestFitOf(page, clipId))?.launchSpeedMps ?? null, { timeout: 60000 }).not.toBeNull();
      const fit = (await latestFitOf(page, clipId))!;
      expect(Math.abs(fit.launchSpeedMps - SPEC.speedMps) / SPEC.speedMps).toBeLessThan(0.03);
      expect(Math.abs(fit.launchAngleDeg - SPEC.angleDeg)).toBeLessThan(1.5);
      await screenshot(page, 'plane-03-fitted');

      // The clip page names the method and the rectangle.
      await page.goto(`/clips/${clipId}`);
      await expect.poll(async () => (await page.getByTestId('clip-calibration').textContent()) ?? '').toContain('plane, four points');
      expect(errors).toEqual([]);
    });
  }, 300000);
});
