import fs from 'node:fs';
import path from 'node:path';
import type { Browser, BrowserContext, Page, Response } from 'playwright-core';
import { launchChromium } from './support/browser';
import {
  DEMO_PASSWORD,
  REPO_ROOT,
  type RunningServer,
  SCREENSHOT_DIR,
  startServer,
} from './support/server-process';

jest.setTimeout(180_000);

// The batch page as it loads in Chromium: compressed scripts, a small icon font whose icons really draw
// as icons, the what-if computed in a Web Worker, and panels below the fold that render when reached.

interface IconCheck {
  name: string;
  width: number;
  fontSize: number;
}

/**
 * The drawn width of each visible <mat-icon>'s text: an icon drawn by the font is one glyph about 1 em
 * wide; a name the font lacks is drawn in letters, several em wide.
 */
async function iconWidths(page: Page): Promise<IconCheck[]> {
  return page.$$eval('mat-icon', (icons) =>
    icons
      .filter((el) => (el as HTMLElement).offsetParent !== null)
      .map((el) => {
        const range = document.createRange();
        range.selectNodeContents(el);
        return {
          name: (el.textContent ?? '').trim(),
          width: range.getBoundingClientRect().width,
          fontSize: parseFloat(getComputedStyle(el).fontSize),
        };
      }),
  );
}

const drawnAsLetters = (icons: IconCheck[]) =>
  icons.filter((i) => i.width > i.fontSize * 1.4).map((i) => `${i.name} (${i.width}px at ${i.fontSize}px)`);

describe('the batch page arrives compressed, with its icons, and analyses what-ifs off the page thread', () => {
  let server: RunningServer;
  let browser: Browser;
  let ctx: BrowserContext;
  let page: Page;
  let batchId: number;
  const responses: Response[] = [];
  const fontUrls = new Set<string>();

  beforeAll(async () => {
    server = await startServer({ SEED_DEMO: 'true', SMTP_STANDIN: 'false' });
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    ctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    page = await ctx.newPage();
    page.on('response', (res) => {
      responses.push(res);
      if (res.url().endsWith('.woff2')) fontUrls.add(res.url());
    });
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill('scientist@equilight.test');
    await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByTestId('main-nav').waitFor();

    // The demo instrument's three 25 °C exports, sent in as a signed-in upload.
    const xsrf = (await ctx.cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
    const batches = (
      (await (await ctx.request.get(`${server.url}/api/batches?q=CX-25`)).json()) as {
        items: { id: number; runId: string; profileId: number }[];
      }
    ).items;
    const batch = batches.find((b) => b.runId === 'CX-25')!;
    batchId = batch.id;
    for (const name of ['CX-25-part1.csv', 'CX-25-part2.csv', 'CX-25-part3.csv']) {
      const res = await ctx.request.post(`${server.url}/api/ingest`, {
        headers: { 'X-XSRF-TOKEN': xsrf },
        multipart: {
          profileId: String(batch.profileId),
          file: {
            name,
            mimeType: 'text/csv',
            buffer: fs.readFileSync(path.join(REPO_ROOT, 'samples/demo/exports/cuvette-1', name)),
          },
        },
      });
      expect(res.status()).toBe(202);
    }
  });

  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  it('when the shell shows, then every icon is drawn by the icon font, not spelt out', async () => {
    await page.evaluate(() => document.fonts.ready);
    const icons = await iconWidths(page);
    expect(icons.length).toBeGreaterThan(5);
    expect(drawnAsLetters(icons)).toEqual([]);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'shell-1280x800.png') });
  });

  it('when the batch page loads, then its scripts come brotli-compressed and cached for good, and no font is large', async () => {
    responses.length = 0;
    await page.goto(`${server.url}/batches/${batchId}`);
    await page.getByTestId('best-k-value').waitFor();
    await page.getByTestId('plate-map').waitFor();
    await page.evaluate(() => document.fonts.ready);

    const scripts = responses.filter((r) => r.url().endsWith('.js') && r.status() === 200);
    expect(scripts.length).toBeGreaterThan(3);
    for (const res of scripts) {
      const headers = await res.allHeaders();
      // Each app script (not the analysis worker's) asks V8 to compile it while it streams in, off the
      // page's main thread.
      if (/\/(main|chunk)-[^/]+\.js$/.test(res.url())) {
        const firstLine = (await res.text()).split('\n', 1)[0];
        expect([res.url(), firstLine]).toEqual([res.url(), '//# allFunctionsCalledOnLoad']);
      }
      expect(headers['cache-control']).toContain('immutable');
      // The build leaves files under 512 bytes uncompressed: compression would not pay for itself.
      if ((await res.body()).length < 512) continue;
      expect([res.url(), headers['content-encoding']]).toEqual([res.url(), 'br']);
      expect(headers['vary']).toMatch(/accept-encoding/i);
    }
    // The matrix library (whole-spectrum fits) is for the worker and the spectra panel, not the page's first
    // render: the analysis module is marked free of side effects, so importing one helper from it does not
    // bring the rest. Its error text survives minification.
    const withMatrices: string[] = [];
    for (const res of scripts)
      if ((await res.text()).includes('Matrix must be square')) withMatrices.push(res.url());
    expect(withMatrices).toEqual([]);
    expect(fontUrls.size).toBeGreaterThan(0);
    for (const url of fontUrls) {
      const size = (await (await ctx.request.get(url)).body()).length;
      expect([url, size < 40_000]).toEqual([url, true]);
    }
    expect(drawnAsLetters(await iconWidths(page))).toEqual([]);
  });

  it('when the app starts, then its first script carries no schema library (zod loads beside the first request)', () => {
    const dir = path.join(REPO_ROOT, 'dist/web/browser');
    const html = fs.readFileSync(path.join(dir, 'index.html'), 'utf8');
    const first = [...html.matchAll(/<script[^>]+src="([^"]+\.js)"/g)].map((m) => m[1]);
    expect(first.length).toBeGreaterThan(0);
    // Every zod schema object carries a `_zod` property; the library's code names it throughout.
    const zodIn = (file: string) => fs.readFileSync(path.join(dir, file), 'utf8').includes('_zod');
    expect(first.filter(zodIn)).toEqual([]);
    expect(
      fs
        .readdirSync(dir)
        .filter((f) => f.endsWith('.js'))
        .some(zodIn),
    ).toBe(true);
  });

  it('when the pointer rests on a well, then its tooltip shows, and leaving the map hides it', async () => {
    const well = page.locator('[data-position="C12"]');
    await well.hover();
    const tooltip = page.getByTestId('plate-tooltip');
    await tooltip.waitFor();
    expect(await tooltip.innerText()).toContain('C12');
    expect(await well.getAttribute('aria-describedby')).toBe(await tooltip.getAttribute('id'));
    await page.getByTestId('batch-name').hover();
    await tooltip.waitFor({ state: 'detached' });
  });

  it('when a what-if is made, then a worker computes it and K changes', async () => {
    const workers: string[] = [];
    page.on('worker', (w) => workers.push(w.url()));
    const kBefore = await page.getByTestId('best-k-value').innerText();
    await page.locator('[data-position="C20"]').click();
    await page.getByTestId('exclude-reason').fill('cuvette scratched on the optical face');
    await page.getByTestId('exclude-submit').click();
    await page.getByTestId('unsaved-banner').waitFor();
    await page.waitForFunction(
      (before) => document.querySelector('[data-testid="best-k-value"]')?.textContent?.trim() !== before,
      kBefore,
      { timeout: 20_000 },
    );
    expect(workers.some((url) => /worker-[A-Za-z0-9_-]+\.js$/.test(url))).toBe(true);
    await page.getByTestId('what-if-reset').click();
    await page.getByTestId('unsaved-banner').waitFor({ state: 'detached' });
  });

  it('when the tabs scroll into view, then the equilibrium panel and its charts render', async () => {
    expect(await page.locator('eq-equilibrium-panel').count()).toBe(0);
    await page.locator('.eq-bd__tabs').scrollIntoViewIfNeeded();
    await page.locator('eq-equilibrium-panel canvas').first().waitFor({ timeout: 20_000 });
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-25C-1280x800-tabs.png') });
    await page.locator('mat-sidenav-content').evaluate((el) => el.scrollTo(0, 0));
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-25C-1280x800.png') });

    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`${server.url}/batches/${batchId}`);
    await page.getByTestId('best-k-value').waitFor();
    await page.evaluate(() => document.fonts.ready);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-25C-390x844.png') });
    expect(drawnAsLetters(await iconWidths(page))).toEqual([]);
    await page.locator('.eq-bd__tabs').scrollIntoViewIfNeeded();
    await page.locator('eq-equilibrium-panel').waitFor({ timeout: 20_000 });
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-25C-390x844-full.png'), fullPage: true });
    await page.goto(`${server.url}/`);
    await page.getByTestId('main-nav').waitFor({ state: 'attached' });
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'shell-390x844.png') });
  });
});
