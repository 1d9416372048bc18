import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { DEMO_USERS, launchBrowser, screenshot, signIn, withPage } from './support/browser';
import { seriousViolations } from './support/axe';
import { renderClip, type Truth } from './support/clips';
import { apiWrite, demoClubId, listDemoFlights } from './support/demo';
import { goToFrame, imageToPage, waitForFrame } from './support/trace-page';

/**
 * A long kick filmed by a coach turning the phone to follow it, end to end in the browser: the generated clip pans
 * most of a picture width with a 2° roll; it is uploaded, calibrated on its first frame, followed from one mark; the
 * Trace screen shows the camera motion found, the fit runs, and the flight's report says it was filmed with a
 * moving camera.
 */

// The generator's panning scene (tests/support/clips CLIP_SPECS.panning): 480 / 36 px per metre, ground at 85 %.
const SPEC = { width: 480, height: 270, captureFps: 60, durationS: 2.4, ballRadiusPx: 5, launchXPx: 100, speedMps: 24, angleDeg: 38, seed: 31, pan: { panPx: 400, tiltPx: -30, rollDeg: 2 } };
const PX_PER_M = SPEC.width / 36;
const GROUND_Y = SPEC.height * 0.85;
const START = 14;

describe('Trace: a clip filmed with a panning camera', () => {
  let browser: Browser;
  let workDir: string;
  let clip: { videoPath: string; truth: Truth };

  beforeAll(async () => {
    workDir = mkdtempSync(join(tmpdir(), 'arcwright-e2e-camera-'));
    clip = renderClip(join(workDir, 'fennick-long-kick-panned.mp4'), SPEC);
    browser = await launchBrowser();
  }, 120000);

  afterAll(async () => {
    await browser?.close();
    if (workDir) rmSync(workDir, { recursive: true, force: true });
  });

  it('follows the ball through the pan, shows the camera motion, fits, and warns on the report', async () => {
    await withPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.coach.email);
      const clubId = await demoClubId(page);
      const athleteId = (await listDemoFlights(page))[0]!.athleteId;
      const session = (await apiWrite(page, 'POST', `/clubs/${clubId}/sessions`, { date: new Date().toISOString().slice(0, 10), venue: `Fennick Vale, long pitch ${Date.now().toString(36)}` })) as { data: { id: number } };

      // Upload the clip on the session's page and wait for its frames.
      await page.goto(`/sessions/${session.data.id}`);
      await page.getByTestId('primary-action').click();
      await page.getByTestId('upload-file').setInputFiles(clip.videoPath);
      await page.getByTestId('upload-submit').click();
      await page.getByTestId('upload-dialog').waitFor({ state: 'detached', timeout: 60000 });
      const card = page.getByTestId('clip-card').first();
      await card.locator('[data-testid="clip-status"][data-status="ready"]').waitFor({ timeout: 90000 });
      await card.getByTestId('clip-trace').click();
      await page.waitForURL(/\/clips\/\d+\/trace/);
      const clipId = Number(/\/clips\/(\d+)\/trace/.exec(page.url())![1]);

      // Calibrated on frame 0 (10 m along the ground as drawn) and a flight to follow.
      await apiWrite(page, 'PUT', `/clubs/${clubId}/clips/${clipId}/calibration`, {
        frame: 0,
        scale: { a: { xPx: SPEC.launchXPx, yPx: GROUND_Y }, b: { xPx: SPEC.launchXPx + 10 * PX_PER_M, yPx: GROUND_Y }, distanceM: 10 },
        origin: { xPx: SPEC.launchXPx, yPx: GROUND_Y },
        direction: 'right',
      });
      const flight = (await apiWrite(page, 'POST', `/clubs/${clubId}/clips/${clipId}/flights`, { athleteId, action: 'punt', ballId: 'football-5' })) as { data: { id: number } };
      await page.reload();
      await waitForFrame(page);
      await page.getByTestId('camera-panel').waitFor();
      await expect(page.getByTestId('camera-summary').textContent()).resolves.toContain('No camera motion found yet');
      await expect(page.getByTestId('camera-still').locator('input').isChecked()).resolves.toBe(false);

      // One mark where the generator drew the ball, then auto-follow.
      await goToFrame(page, START);
      const at = await imageToPage(page, clip.truth.frames[START]!);
      await page.mouse.click(at.x, at.y);
      await page.getByTestId('trace-follow').click();
      await expect.poll(async () => page.getByTestId('points-table').locator('tbody tr').count(), { timeout: 90000 }).toBeGreaterThan(40);
      await expect.poll(async () => page.getByTestId('camera-summary').textContent(), { timeout: 15000 }).toMatch(/^Camera moved: up to \d+ px of pan and [12]\.\d° of roll against frame 0/);
      await page.getByTestId('camera-chart').waitFor();
      await page.getByTestId('camera-panel').scrollIntoViewIfNeeded();
      await screenshot(page, 'camera-01-motion-found');

      // The screen with the panel passes axe's WCAG 2.1 A/AA rules (no serious or critical violation).
      expect(await seriousViolations(page)).toEqual([]);

      // Fit: the Measurement panel and the report carry the moving-camera warning.
      await page.getByTestId('trace-fit').click();
      await expect
        .poll(async () => page.getByTestId('flight-item').first().getByTestId('flight-status').getAttribute('data-status'), { timeout: 60000 })
        .toMatch(/^(fitted|needs_attention)$/);
      await expect.poll(async () => page.getByTestId('fit-panel').textContent()).toContain('Filmed with a moving camera: camera motion was estimated from the background');
      await page.goto(`/flights/${flight.data.id}`);
      await page.getByTestId('report-warnings').waitFor();
      await expect(page.getByTestId('report-warnings').textContent()).resolves.toMatch(
        /Filmed with a moving camera: camera motion was estimated from the background\. The figures carry the extra uncertainty of the motion estimate/,
      );
      await page.getByTestId('report-warnings').scrollIntoViewIfNeeded();
      await screenshot(page, 'camera-02-report-warning');

      // "Camera was still" on the clip is kept: the next follow skips the estimate.
      await page.goto(`/clips/${clipId}/trace`);
      await waitForFrame(page);
      await page.getByTestId('camera-still').click();
      const stillOf = async () => ((await (await page.request.get(`/api/v1/clubs/${clubId}/clips/${clipId}`)).json()) as { data: { cameraStill: boolean } }).data.cameraStill;
      await expect.poll(stillOf).toBe(true);
      await page.reload();
      await waitForFrame(page);
      await expect(page.getByTestId('camera-still').locator('input').isChecked()).resolves.toBe(true);
      expect(errors).toEqual([]);
    });
  }, 300000);
});
