import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { DEMO_USERS, launchBrowser, openChartPage, screenshot, settle, signIn, signOut } from './support/browser';
import { e2eQuery } from './support/db';

/**
 * The two home screens on the demo club: a coach's Overview with a flight needing attention, followed to its fix
 * in Trace; and an athlete's My flights with a note a coach shared and a youth workload caution.
 */

const FIT_WAIT_MS = 90000;
const OTHER_ATHLETES = ['Orrin Calloway', 'Saskia Fenwright', 'Bram Tolliver', 'Juno Pelham'];

/** Waits until the worker has fitted a demo flight; returns it. */
async function fittedFlight(): Promise<{ id: number; clipId: number }> {
  const deadline = Date.now() + FIT_WAIT_MS;
  for (;;) {
    const rows = await e2eQuery<{ id: number; clip_id: number }[]>("SELECT id, clip_id FROM flights WHERE status = 'fitted' ORDER BY id LIMIT 1");
    if (rows[0]) return { id: Number(rows[0].id), clipId: Number(rows[0].clip_id) };
    if (Date.now() > deadline) throw new Error('No demo flight was fitted within 90 s: is the e2e worker running? See test-results/e2e-server.log.');
    await new Promise((r) => setTimeout(r, 2000));
  }
}

async function flightStatus(id: number): Promise<string> {
  const rows = await e2eQuery<{ status: string }[]>('SELECT status FROM flights WHERE id = ?', [id]);
  return rows[0]?.status ?? 'missing';
}

describe('home screens', () => {
  let browser: Browser;

  beforeAll(async () => {
    browser = await launchBrowser();
  }, 60000);

  afterAll(async () => {
    await browser?.close();
  });

  it('lists a flight needing attention on a coach’s Overview and clears it once the coach refits it from the link', async () => {
    const flight = await fittedFlight();
    // The state a fit leaves when it flags a flight (as the fit job does for a scale that disagrees with gravity).
    const reason = 'The scale disagrees with the gravity fitted from the flight by 7 %. Check the calibration, then fit again.';
    await e2eQuery("UPDATE flights SET status = 'needs_attention', attention_reason = ?, updated_at = NOW() WHERE id = ?", [reason, flight.id]);

    const { context, page, errors } = await openChartPage(browser);
    try {
      await signIn(page, DEMO_USERS.coach.email);
      const attention = page.getByTestId('overview-attention');
      await attention.waitFor();
      const item = page.getByTestId('attention-item').filter({ hasText: reason });
      await item.waitFor();
      await page.getByTestId('overview-latest-session').waitFor();
      await settle(page);
      await screenshot(page, 'home-01-coach-overview');

      await item.getByTestId('attention-fix').click();
      await page.waitForURL((url) => url.pathname === `/clips/${flight.clipId}/trace` && url.searchParams.get('flight') === String(flight.id));
      await page.getByTestId('fit-panel').waitFor();
      await screenshot(page, 'home-02-attention-in-trace');
      await page.getByTestId('trace-fit').click();
      await expect.poll(() => flightStatus(flight.id), { timeout: 60000, interval: 1000 }).toBe('fitted');

      await page.getByTestId('rail-overview').click();
      await page.getByTestId('overview-attention').waitFor();
      await expect.poll(async () => page.getByTestId('attention-item').filter({ hasText: reason }).count(), { timeout: 10000 }).toBe(0);
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('shows an athlete on My flights the note a coach shared and the youth caution once the week goes over the club’s threshold', async () => {
    const isla = await e2eQuery<{ id: number }[]>(
      "SELECT a.id FROM athlete_profiles a JOIN users u ON u.id = a.user_id WHERE u.email = ?",
      [DEMO_USERS.athlete.email],
    );
    const athleteId = Number(isla[0]!.id);
    const own = await e2eQuery<{ id: number }[]>('SELECT id FROM flights WHERE athlete_profile_id = ? ORDER BY id LIMIT 1', [athleteId]);
    const noteText = `Shared from the report ${Date.now().toString(36)}: keep the follow-through long.`;

    const { context, page, errors } = await openChartPage(browser);
    try {
      await signIn(page, DEMO_USERS.coach.email);
      // The Squad links the athlete's page, where the coach counts reps that were not filmed.
      await page.getByTestId('rail-squad').click();
      await page.getByTestId('tab-athletes').click();
      // The demo seed put its youngest youth over a caution this week: the Squad marks her.
      await page.getByTestId('athlete-caution').first().waitFor();
      await screenshot(page, 'home-03-squad-caution');
      await page.getByTestId('athlete-link').filter({ hasText: DEMO_USERS.athlete.name }).click();
      await page.getByTestId('athlete-page').waitFor();
      await page.getByTestId('workload-panel').getByTestId('workload-chart').waitFor();
      await page.getByTestId('workload-action').click();
      await page.getByRole('option', { name: 'Punt', exact: true }).click();
      await page.getByTestId('workload-count').locator('input').fill('45');
      await page.getByTestId('workload-add').click();
      await page.getByTestId('workload-caution').waitFor();
      await settle(page);
      await screenshot(page, 'home-04-athlete-workload');

      // A note on the athlete's flight, shared with her.
      await page.goto(`/flights/${own[0]!.id}`);
      const notes = page.getByTestId('notes-panel');
      await notes.waitFor();
      await page.getByTestId('note-body').fill(noteText);
      await page.getByTestId('note-visibility').getByText('Shared with the athlete').click();
      await page.getByTestId('note-add').click();
      await notes.getByTestId('note').filter({ hasText: noteText }).waitFor();
      await signOut(page);

      await signIn(page, DEMO_USERS.athlete.email);
      await page.getByTestId('my-flights').waitFor();
      await page.getByTestId('my-notes').getByTestId('my-note').filter({ hasText: noteText }).waitFor();
      const caution = page.getByTestId('workload-caution');
      await caution.waitFor();
      const cautionText = (await caution.textContent()) ?? '';
      expect(cautionText).toContain('Punt');
      expect(cautionText).toContain('overuse injuries');
      expect(cautionText).toContain('governing body');
      expect(cautionText).toContain('not medical advice');
      await page.getByTestId('my-recent').getByTestId('my-flight').first().waitFor();
      await settle(page);
      const text = (await page.locator('main').textContent()) ?? '';
      for (const name of OTHER_ATHLETES) expect(text).not.toContain(name);
      await screenshot(page, 'home-05-my-flights');
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('shows the admin the club’s time zone and caution thresholds, and says what is missing in a new row', async () => {
    const { context, page, errors } = await openChartPage(browser);
    try {
      await signIn(page, DEMO_USERS.admin.email);
      await page.getByTestId('rail-club').click();
      await expect(page.getByTestId('club-time-zone').textContent()).resolves.toContain('Europe/London');
      const thresholds = page.getByTestId('club-thresholds');
      await thresholds.getByTestId('threshold-row').first().waitFor();
      const rows = await thresholds.getByTestId('threshold-row').count();
      expect(rows).toBeGreaterThan(0);
      await thresholds.getByText('Add a threshold').click();
      await page.getByTestId('thresholds-save').click();
      await thresholds.getByText('Pick an action.').first().waitFor();
      await screenshot(page, 'home-06-club-thresholds');
      await thresholds.getByRole('button', { name: `Remove row ${rows + 1}` }).click();
      await expect(thresholds.getByTestId('threshold-row').count()).resolves.toBe(rows);
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
