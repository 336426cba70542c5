import fs from 'node:fs';
import path from 'node:path';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { SPECTRA_K, SPECTRA_WAVELENGTHS, spectraPlate } from '../src/app/batch-detail/spectra-fixture';
import { axeSerious } from './support/axe';
import { launchChromium } from './support/browser';
import { type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';
import { apiAs, signIn } from './support/session';

jest.setTimeout(180_000);

// A batch read as spectra (an invented 1:1 titration, 41 wavelengths per position) arrives as an
// uploaded spectrum-format file; the batch page's Spectra section analyses it in the browser's worker.

const RUN_ID = 'SPX-1';

/** The invented plate as the spectrum format: a wavelength column, then one column per position. */
function spectrumCsv(): string {
  const { readings } = spectraPlate();
  const positions = [...new Set(readings.map((r) => r.position))];
  const value = new Map(readings.map((r) => [`${r.position}|${r.wavelengthNm}`, r.absorbance]));
  const lines = [['wavelength_nm', ...positions].join(',')];
  for (const nm of SPECTRA_WAVELENGTHS)
    lines.push([nm, ...positions.map((p) => value.get(`${p}|${nm}`)!.toFixed(5))].join(','));
  return lines.join('\n') + '\n';
}

function manifestRows(): Record<string, string>[] {
  return spectraPlate().samples.map((s) => ({
    position: s.position,
    sample_id: s.sampleId,
    role: s.role,
    stock_a_M: s.stockAM === undefined ? '' : String(s.stockAM),
    volume_a_mL: s.volumeAMl === undefined ? '' : String(s.volumeAMl),
    stock_b_M: s.stockBM === undefined ? '' : String(s.stockBM),
    volume_b_mL: s.volumeBMl === undefined ? '' : String(s.volumeBMl),
    total_volume_mL: s.totalVolumeMl === undefined ? '' : String(s.totalVolumeMl),
  }));
}

describe('a batch read as spectra shows its Spectra section with K from every wavelength', () => {
  let server: RunningServer;
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  let batchId: number;

  beforeAll(async () => {
    server = await startServer();
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });

    const admin = await apiAs(browser, server.url, 'admin@equilight.test');
    const created = await admin.call('POST', '/api/instruments', {
      name: 'Scanning reader (spectra browser test)',
      kind: 'plate_reader',
      plateFormat: '96',
      fileFormat: 'spectrum',
      pathLengthCm: 1,
      dropSubfolder: 'spectra-browser-test',
      fileNamePattern: '^(?<run>SPX-\\d+)',
    });
    const profile = (created['profile'] ?? created) as { id: number };

    const manager = await apiAs(browser, server.url, 'manager@equilight.test');
    const rows = manifestRows();
    const layout = await manager.call('POST', '/api/layouts', {
      name: 'Titration plate (spectra browser test)',
      format: '96',
      positions: rows.map((r) => ({ position: r['position'], role: r['role'] })),
    });
    const manifest = await manager.call('POST', '/api/manifests', {
      name: 'Titration SPX-1 (spectra browser test)',
      layoutId: layout['id'],
      rows,
      acceptMismatches: true,
    });
    const batch = await admin.call('POST', '/api/batches', {
      name: 'Titration SPX-1 read as spectra',
      profileId: profile.id,
      layoutId: layout['id'],
      manifestId: manifest['id'],
      runId: RUN_ID,
      systemName: 'Invented A–B (browser test)',
      temperatureC: 25,
      settings: { candidates: ['1:1', '1:2'] },
    });
    batchId = batch['id'] as number;
    await manager.ctx.close();

    // A scientist uploads the scan, as from the batch list's upload.
    const scientist = await apiAs(browser, server.url, 'scientist@equilight.test');
    const res = await scientist.ctx.request.post(`${server.url}/api/ingest`, {
      headers: { 'X-XSRF-TOKEN': await scientist.xsrf() },
      multipart: {
        profileId: String(profile.id),
        file: { name: `${RUN_ID}.csv`, mimeType: 'text/csv', buffer: Buffer.from(spectrumCsv()) },
      },
    });
    expect(res.status()).toBe(202);
    // The scan is parsed on the server's worker after the receipt: wait until it is stored.
    for (let i = 0; i < 240; i++) {
      if ((await scientist.call('GET', `/api/batches/${batchId}`))['fileCount'] === 1) break;
      await new Promise((r) => setTimeout(r, 250));
    }
    await scientist.ctx.close();
    await admin.ctx.close();

    context = await browser.newContext({ viewport: { width: 1280, height: 800 }, bypassCSP: true });
    page = await context.newPage();
    await signIn(page, server.url, 'scientist@equilight.test');
  });

  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  it('opens the Spectra tab and sees K of the 1:1 complex with its interval, computed in a worker', async () => {
    const workers: string[] = [];
    page.on('worker', (w) => workers.push(w.url()));
    await page.goto(`${server.url}/batches/${batchId}`);
    await page.getByTestId('batch-name').waitFor();
    await page.getByTestId('file-count').getByText('1 of 1').waitFor({ timeout: 60_000 });
    // The tabs render when scrolled to (deferred); the Spectra tab is there for a batch read as spectra.
    await page.locator('.eq-bd__tabs').first().scrollIntoViewIfNeeded();
    await page.getByRole('tab', { name: 'Spectra' }).click();
    const k = page.getByTestId('spectra-k-text');
    await k.waitFor({ timeout: 60_000 });
    const text = (await k.innerText()).trim();
    expect(text).toMatch(/^[\d.]+ L·mol⁻¹ \(95 % CI [\d.]+ to [\d.]+\)$/);
    // The invented scan was made from K = 2500 L/mol (closed-form 1:1 quadratic).
    expect(Math.abs(parseFloat(text) / SPECTRA_K - 1)).toBeLessThan(0.1);
    expect(workers.length).toBeGreaterThan(0);
    const rows = page.locator('[data-testid="spectra-candidates"] tbody tr');
    await expect(rows.count()).resolves.toBe(2);
    await expect(rows.first().getAttribute('data-model')).resolves.toBe('1:1');
    await expect(page.locator('[data-testid="residual-map"]').getAttribute('aria-label')).resolves.toContain(
      '18 mixtures × 41 wavelengths',
    );
    // The residual map really draws: its pixels are not all blank.
    const painted = await page
      .locator('[data-testid="residual-map"]')
      .evaluate((c: HTMLCanvasElement) => c.getContext('2d')!.getImageData(0, 0, 1, 1).data[3]);
    expect(painted).toBe(255);
  });

  it('re-runs on a narrower wavelength range typed in the section', async () => {
    await page.getByTestId('spectra-from').fill('450');
    await page.getByTestId('spectra-to').fill('560');
    await page.getByTestId('spectra-to').press('Enter');
    await page.getByTestId('spectra-k').getByText('23 wavelengths (450–560 nm)').waitFor({ timeout: 60_000 });
    await page.getByTestId('spectra-from').fill('');
    await page.getByTestId('spectra-to').fill('');
    await page.getByTestId('spectra-to').press('Enter');
    await page.getByTestId('spectra-k').getByText('41 wavelengths (400–600 nm)').waitFor({ timeout: 60_000 });
  });

  it('has no serious accessibility faults and fits a laptop and a phone (screenshots)', async () => {
    expect(await axeSerious(page, '[data-testid="spectra-section"]')).toEqual([]);
    // The page scrolls inside the app's shell: each part is scrolled to the top and shot in the viewport.
    const shoot = async (size: string) => {
      for (const [part, selector] of [
        ['top', '[data-testid="spectra-section"]'],
        ['table', '[data-testid="spectra-candidates"]'],
        ['charts', '.eq-spectra__charts'],
        ['species', '[data-testid="spectra-model"]'],
        ['residuals', '[data-testid="residual-map"]'],
      ]) {
        await page
          .locator(selector)
          .first()
          .evaluate((el) => el.scrollIntoView({ block: 'start' }));
        await page.waitForTimeout(300);
        await page.screenshot({ path: path.join(SCREENSHOT_DIR, `spectra-${part}-${size}.png`) });
      }
    };
    await shoot('1280x800');
    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(500);
    // Nothing wider than the phone's screen (the table scrolls in its own region).
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(overflow).toBeLessThanOrEqual(390);
    await shoot('390x844');
  });
});
