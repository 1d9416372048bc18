import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, DEMO_USERS, launchBrowser, screenshot, signIn, signOut, withPage as withPageOf } from './support/browser';

interface SinkMessage {
  id: number;
  to: string;
  subject: string;
  text: string;
  html: string;
}

/** The newest e-mail to `address` in the development mailbox, waiting for it to arrive. */
async function mailTo(address: string, since = 0): Promise<SinkMessage> {
  const deadline = Date.now() + 15000;
  for (;;) {
    const messages = (await (await fetch(`${baseUrl()}/dev/mailbox.json`)).json()) as SinkMessage[];
    const found = messages.find((m) => m.to.includes(address) && m.id > since);
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`No e-mail to ${address} reached the development mailbox.`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

function linkIn(message: SinkMessage, path: string): string {
  const match = new RegExp(`https?://[^\\s]+${path}[A-Za-z0-9_-]{43}`).exec(message.text);
  if (!match) throw new Error(`No ${path} link in "${message.subject}".`);
  return match[0];
}

describe('invitations and password reset by e-mail', () => {
  let browser: Browser;
  const stamp = Date.now().toString(36);
  const invitee = `saskia.fenwright.${stamp}@fennickvale.example`;
  const firstPassword = 'Outfield-throw 2010';
  const secondPassword = 'Second-throw 2011';

  beforeAll(async () => {
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
  });

  const withPage = (run: (page: Page, errors: string[]) => Promise<void>) => withPageOf(browser, run);

  it('sends the invitation, and the invitee follows the e-mailed link, sets a password, signs in and sees only her flights', async () => {
    await withPage(async (page, errors) => {
      await signIn(page, DEMO_USERS.admin.email);
      await page.goto('/squad');
      await page.getByTestId('invite-open').click();
      await page.getByTestId('invite-email').fill('not an address');
      await page.getByTestId('invite-email').blur();
      await expect(page.getByTestId('invite-email-error').textContent()).resolves.toBe('That is not an e-mail address: write it like name@club.example.');
      await page.getByTestId('invite-email').fill(invitee);
      await page.locator('#invite-profile').click();
      await page.getByRole('option', { name: 'Saskia Fenwright' }).click();
      await screenshot(page, 'invite-dialog');
      await page.getByTestId('invite-send').click();
      await page.getByTestId('invitations-table').getByText(invitee).waitFor();
      await screenshot(page, 'invitations-list');

      const message = await mailTo(invitee);
      expect(message.subject).toBe('Maren Holloway invites you to Fennick Vale Sporting Club on Arcwright');
      const link = linkIn(message, '/join/');
      await page.goto('/dev/mailbox');
      await page.getByText(message.subject).first().waitFor();
      await screenshot(page, 'dev-mailbox');
      await signOutIfShell(page);
      expect(errors).toEqual([]);

      await page.goto(link);
      await page.getByTestId('join-form').waitFor();
      await expect(page.getByTestId('join-email').textContent()).resolves.toBe(invitee);
      await page.getByLabel('Your name').fill('Saskia Fenwright');
      await page.locator('#join-password').fill(firstPassword);
      await screenshot(page, 'join-page');
      await page.getByTestId('join-submit').click();
      await page.getByTestId('rail').waitFor();
      await expect(page.getByTestId('rail-user-name').textContent()).resolves.toBe('Saskia Fenwright');
      await page.getByTestId('my-flights').waitFor();
      await expect(page.getByTestId('my-flights-club').getAttribute('data-role')).resolves.toBe('athlete');
      await screenshot(page, 'joined-my-flights');

      await signOut(page);
      await signIn(page, invitee, firstPassword);
      await expect(page.getByTestId('rail-user-name').textContent()).resolves.toBe('Saskia Fenwright');

      // The invitation was tied to the demo profile "Saskia Fenwright": she sees its flights and nobody else's.
      await page.getByTestId('rail-flights').click();
      await page.getByTestId('flights-table').waitFor();
      const links = page.locator('[data-testid="flights-table"] [data-testid="flight-link"]');
      await expect.poll(() => links.count()).toBeGreaterThan(0);
      expect([...new Set((await links.allTextContents()).map((t) => t.trim()))]).toEqual(['Saskia Fenwright']);
      await screenshot(page, 'joined-own-flights');
      expect(errors).toEqual([]);
    });
  });

  it('resets a password through the e-mailed link and signs in with the new one', async () => {
    await withPage(async (page, errors) => {
      const before = (await mailTo(invitee)).id;
      await page.goto('/signin');
      await page.getByTestId('signin-forgot').click();
      await page.locator('#forgot-email').fill(invitee);
      await page.getByTestId('forgot-submit').click();
      await page.getByTestId('forgot-answer').waitFor();
      await screenshot(page, 'forgot-password-sent');

      const message = await mailTo(invitee, before);
      expect(message.subject).toBe('Choose a new Arcwright password');
      await page.goto(linkIn(message, '/reset-password/'));
      await page.getByTestId('reset-form').waitFor();
      await page.locator('#reset-password').fill(secondPassword);
      await screenshot(page, 'reset-password');
      await page.getByTestId('reset-submit').click();
      await page.getByTestId('signin-notice').waitFor();
      await expect(page.getByTestId('signin-notice').textContent()).resolves.toContain('Your password is changed');

      await signIn(page, invitee, secondPassword);
      await expect(page.getByTestId('rail-user-name').textContent()).resolves.toBe('Saskia Fenwright');
      expect(errors).toEqual([]);
    });
  });
});

/** Leaves the admin's session before opening the invitee's link in the same browser. */
async function signOutIfShell(page: Page): Promise<void> {
  await page.goto('/');
  await page.getByTestId('rail').waitFor();
  await signOut(page);
}
