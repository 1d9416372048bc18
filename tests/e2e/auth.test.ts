import { statSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_CLUB, DEMO_USERS, launchBrowser, railEntries, screenshot, signIn, signOut, withPage as withPageOf } from './support/browser';

/** The rail entries of the shell itself; other entries may sit between them. */
const SHELL_ENTRIES = ['overview', 'my-flights', 'squad', 'club'];

describe('sign-in and the app shell', () => {
  let browser: Browser;

  beforeAll(async () => {
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
  });

  const withPage = (run: (page: Page, errors: string[]) => Promise<void>) => withPageOf(browser, run);

  it('signs up, shows the shell, signs out and signs in again when a new coach creates a club', async () => {
    await withPage(async (page, errors) => {
      const stamp = Date.now().toString(36);
      const email = `e2e-${stamp}@harrowmere.example`;
      const password = 'long-enough 42';
      const clubName = `Harrowmere Kickers ${stamp}`;

      await page.goto('/signup');
      await page.getByLabel('Your name').fill('Odile Penhallow');
      await page.getByLabel('E-mail').fill(email);
      await page.locator('#signup-password').fill(password);
      await page.getByLabel('Club name').fill(clubName);
      await page.getByTestId('signup-submit').click();

      await page.getByTestId('rail').waitFor();
      expect(new URL(page.url()).pathname).toBe('/');
      await expect(page.getByTestId('club-switcher-name').textContent()).resolves.toBe(clubName);
      await expect(page.getByTestId('overview-club-name').textContent()).resolves.toBe(clubName);
      await expect(page.getByTestId('overview-role').getAttribute('data-role')).resolves.toBe('admin');
      await expect(page.getByTestId('overview-role').textContent()).resolves.toContain('Club admin');
      await expect(page.getByTestId('count-admins').textContent()).resolves.toContain('1');
      await expect(page.getByTestId('rail-user-name').textContent()).resolves.toBe('Odile Penhallow');
      expect((await railEntries(page)).filter((name) => SHELL_ENTRIES.includes(name))).toEqual(['overview', 'squad', 'club']);
      await screenshot(page, 'signup-overview');

      await signOut(page);
      await page.goto('/');
      await page.waitForURL(/\/signin/);

      await signIn(page, email, password);
      await expect(page.getByTestId('overview-club-name').textContent()).resolves.toBe(clubName);
      const path = await screenshot(page, 'signin-again-overview');
      expect(statSync(path).size).toBeGreaterThan(10_000);
      expect(errors).toEqual([]);
    });
  });

  it('signs in through the Google stand-in and opens a personal club when the person is new', async () => {
    await withPage(async (page, errors) => {
      const email = `e2e-google-${Date.now().toString(36)}@brackenfold.example`;
      await page.goto('/signin');
      await page.getByTestId('signin-google').click();
      // The local OAuth fake shows its own small form in place of Google's pages.
      await page.locator('input[name="email"]').waitFor();
      await page.locator('input[name="email"]').fill(email);
      await page.locator('input[name="name"]').fill('Tamsin Olderoy');
      await page.getByRole('button', { name: 'Continue' }).click();
      await page.getByTestId('rail').waitFor();
      expect(new URL(page.url()).pathname).toBe('/');
      await expect(page.getByTestId('rail-user-name').textContent()).resolves.toBe('Tamsin Olderoy');
      await expect(page.getByTestId('overview-role').getAttribute('data-role')).resolves.toBe('admin');
      expect(errors).toEqual([]);
    });
  });

  it('shows the messages of the shared schema under the inputs when the sign-in form is sent empty', async () => {
    await withPage(async (page) => {
      await page.goto('/signin');
      await page.getByTestId('signin-submit').click();
      await expect(page.locator('#signin-email-error').textContent()).resolves.toMatch(/e-mail address/i);
      await expect(page.locator('#signin-password-error').textContent()).resolves.toBe('Enter your password.');
    });
  });

  it('says the sign-in failed and stays on the page when the password is wrong', async () => {
    await withPage(async (page) => {
      await page.goto('/signin');
      await page.getByLabel('E-mail').fill(DEMO_USERS.coach.email);
      await page.locator('#signin-password').fill('not-the-password-1');
      await page.getByTestId('signin-submit').click();
      await page.getByTestId('form-error').waitFor();
      expect(new URL(page.url()).pathname).toBe('/signin');
      await screenshot(page, 'signin-wrong-password');
    });
  });

  it('sends a signed-out visitor to sign-in and back to the wanted page afterwards', async () => {
    await withPage(async (page) => {
      await page.goto('/squad');
      await page.waitForURL((url) => url.pathname === '/signin' && url.searchParams.get('redirect') === '/squad');
      await page.getByLabel('E-mail').fill(DEMO_USERS.coach.email);
      await page.locator('#signin-password').fill('arcwright-demo');
      await page.getByTestId('signin-submit').click();
      await page.waitForURL((url) => url.pathname === '/squad');
      await page.getByTestId('members-table').waitFor();
      await expect(page.getByTestId('page-title').textContent()).resolves.toBe('Squad');
      await screenshot(page, 'coach-squad');
    });
  });

  const expectations = {
    admin: ['overview', 'squad', 'club'],
    coach: ['overview', 'squad'],
    athlete: ['my-flights'],
  } as const;

  for (const role of ['admin', 'coach', 'athlete'] as const) {
    it(`shows the ${role} only the rail entries of the role when the demo ${role} signs in`, async () => {
      await withPage(async (page, errors) => {
        await signIn(page, DEMO_USERS[role].email);
        if (role === 'athlete') {
          // An athlete lands on My flights, not on the staff's Overview.
          await page.getByTestId('my-flights').waitFor();
          await expect(page.getByTestId('my-flights-club').getAttribute('data-role')).resolves.toBe(role);
        } else {
          await expect(page.getByTestId('overview-club-name').textContent()).resolves.toBe(DEMO_CLUB);
          await expect(page.getByTestId('overview-role').getAttribute('data-role')).resolves.toBe(role);
        }
        await expect(page.getByTestId('rail-user-name').textContent()).resolves.toBe(DEMO_USERS[role].name);

        const entries = await railEntries(page);
        expect(entries.filter((name) => SHELL_ENTRIES.includes(name))).toEqual([...expectations[role]]);

        if (role === 'athlete') {
          await expect(page.getByTestId('my-profile-name').textContent()).resolves.toBe(DEMO_USERS.athlete.name);
          // A typed address of a page the role may not open leads back to the athlete's start, My flights.
          await page.goto('/club');
          await page.waitForURL((url) => url.pathname === '/my-flights');
        }
        await screenshot(page, `${role}-overview`);
        expect(errors).toEqual([]);
      });
    });
  }

  it('turns the rail into a bar with a labelled menu when the screen is narrow', async () => {
    await withPage(async (page) => {
      await page.setViewportSize({ width: 480, height: 860 });
      await signIn(page, DEMO_USERS.coach.email);
      await page.getByTestId('overview-club-name').waitFor();
      const rail = await page.getByTestId('rail').boundingBox();
      // Across the top, not a column beside the content.
      expect(rail?.width).toBe(480);
      expect(rail?.height).toBeLessThan(80);
      await expect(page.getByTestId('rail-squad').isVisible()).resolves.toBe(false);
      const toggle = page.getByTestId('rail-menu');
      await expect(toggle.getAttribute('aria-expanded')).resolves.toBe('false');
      await toggle.click();
      await expect(toggle.getAttribute('aria-expanded')).resolves.toBe('true');
      // Every link keeps its text label (its accessible name).
      await expect(page.getByRole('link', { name: 'Squad' }).isVisible()).resolves.toBe(true);
      await expect(page.getByRole('button', { name: 'Sign out' }).isVisible()).resolves.toBe(true);
      await screenshot(page, 'coach-overview-narrow-menu');
      await page.getByRole('link', { name: 'Sessions' }).click();
      await page.waitForURL(/\/sessions/);
      // Going to another screen closes the menu.
      await expect(toggle.getAttribute('aria-expanded')).resolves.toBe('false');
      await screenshot(page, 'coach-sessions-narrow');
    });
  });

  it('shows the rules under the sign-up inputs when the form is sent empty', async () => {
    await withPage(async (page) => {
      await page.goto('/signup');
      await page.getByTestId('signup-submit').click();
      await expect(page.locator('.aw-field__error').count()).resolves.toBeGreaterThanOrEqual(4);
      await expect(page.getByText('Enter the name of your club or team (at least 2 characters).').count()).resolves.toBe(1);
      await screenshot(page, 'signup-empty');
    });
  });

  it('lists members with a role picker and filters them when the admin opens Squad', async () => {
    await withPage(async (page) => {
      await signIn(page, DEMO_USERS.admin.email);
      await page.getByTestId('rail-squad').click();
      await page.getByTestId('members-table').waitFor();
      await expect(page.locator('[data-testid="members-table"] tbody tr').count()).resolves.toBe(3);
      await expect(page.locator('[data-testid^="role-select-"]').count()).resolves.toBe(3);
      await page.getByTestId('club-switcher').click();
      await page.locator('#aw-club-menu').waitFor();
      await screenshot(page, 'admin-squad');
      await page.keyboard.press('Escape');
      await page.getByTestId('members-filter').fill('quill');
      await expect(page.locator('[data-testid="members-table"] tbody tr').count()).resolves.toBe(1);
      await expect(page.locator('[data-testid="members-table"] tbody').textContent()).resolves.toContain(DEMO_USERS.coach.name);
    });
  });

  it('asks before a role changes and keeps the last admin when the admin tries to step down', async () => {
    await withPage(async (page) => {
      await signIn(page, DEMO_USERS.admin.email);
      await page.getByTestId('rail-squad').click();
      await page.getByTestId('members-table').waitFor();

      const coachRow = page.locator('[data-testid="members-table"] tbody tr', { hasText: DEMO_USERS.coach.name });
      await coachRow.locator('[data-testid^="role-select-"]').click();
      await page.getByRole('option', { name: 'Athlete' }).click();
      await page.locator('.p-confirmdialog').waitFor();
      await screenshot(page, 'admin-role-confirm');
      await page.getByRole('button', { name: 'Keep role' }).click();
      await expect(coachRow.locator('[data-testid^="role-select-"]').textContent()).resolves.toContain('Coach');

      const adminRow = page.locator('[data-testid="members-table"] tbody tr', { hasText: DEMO_USERS.admin.name });
      await adminRow.locator('[data-testid^="role-select-"]').click();
      await page.getByRole('option', { name: 'Coach' }).click();
      await page.getByTestId('confirm-role').click();
      // The server refuses to demote the last admin; the one error toast says why and the row keeps its role.
      await page.locator('.p-toast-message').first().waitFor();
      await expect(page.locator('.p-toast-message').first().textContent()).resolves.toMatch(/admin/i);
      await expect(adminRow.locator('[data-testid^="role-select-"]').textContent()).resolves.toContain('Club admin');
      await screenshot(page, 'admin-last-admin-refused');
    });
  });

  it('adds an athlete profile with inline validation when the admin uses the primary action', async () => {
    await withPage(async (page) => {
      await signIn(page, DEMO_USERS.admin.email);
      await page.getByTestId('rail-squad').click();
      await page.getByTestId('primary-action').filter({ hasText: 'Add athlete' }).click();
      await page.getByTestId('athlete-form').waitFor();
      await page.getByTestId('athlete-save').click();
      await expect(page.locator('[data-testid="athlete-form"] .aw-field__error').first().textContent()).resolves.toBe('Enter the athlete’s name.');
      await page.getByLabel('Name').fill('Corwen Ashdale');
      await page.locator('#athlete-birth-year').fill('2010');
      await page.getByLabel('Position or event').fill('winger');
      await screenshot(page, 'admin-add-athlete');
      await page.getByTestId('athlete-save').click();
      await page.getByTestId('athlete-form').waitFor({ state: 'detached' });
      await expect(page.locator('[data-testid="athletes-table"] tbody').textContent()).resolves.toContain('Corwen Ashdale');
    });
  });

  it('lets the admin edit the club with inline validation when the name is cleared', async () => {
    await withPage(async (page) => {
      await signIn(page, DEMO_USERS.admin.email);
      await page.getByTestId('rail-club').click();
      await page.getByTestId('club-form').waitFor();
      await page.getByTestId('club-name').fill('');
      await page.getByTestId('club-name').blur();
      await expect(page.getByTestId('club-name-error').textContent()).resolves.toMatch(/club name/i);
      await screenshot(page, 'admin-club-invalid');
      await page.getByTestId('club-name').fill(DEMO_CLUB);
      await expect(page.getByTestId('club-name-error').count()).resolves.toBe(0);
    });
  });
});
