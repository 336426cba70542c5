import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { launchChromium } from './support/browser';
import { type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';
import { apiAs, signIn } from './support/session';

jest.setTimeout(180_000);

// A tab opened before the server got a new build: the scripts it has not loaded yet are gone. Every
// script request is answered as the server answers for a file of an earlier build (a 404), and the app
// says so and offers to load the page afresh, instead of doing nothing.

const SCRIPT = /\/(?:chunk|worker)-[A-Za-z0-9_-]+\.js$/;

describe('an open tab after the app was updated', () => {
  let server: RunningServer;
  let browser: Browser;

  beforeAll(async () => {
    server = await startServer();
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  /**
   * From now on, scripts the page asks for are those of an earlier build: the server's own 404 — until
   * `reloaded()`, after which they come as they are (the new build, loaded afresh).
   */
  async function newBuildOnServer(page: Page): Promise<{ refused: string[]; reloaded(): void }> {
    const refused: string[] = [];
    let stale = true;
    await page.context().route(SCRIPT, async (route) => {
      if (!stale) return route.continue();
      refused.push(route.request().url());
      const gone = await page.request.get(`${server.url}/chunk-GONE0000.js`);
      expect(gone.status()).toBe(404);
      await route.fulfill({ response: gone });
    });
    return { refused, reloaded: () => void (stale = false) };
  }

  async function signedInPage(width: number, height: number): Promise<Page> {
    const page = await (await browser.newContext({ viewport: { width: 1280, height: 800 } })).newPage();
    await signIn(page, server.url, 'scientist@equilight.test');
    await page.setViewportSize({ width, height });
    return page;
  }

  it('when a page whose script is gone is opened, then the person is asked, and agreeing loads it afresh', async () => {
    const page = await signedInPage(1280, 800);
    const build = await newBuildOnServer(page);
    const asked = new Promise<string>((resolve) =>
      page.once('dialog', async (dialog) => {
        build.reloaded();
        resolve(dialog.message());
        await dialog.accept();
      }),
    );
    const loaded = page.waitForEvent('load');
    await page.getByTestId('main-nav').getByRole('link', { name: 'Batches' }).click();
    expect(await asked).toContain('Equilight has been updated since this page was opened');
    expect(build.refused.length).toBeGreaterThan(0);
    await loaded; // a full load, not a move inside the old page
    await page.getByRole('heading', { name: 'Batches', level: 1 }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/batches');
    await page.context().close();
  });

  it('when a dialog’s script is gone and the person declines, then the page stays as it was', async () => {
    const page = await signedInPage(1280, 800);
    const before = page.url();
    await newBuildOnServer(page);
    const asked = new Promise<string>((resolve) =>
      page.once('dialog', async (dialog) => {
        resolve(dialog.message());
        await dialog.dismiss();
      }),
    );
    await page.getByTestId('user-menu').click();
    await page.getByTestId('notification-settings').click();
    expect(await asked).toContain('Reload the page now?');
    expect(page.url()).toBe(before);
    expect(await page.locator('mat-dialog-container').count()).toBe(0);
    await page.context().close();
  });

  it('when a what-if needs the worker and its scripts are gone, then the person is asked to reload', async () => {
    const page = await signedInPage(1280, 800);
    const res = await page.request.get(`${server.url}/api/batches?pageSize=500`);
    const batches = ((await res.json()) as { items: { id: number; fileCount: number; state: string }[] })
      .items;
    const batch = batches.find((b) => b.fileCount > 0);
    if (!batch) throw new Error('the demo scenario has no batch with readings');
    if (batch.state === 'approved') {
      const manager = await apiAs(browser, server.url, 'manager@equilight.test');
      await manager.call('POST', `/api/batches/${batch.id}/reopen`, {
        reason: 'reopened so that a what-if can be tried',
      });
    }
    await page.goto(`${server.url}/batches/${batch.id}`);
    await page.getByTestId('exclude-form').waitFor();
    await newBuildOnServer(page);
    const asked = new Promise<string>((resolve) =>
      page.once('dialog', async (dialog) => {
        resolve(dialog.message());
        await dialog.dismiss();
      }),
    );
    // The first what-if starts the worker: its script, and the same analysis's script for this thread,
    // are those of an earlier build.
    await page.locator('[data-testid^="well-"]:not(.eq-map__cell--empty)').first().click();
    await page.getByTestId('exclude-reason').fill('air bubble seen in the light path');
    await page.getByTestId('exclude-submit').click();
    expect(await asked).toContain('Reload the page now?');
    const banner = page.getByTestId('unsaved-banner');
    await banner.getByRole('alert').waitFor();
    expect(await banner.getByRole('alert').innerText()).toContain(
      'Equilight has been updated since this page was opened',
    );
    await banner.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'app-updated-what-if-1280.png') });
    await page.setViewportSize({ width: 390, height: 844 });
    await banner.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'app-updated-what-if-390.png') });
    await page.context().close();
  });

  it('when a section of the batch page cannot load its script, then it says so in place, with a way to reload', async () => {
    for (const [width, height] of [
      [1280, 800],
      [390, 844],
    ] as const) {
      const page = await signedInPage(width, height);
      const res = await page.request.get(`${server.url}/api/batches?pageSize=500`);
      const batches = ((await res.json()) as { items: { id: number; fileCount: number }[] }).items;
      const batch = batches.find((b) => b.fileCount > 0);
      if (!batch) throw new Error('the demo scenario has no batch with readings');
      await page.goto(`${server.url}/batches/${batch.id}`);
      const sections = page.getByTestId('sections');
      await page.locator('.eq-bd__tabs').scrollIntoViewIfNeeded();
      await sections.waitFor();
      await newBuildOnServer(page);
      // A tab whose panel has not been opened yet loads its script now.
      const closed = sections.getByRole('tab', { selected: false, name: /Calibration|Equilibrium/ }).first();
      await closed.click();
      const notLoaded = sections.getByTestId('part-not-loaded');
      await notLoaded.waitFor();
      expect(await notLoaded.innerText()).toContain('could not be loaded');
      await notLoaded.getByRole('button', { name: 'Reload the page' }).waitFor();
      await notLoaded.scrollIntoViewIfNeeded();
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `app-updated-section-${width}.png`) });
      await page.context().close();
    }
  });
});
