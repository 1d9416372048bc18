import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_USERS, launchBrowser, screenshot, signIn, withPage } from './support/browser';

/**
 * The club's own balls and a flight's release on the Trace screen, on the demo club (seeded by the global
 * setup): a coach adds a club ball from the flight dialog and picks it, then says the ball was kicked
 * from the ground and saves the release.
 */

/** The first demo clip that has a flight and frames to trace, found through the API with the page's session. */
async function demoClipWithFlight(page: Page): Promise<{ clubId: number; clipId: number }> {
  return page.evaluate(async () => {
    const me = (await (await fetch('/api/v1/auth/me')).json()) as { data: { memberships: { clubId: number }[] } };
    const clubId = me.data.memberships[0]!.clubId;
    const flights = (await (await fetch(`/api/v1/clubs/${clubId}/flights?pageSize=200`)).json()) as { data: { clipId: number }[] };
    // Most demo reps are seeded tracks without footage: take a clip whose frames are ready.
    for (const clipId of new Set(flights.data.map((f) => f.clipId))) {
      const clip = (await (await fetch(`/api/v1/clubs/${clubId}/clips/${clipId}`)).json()) as { data?: { framesReady?: boolean } };
      if (clip.data?.framesReady) return { clubId, clipId };
    }
    throw new Error('No demo clip with frames: see test-results/e2e-server.log for the worker.');
  });
}

describe('Trace: club balls and the release', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser.close();
  });

  it('adds a club ball from the flight dialog and shows it beside the catalogue', async () => {
    await withPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.coach.email);
      const { clipId } = await demoClipWithFlight(page);
      await page.goto(`/clips/${clipId}/trace`);
      await page.getByTestId('flight-item').first().click();
      await page.locator('button[aria-label="Edit flight"]').click();
      await page.getByTestId('flight-club-balls').click();
      const dialog = page.getByTestId('club-balls-dialog');
      await dialog.getByTestId('club-ball-name').fill('Fennick play ball 40 cm');
      await dialog.getByTestId('club-ball-mass').locator('input').fill('350');
      await dialog.getByTestId('club-ball-diameter').locator('input').fill('40');
      await dialog.getByTestId('club-ball-save').click();
      // Adding the ball picks it for the flight and closes the list.
      await expect.poll(async () => (await page.getByTestId('flight-ball').textContent()) ?? '').toContain('Fennick play ball 40 cm');
      await page.getByTestId('flight-club-balls').click();
      await expect.poll(async () => (await dialog.getByTestId('club-balls-list').textContent()) ?? '').toContain('350 g · 40 cm');
      await screenshot(page, 'club-balls-dialog');
      await dialog.getByTestId('club-balls-done').click();
      await page.getByTestId('flight-ball').click();
      await expect(page.getByRole('option', { name: 'Fennick play ball 40 cm' }).isVisible()).resolves.toBe(true);
      await screenshot(page, 'flight-dialog-ball-groups');
      expect(errors).toEqual([]);
    });
  });

  it('saves a release from the ground and says so on the Trace screen', async () => {
    await withPage(browser, async (page, errors) => {
      await signIn(page, DEMO_USERS.coach.email);
      const { clipId } = await demoClipWithFlight(page);
      await page.goto(`/clips/${clipId}/trace`);
      await page.getByTestId('flight-item').first().click();
      const panel = page.getByTestId('release-panel');
      await expect.poll(async () => (await panel.getByTestId('release-summary').textContent()) ?? '').toMatch(/^The first mark counts as the release/);
      await panel.getByTestId('release-choice').getByText('At a height').click();
      await panel.getByRole('button', { name: 'Ground or tee' }).click();
      await panel.getByTestId('release-save').click();
      await expect.poll(async () => (await panel.getByTestId('release-summary').textContent()) ?? '').toMatch(/^Released at 0(\.0)? m above the ground/);
      await screenshot(page, 'trace-release-panel');
      expect(errors).toEqual([]);
    });
  });
});
