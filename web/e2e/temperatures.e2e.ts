import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { axeSerious } from './support/axe';
import { launchChromium } from './support/browser';
import { REPO_ROOT, type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';
import { eventually } from './support/eventually';
import { type ApiClient, apiAs, signIn } from './support/session';

jest.setTimeout(240_000);

interface ListedBatch {
  id: number;
  runId: string;
  profileId: number;
  layoutId: number;
  manifestId: number;
  systemName: string | null;
}

/** Extra batches of the demo system at 25 °C (no files yet, so no K): the table gets a second page. */
const EXTRA = 30;
/** Repeats of the demo run at 15 °C, their mixtures a little stronger or weaker: a range of K there. */
const REPEATS_15 = [0.97, 1.02, 1.05];

const DEMO_COMPLEX = path.join(REPO_ROOT, 'samples/demo/complex');

/** The demo 15 °C readings with the mixtures' absorbances scaled (blanks and standards as they are). */
function repeatReadings(scale: number): Buffer {
  const [header, ...rows] = fs
    .readFileSync(path.join(DEMO_COMPLEX, 'manifest.csv'), 'utf8')
    .trim()
    .split('\n');
  const columns = header!.split(',');
  const mixtures = new Set(
    rows
      .map((r) => r.split(','))
      .filter((c) => c[columns.indexOf('role')] === 'mixture')
      .map((c) => c[columns.indexOf('position')]),
  );
  const lines = fs.readFileSync(path.join(DEMO_COMPLEX, 'CX-15.csv'), 'utf8').trim().split('\n');
  return Buffer.from(
    `${lines
      .map((line, i) => {
        const cells = line.split(',');
        if (i === 0 || !mixtures.has(cells[0])) return line;
        cells[2] = (Number(cells[2]) * scale).toFixed(4);
        return cells.join(',');
      })
      .join('\n')}\n`,
  );
}

/**
 * One batch through the four-eyes path: the admin creates it, the lab manager sends its file, the
 * scientist reviews it once its analysis is in, the lab manager approves it.
 */
async function approvedRepeat(
  url: string,
  people: Record<'admin' | 'manager' | 'scientist', ApiClient>,
  base: ListedBatch,
  runId: string,
  content: Buffer,
): Promise<void> {
  const batch = await people.admin.call('POST', '/api/batches', {
    name: `${base.systemName} at 15 °C, repeat ${runId}`,
    profileId: base.profileId,
    layoutId: base.layoutId,
    manifestId: base.manifestId,
    runId,
    expectedFiles: 1,
    systemName: base.systemName,
    temperatureC: 15,
    settings: { wavelengthNm: 640, pathLengthCm: 1, candidates: ['1:1', '1:2', '2:1', '1:3'] },
  });
  const upload = await people.manager.ctx.request.post(`${url}/api/ingest`, {
    headers: { 'X-XSRF-TOKEN': await people.manager.xsrf() },
    multipart: {
      profileId: String(base.profileId),
      file: { name: `${runId}.csv`, mimeType: 'text/csv', buffer: content },
    },
  });
  expect(upload.status()).toBeLessThan(300);
  const state = await eventually(
    async () =>
      ((await people.manager.call('GET', `/api/batches?q=${runId}`)).items as { summaryState: string }[])[0]
        ?.summaryState,
    (v) => v === 'current',
    60_000,
  );
  expect(state).toBe('current');
  await people.scientist.call('POST', `/api/batches/${batch['id']}/review`);
  await people.manager.call('POST', `/api/batches/${batch['id']}/approve`, { comment: 'Repeat checked.' });
}

describe('the Temperatures page: groups in the chart, each system\u2019s batches paged by the server', () => {
  let server: RunningServer;
  let browser: Browser;
  let page: Page;
  let system: string;

  beforeAll(async () => {
    server = await startServer({ SEED_DEMO: 'true' });
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    const manager = await apiAs(browser, server.url, 'manager@equilight.test');
    const people = {
      admin: await apiAs(browser, server.url, 'admin@equilight.test'),
      manager,
      scientist: await apiAs(browser, server.url, 'scientist@equilight.test'),
    };
    const listed = (await manager.call('GET', '/api/batches?q=CX-15')).items as ListedBatch[];
    const base = listed.find((b) => b.runId === 'CX-15')!;
    system = base.systemName!;
    for (let i = 0; i < EXTRA; i++)
      await manager.call('POST', '/api/batches', {
        name: `${system} repeat ${String(i + 1).padStart(2, '0')}`,
        profileId: base.profileId,
        layoutId: base.layoutId,
        manifestId: base.manifestId,
        runId: `CX-R${i + 1}`,
        expectedFiles: 1,
        systemName: system,
        temperatureC: 25,
      });
    for (const [i, scale] of REPEATS_15.entries())
      await approvedRepeat(server.url, people, base, `CX-15${i + 1}`, repeatReadings(scale));
    page = await (
      await browser.newContext({ viewport: { width: 1280, height: 800 }, bypassCSP: true })
    ).newPage();
    await signIn(page, server.url, 'scientist@equilight.test');
  });
  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  const card = () => page.locator(`mat-card[data-system="${system}"]`);
  const rows = () => card().locator('[data-testid="points-table"] tbody tr');
  const range = () => card().locator('.mat-mdc-paginator-range-label');

  it('shows the fit, K per temperature and the first 25 batches; the next page comes from the server', async () => {
    const total = 3 + EXTRA + REPEATS_15.length;
    await page.goto(`${server.url}/temperatures`);
    await rows().nth(24).waitFor();
    expect(await rows().count()).toBe(25);
    expect((await range().textContent())?.trim()).toBe(`1 – 25 of ${total}`);
    // 15 °C: the demo run and its repeats, all approved; 25 °C: the demo run and the empty batches, none
    // approved; 35 °C: the demo run.
    const groups = card().locator('[data-testid="groups-table"] tbody tr');
    const cells = async (i: number) =>
      (await groups.nth(i).locator('td').allTextContents()).map((c) => c.trim()).slice(0, 3);
    expect(await groups.count()).toBe(3);
    expect(await cells(0)).toEqual(['15.0', String(1 + REPEATS_15.length), String(1 + REPEATS_15.length)]);
    expect(await cells(1)).toEqual(['25.0', String(1 + EXTRA), '0']);
    expect(await groups.nth(0).locator('td').nth(4).textContent()).toMatch(/\d to \d/);
    await expect(card().locator('[data-testid="delta-h"]').textContent()).resolves.toMatch(/kJ\/mol/);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'temperatures-1280x800.png'), fullPage: true });
    await card().locator('[data-testid="points-paginator"]').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'temperatures-1280x800-batches.png') });
    expect(await axeSerious(page)).toEqual([]);

    const asked = page.waitForRequest(
      (r) => r.url().includes('/api/temperatures/points') && r.url().includes('page=1'),
    );
    await card().getByRole('button', { name: 'Next page' }).click();
    await asked;
    await page.waitForFunction(
      (n) => document.querySelectorAll('[data-testid="points-table"] tbody tr').length === n,
      total - 25,
    );
    expect((await range().textContent())?.trim()).toBe(`26 – ${total} of ${total}`);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'temperatures-1280x800-page-2.png') });
  });

  it('fits a phone: each batch a small card, nothing cut off', async () => {
    await page.setViewportSize({ width: 390, height: 844 });
    // Opened on the phone itself (not caught in the navigation's closing animation).
    await page.goto(`${server.url}/temperatures`);
    await rows().nth(24).waitFor();
    // No part of the page is wider than the screen.
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'temperatures-390x844.png'), fullPage: true });
    await card().locator('eq-scatter-chart').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'temperatures-390x844-chart.png') });
    await card().locator('[data-testid="groups-table"]').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'temperatures-390x844-groups.png') });
    await rows().nth(3).scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'temperatures-390x844-batches.png') });
    await card().locator('[data-testid="points-paginator"]').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'temperatures-390x844-paginator.png') });
  });
});
