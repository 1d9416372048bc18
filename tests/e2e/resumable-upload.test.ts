import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page, Request, Route } from 'playwright-core';
import { DEMO_USERS, launchBrowser, screenshot, signIn, withPage } from './support/browser';
import { renderClip } from './support/clips';

/**
 * A video upload through the upload dialog goes over the resumable protocol: the connection drops (every part
 * refused by the network), the page is reloaded, the coach chooses the same file again, and the upload carries on
 * with the upload the server already holds (one creation only) until the clip is kept and processed. And when
 * the answer to the last part is lost, the page learns the kept clip instead of sending the file again.
 */
/** Methods of the requests the page sends to the resumable-upload addresses, in order. */
function recordUploadCalls(page: Page): string[] {
  const calls: string[] = [];
  page.on('request', (req: Request) => {
    if (/\/clips\/uploads(\/|$)/.test(new URL(req.url()).pathname)) calls.push(req.method());
  });
  return calls;
}

/** Signs the coach in, creates a session and opens it. */
async function openNewSession(page: Page, venue: string): Promise<void> {
  await signIn(page, DEMO_USERS.coach.email);
  await page.getByTestId('rail-sessions').click();
  await page.getByTestId('sessions-table').waitFor();
  await page.getByTestId('primary-action').click();
  await page.getByTestId('session-venue').fill(venue);
  await page.getByTestId('session-save').click();
  await page.getByTestId('session-dialog').waitFor({ state: 'detached' });
  await page.getByRole('link', { name: venue }).click();
  await page.getByTestId('session-facts').waitFor();
}

async function chooseAndUpload(page: Page, videoPath: string): Promise<void> {
  await page.getByTestId('primary-action').click();
  await page.getByTestId('upload-file').setInputFiles(videoPath);
  await page.getByTestId('upload-submit').click();
}

describe('Clips: a resumable video upload that survives a dropped connection and a reload', () => {
  let browser: Browser;
  let workDir: string;
  let videoPath: string;

  beforeAll(async () => {
    workDir = mkdtempSync(join(tmpdir(), 'arcwright-e2e-resumable-'));
    videoPath = renderClip(join(workDir, 'fennick-kick.mp4'), { width: 320, height: 240, captureFps: 30, durationS: 1.2, ballRadiusPx: 5, seed: 3 }).videoPath;
    browser = await launchBrowser();
  }, 120000);

  afterAll(async () => {
    await browser?.close();
    if (workDir) rmSync(workDir, { recursive: true, force: true });
  });

  it('resumes after a dropped connection and a reload, creating the upload once, and the clip is processed', async () => {
    await withPage(browser, async (page, errors) => {
      const calls = recordUploadCalls(page);
      let dropParts = true;
      let dropped = 0;
      await page.route('**/clips/uploads/*', async (route: Route) => {
        if (route.request().method() === 'PATCH' && dropParts) {
          dropped++;
          await route.abort('connectionreset');
        } else await route.continue();
      });

      await openNewSession(page, `Fennick Vale, east pitch ${Date.now().toString(36)}`);

      // First try: every part is cut off by the network; the client keeps retrying.
      await chooseAndUpload(page, videoPath);
      await page.getByTestId('upload-progress').waitFor();
      await expect.poll(() => dropped, { timeout: 20000 }).toBeGreaterThanOrEqual(2);
      await screenshot(page, 'resumable-01-connection-dropped');

      // A reload, then the same file again: the earlier upload is picked up, not started anew.
      await page.reload();
      await page.getByTestId('session-facts').waitFor();
      await chooseAndUpload(page, videoPath);
      await page.getByTestId('upload-resumed').waitFor({ timeout: 10000 });
      await screenshot(page, 'resumable-02-carrying-on');
      dropParts = false;

      await page.getByTestId('upload-dialog').waitFor({ state: 'detached', timeout: 60000 });
      const card = page.getByTestId('clip-card').first();
      await card.waitFor();
      await card.locator('[data-testid="clip-status"][data-status="ready"]').waitFor({ timeout: 90000 });
      await screenshot(page, 'resumable-03-processed');

      expect(calls.filter((m) => m === 'POST')).toHaveLength(1);
      expect(calls).toContain('HEAD');
      expect(calls.filter((m) => m === 'PATCH').length).toBeGreaterThan(dropped);
      expect(errors.filter((e) => !/ERR_CONNECTION_RESET|Failed to load resource/.test(e))).toEqual([]);
    });
  });

  it('does not send the file again when the answer to its last part is lost: the clip is kept once', async () => {
    await withPage(browser, async (page) => {
      const calls = recordUploadCalls(page);
      let lostAnswers = 0;
      // The server receives the last part and keeps the clip; its answer never reaches the page.
      await page.route('**/clips/uploads/*', async (route: Route) => {
        if (route.request().method() === 'PATCH' && lostAnswers === 0) {
          lostAnswers++;
          await route.fetch();
          await route.abort('connectionreset');
        } else await route.continue();
      });

      await openNewSession(page, `Fennick Vale, north pitch ${Date.now().toString(36)}`);
      await chooseAndUpload(page, videoPath);
      await page.getByTestId('upload-dialog').waitFor({ state: 'detached', timeout: 60000 });
      await page.getByTestId('clip-card').first().locator('[data-testid="clip-status"][data-status="ready"]').waitFor({ timeout: 90000 });
      await screenshot(page, 'resumable-04-answer-lost-clip-kept-once');
      expect(lostAnswers).toBe(1);
      expect(calls.filter((m) => m === 'POST')).toHaveLength(1);
      expect(calls.filter((m) => m === 'PATCH')).toHaveLength(1);
      expect(calls).toContain('HEAD');
      await page.reload();
      await page.getByTestId('clip-card').first().waitFor();
      expect(await page.getByTestId('clip-card').count()).toBe(1);
    });
  });
});
