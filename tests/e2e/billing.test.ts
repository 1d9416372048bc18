/**
 * Seats & billing in the browser: a new club starts on its trial, the admin buys a plan through the payment
 * fake's hosted checkout (first with the declined card, which leaves the trial as it was, then with the good
 * one) and the seats become active once the provider's webhooks arrive; the demo club shows its invoices.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_USERS, launchBrowser, screenshot, signIn, withPage as withBrowserPage } from './support/browser';

// The fake's test cards and the app's default key for it (server/fakes/payment.ts, .env.example); this
// project cannot import server code.
const CARD_PAYS = '4782 1000 0000 0008';
const CARD_DECLINED = '4782 2000 0000 0006';
const FAKE_SECRET_KEY = 'sk_test_arcwright_local';

describe('Seats & billing', () => {
  let browser: Browser;

  beforeAll(async () => {
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
  });

  const withPage = (run: (page: Page, errors: string[]) => Promise<void>) => withBrowserPage(browser, run);

  /** Sets the card on file through the provider's portal page and comes back to Seats & billing. */
  async function changeCard(page: Page, card: string, confirmation: string): Promise<void> {
    await page.getByTestId('primary-action').click();
    await page.waitForURL(/\/portal\/bps_/);
    await page.getByLabel('New card number').fill(card);
    await page.getByRole('button', { name: 'Use this card' }).click();
    await expect(page.getByRole('status').textContent()).resolves.toBe(confirmation);
    await page.getByRole('link', { name: 'Back to Arcwright' }).click();
    await page.getByTestId('billing-summary').waitFor();
  }

  /** The status word after reloading: the provider's webhooks arrive on their own time. */
  async function statusAfterReload(page: Page): Promise<string | null> {
    await page.reload();
    await page.getByTestId('billing-summary').waitFor();
    return page.getByTestId('billing-status').textContent();
  }

  /** Picks Sideline for 6 seats and pays on the hosted checkout page; returns that page's URL. */
  async function pickPlanAndPay(page: Page, card: string): Promise<URL> {
    await page.getByTestId('plan-sideline').click();
    const seats = page.getByTestId('pick-seats').locator('input');
    await seats.fill('6');
    await seats.blur();
    await expect(page.getByTestId('pick-total').textContent()).resolves.toContain('€24.00');
    await page.getByTestId('checkout-start').click();
    await page.waitForURL(/\/pay\/cs_/);
    await expect(page.getByTestId('checkout-total').textContent()).resolves.toContain('€24.00 per month');
    await page.getByLabel('Name on card').fill('Odile Penhallow');
    await page.getByLabel('Card number').fill(card);
    const checkoutUrl = new URL(page.url());
    await page.getByRole('button', { name: 'Pay and start the subscription' }).click();
    return checkoutUrl;
  }

  it('buys a plan through the hosted checkout after a declined card when a new club is on its trial', async () => {
    await withPage(async (page, errors) => {
      const stamp = Date.now().toString(36);
      await page.goto('/signup');
      await page.getByLabel('Your name').fill('Odile Penhallow');
      await page.getByLabel('E-mail').fill(`e2e-billing-${stamp}@harrowmere.example`);
      await page.locator('#signup-password').fill('long-enough 42');
      await page.getByLabel('Club name').fill(`Harrowmere Throwers ${stamp}`);
      await page.getByTestId('signup-submit').click();
      await page.getByTestId('rail').waitFor();

      await page.getByTestId('rail-billing').click();
      await page.getByTestId('billing-summary').waitFor();
      await expect(page.getByTestId('billing-status').textContent()).resolves.toBe('Free trial');
      await expect(page.getByTestId('billing-seats').textContent()).resolves.toBe('0 of 10 in use');
      await screenshot(page, 'billing-trial');

      await pickPlanAndPay(page, CARD_DECLINED);
      await expect(page.getByRole('alert').textContent()).resolves.toContain('The card was declined');
      await screenshot(page, 'billing-checkout-declined');
      await page.getByRole('link', { name: 'Go back without paying' }).click();
      await page.getByTestId('checkout-cancelled').waitFor();
      await expect(page.getByTestId('billing-status').textContent()).resolves.toBe('Free trial');
      await expect(page.getByTestId('billing-seats').textContent()).resolves.toBe('0 of 10 in use');

      const checkoutUrl = await pickPlanAndPay(page, CARD_PAYS);
      await page.waitForURL(/\/billing/);
      await page.getByTestId('seat-form').waitFor({ timeout: 30000 });
      await expect(page.getByTestId('billing-status').textContent()).resolves.toBe('Active');
      await expect(page.getByTestId('billing-seats').textContent()).resolves.toBe('0 of 6 in use');
      await expect(page.getByTestId('billing-next-invoice').textContent()).resolves.toContain('€24.00');
      await expect(page.getByTestId('invoice-table').locator('tbody tr').count()).resolves.toBe(1);
      await expect(page.getByTestId('invoice-table').textContent()).resolves.toContain('Paid');
      await screenshot(page, 'billing-active');

      // The renewal fails on a declined card: the banner tells the admin how to fix it; a good card pays.
      await changeCard(page, CARD_DECLINED, 'Card saved.');
      const fake = checkoutUrl.origin;
      const session = await fetch(`${fake}/v1${checkoutUrl.pathname.replace('/pay/', '/checkout/sessions/')}`, { headers: { authorization: `Bearer ${FAKE_SECRET_KEY}` } });
      const { subscription } = (await session.json()) as { subscription: string };
      expect((await fetch(`${fake}/_fake/subscriptions/${subscription}/renew`, { method: 'POST' })).status).toBe(200);
      await expect.poll(() => statusAfterReload(page)).toBe('Payment overdue');
      await expect(page.getByTestId('subscription-banner').textContent()).resolves.toContain('Change the card on Seats & billing');
      await expect(page.getByTestId('invoice-table').textContent()).resolves.toContain('Payment failed');
      await screenshot(page, 'billing-payment-overdue');

      await changeCard(page, CARD_PAYS, 'Card saved, and the open invoice is paid.');
      await expect.poll(() => statusAfterReload(page)).toBe('Active');
      await page.getByTestId('subscription-banner').waitFor({ state: 'detached' });
      expect(errors).toEqual([]);
    });
  });

  it('shows the demo club’s subscription, seats in use and paid invoices when its admin opens the screen', async () => {
    await withPage(async (page, errors) => {
      await signIn(page, DEMO_USERS.admin.email);
      await page.getByTestId('rail-billing').click();
      await page.getByTestId('seat-form').waitFor();
      await expect(page.getByTestId('billing-status').textContent()).resolves.toBe('Active');
      await expect(page.getByTestId('billing-seats').textContent()).resolves.toBe('1 of 15 in use');
      await expect(page.getByTestId('invoice-table').locator('tbody tr').count()).resolves.toBe(4);
      await screenshot(page, 'billing-demo-club');
      expect(errors).toEqual([]);
    });
  });
});
