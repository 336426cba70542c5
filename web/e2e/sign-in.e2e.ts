import fs from 'node:fs';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { navItemsFor } from '../src/app/core/shell/navigation';
import { launchChromium } from './support/browser';
import { eventually, expectEventually } from './support/eventually';
import { DEMO_PASSWORD, type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';

jest.setTimeout(90_000);

/** What each role may open: the one declared list (core/shell/navigation.ts). */
function labelsFor(role: 'admin' | 'lab_manager' | 'scientist'): string[] {
  return navItemsFor(role).map((item) => item.label);
}

const ROLES = [
  { email: 'admin@equilight.test', role: 'Administrator', nav: labelsFor('admin'), forbidden: null },
  {
    email: 'manager@equilight.test',
    role: 'Lab manager',
    nav: labelsFor('lab_manager'),
    forbidden: '/people',
  },
  { email: 'scientist@equilight.test', role: 'Scientist', nav: labelsFor('scientist'), forbidden: '/intake' },
];

describe('signing in through Chromium', () => {
  let server: RunningServer;
  let browser: Browser;
  const outsideRequests: string[] = [];
  const policyViolations: string[] = [];

  beforeAll(async () => {
    server = await startServer();
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  });
  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  it.each(ROLES)('$email sees the navigation of the $role role', async ({ email, role, nav, forbidden }) => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const page = await context.newPage();
    page.on('console', (msg) => {
      if (msg.text().includes('Content Security Policy')) policyViolations.push(msg.text());
    });
    page.on('request', (req) => {
      if (!req.url().startsWith(server.url) && !req.url().startsWith('data:'))
        outsideRequests.push(req.url());
    });
    await page.goto(`${server.url}/people`);
    await page.waitForURL(/\/sign-in/);
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByTestId('main-nav').waitFor();
    const labels = (await page.getByTestId('main-nav').locator('a').allInnerTexts()).map((t) =>
      t.replace(/^\S+\s*/, '').trim(),
    );
    expect(labels).toEqual(nav);
    await page.goto(`${server.url}/`);
    await expectEventually(() => page.getByTestId('role-label').innerText(), role);
    const iconFont = await page.evaluate(async () => {
      await document.fonts.ready;
      return [...document.fonts].some((f) => f.family.includes('Material Symbols') && f.status === 'loaded');
    });
    expect(iconFont).toBe(true);
    if (forbidden) {
      // a page of another role is not shown: the guard says so, names the roles, and links to the Overview
      await page.goto(`${server.url}${forbidden}`);
      const message = await eventually(
        () => page.getByTestId('not-allowed-message').innerText(),
        (text) => text.includes('You are signed in as'),
      );
      expect(message).toContain(`You are signed in as ${role}.`);
      expect(new URL(page.url()).pathname).toBe(forbidden);
      await page.getByRole('link', { name: 'Back to the Overview' }).click();
      await page.getByTestId('role-label').waitFor();
    }
    await page.screenshot({
      path: path.join(SCREENSHOT_DIR, `sign-in-${role.toLowerCase().replace(/\s+/g, '-')}.png`),
    });
    await context.close();
  });

  it('refuses a wrong password with a clear message', async () => {
    const page = await browser.newPage();
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill('scientist@equilight.test');
    await page.getByLabel('Password', { exact: true }).fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByTestId('sign-in-error').innerText()).resolves.toContain(
      'E-mail or password is not correct.',
    );
    await page.close();
  });

  it('loaded nothing from outside the machine and broke no content-security rule', () => {
    expect(outsideRequests).toEqual([]);
    expect(policyViolations).toEqual([]);
  });
});
