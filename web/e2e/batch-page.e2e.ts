import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { extractPdfText } from '../../server/src/testing/pdf-text';
import { axeSerious } from './support/axe';
import { launchChromium } from './support/browser';
import { type RunningDropWatcher, startDropWatcher } from './support/drop-watcher';
import { eventually, expectEventually } from './support/eventually';
import { REPO_ROOT, type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';
import { apiAs, sampleManifestRows, signIn } from './support/session';

jest.setTimeout(180_000);

const SAMPLES = path.join(REPO_ROOT, 'samples/analysis');
const RUN_ID = 'MLX-7';
const BATCH_NAME = 'Metal–ligand run MLX-7 (browser test)';

describe('a scientist watches a batch fill in live, excludes a mixture, and it gets approved', () => {
  let server: RunningServer;
  let browser: Browser;
  let page: Page;
  let batchId: number;
  let token: string;
  let drop: RunningDropWatcher;

  beforeAll(async () => {
    server = await startServer();
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });

    const admin = await apiAs(browser, server.url, 'admin@equilight.test');
    const created = await admin.call('POST', '/api/instruments', {
      name: 'Cuvette bench (browser test)',
      kind: 'cuvette_spectrophotometer',
      plateFormat: 'cuvette',
      fileFormat: 'long_table',
      pathLengthCm: 1,
      dropSubfolder: 'browser-test-cuvettes',
      fileNamePattern: '^(?<run>MLX-\\d+)',
    });
    const profile = (created['profile'] ?? created) as { id: number };
    token =
      typeof created['token'] === 'string'
        ? created['token']
        : ((await admin.call('POST', `/api/instruments/${profile.id}/token`))['token'] as string);
    await admin.ctx.close();

    // The real watcher on a drop folder of its own, sending with the instrument's token.
    drop = await startDropWatcher(server.url, { instruments: [{ folder: 'browser-test-cuvettes', token }] });

    const manager = await apiAs(browser, server.url, 'manager@equilight.test');
    const rows = sampleManifestRows();
    const layout = await manager.call('POST', '/api/layouts', {
      name: 'Metal–ligand cuvettes (browser test)',
      format: 'cuvette',
      cuvetteCount: rows.length,
      positions: rows.map((r) => ({
        position: r['position'],
        role: r['role'],
        ...(r['replicate_group'] ? { replicateGroup: r['replicate_group'] } : {}),
      })),
    });
    const manifest = await manager.call('POST', '/api/manifests', {
      name: 'Metal–ligand MLX-7 (browser test)',
      layoutId: layout['id'],
      rows,
      acceptMismatches: true,
    });
    // The admin opens the batch, so the lab manager may approve it under the four-eyes rule (on by default).
    const admin2 = await apiAs(browser, server.url, 'admin@equilight.test');
    const batch = await admin2.call('POST', '/api/batches', {
      name: BATCH_NAME,
      profileId: profile.id,
      layoutId: layout['id'],
      manifestId: manifest['id'],
      runId: RUN_ID,
      systemName: 'M–L (browser test)',
      temperatureC: 25,
    });
    batchId = batch['id'] as number;
    await admin2.ctx.close();
    await manager.ctx.close();

    // bypassCSP lets the test inject axe-core; the app's own pages run under the server's CSP.
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 }, bypassCSP: true });
    page = await context.newPage();
    await signIn(page, server.url, 'scientist@equilight.test');
  });

  afterAll(async () => {
    await drop?.stop();
    await browser?.close();
    await server?.stop();
  });

  const kValue = () => page.getByTestId('best-k-value').innerText();

  it('shows the map and K as the readings land, without a reload', async () => {
    await page.goto(`${server.url}/batches/${batchId}`);
    await page.getByTestId('batch-name').waitFor();
    await expect(page.getByTestId('batch-name').innerText()).resolves.toBe(BATCH_NAME);
    await page.getByTestId('plate-map').waitFor();
    await expect(page.getByTestId('best-k').count()).resolves.toBe(0);
    await page.evaluate(() => ((window as unknown as { eqNoReload: boolean }).eqNoReload = true));

    // The instrument writes its export into the drop folder; the watcher sends it in.
    const target = path.join(drop.dropDir, 'browser-test-cuvettes', `${RUN_ID}.csv`);
    fs.writeFileSync(`${target}.tmp`, fs.readFileSync(path.join(SAMPLES, 'readings.csv')));
    fs.renameSync(`${target}.tmp`, target);

    await page.getByTestId('best-k-value').waitFor({ timeout: 30_000 });
    expect(parseFloat(await kValue())).toBeGreaterThan(0);
    expect(
      await eventually(
        () => page.getByTestId('verdict').innerText(),
        (t) => /1:1 fits best/.test(t),
      ),
    ).toMatch(/1:1 fits best/);
    await expectEventually(() => page.getByTestId('file-count').innerText(), '1 of 1');
    const well = page.locator('[data-position="C20"]');
    await expect(well.evaluate((el) => getComputedStyle(el).backgroundColor)).resolves.toMatch(/^rgb\(/);
    expect(
      await eventually(
        () => well.getAttribute('aria-label'),
        (t) => !!t?.includes('JOB-5'),
      ),
    ).toContain('JOB-5');
    await expect(
      page.evaluate(() => (window as unknown as { eqNoReload?: boolean }).eqNoReload),
    ).resolves.toBe(true);
  });

  it('excludes a mixture with a reason, sees K change, saves it and marks the batch reviewed', async () => {
    const before = await kValue();
    await page.locator('[data-position="C20"]').click();
    await page.getByTestId('exclude-reason').fill('meniscus disturbed while reading');
    await page.getByTestId('exclude-submit').click();
    await page.getByTestId('unsaved-banner').waitFor();
    await page.waitForFunction(
      (old) => document.querySelector('[data-testid="best-k-value"]')?.textContent?.trim() !== old,
      before.trim(),
    );
    expect(await kValue()).not.toBe(before);
    await expectEventually(
      () => page.locator('[data-position="C20"]').getAttribute('data-marker'),
      'excluded',
    );

    await page.getByTestId('what-if-save').click();
    await page.getByTestId('reason-input').fill('JOB-5 read with a disturbed meniscus');
    await page.getByTestId('reason-confirm').click();
    await page.getByTestId('unsaved-banner').waitFor({ state: 'detached' });
    const settings = await page.evaluate(
      async (id) => (await (await fetch(`/api/batches/${id}`)).json()).settings,
      batchId,
    );
    expect(settings.exclusions).toEqual([{ position: 'C20', reason: 'meniscus disturbed while reading' }]);

    await page.getByTestId('mark-reviewed').click();
    await page.getByTestId('batch-state').getByText('Reviewed').waitFor();
  });

  it('offers the CSV, PDF and XLSX exports, with the batch name and K in the report', async () => {
    const bodies: Record<string, Buffer> = {};
    for (const [testId, type] of [
      ['export-readings', 'text/csv'],
      ['export-results', 'text/csv'],
      ['export-pdf', 'application/pdf'],
      ['export-xlsx', 'spreadsheetml'],
    ]) {
      const href = await page.getByTestId(testId).getAttribute('href');
      const res = await page.request.get(`${server.url}${href}`);
      expect(res.status()).toBe(200);
      expect(res.headers()['content-type']).toContain(type);
      bodies[testId] = await res.body();
    }
    expect(bodies['export-readings'].toString('utf8')).toMatch(/JOB-5/);
    expect(bodies['export-results'].toString('utf8')).toMatch(/1:1/);
    expect(bodies['export-xlsx'].subarray(0, 2).toString('latin1')).toBe('PK');
    const text = extractPdfText(bodies['export-pdf']).replace(/\s+/g, ' ');
    expect(text).toContain(BATCH_NAME);
    // K as the page shows it (the one number format) is in the report's text too
    const shown = (await kValue()).split(' ')[0];
    expect(text).toContain(`= ${shown}`);
  });

  it('looks right at 1280×800 and 390×844, and passes an axe scan', async () => {
    await page.setViewportSize({ width: 1280, height: 800 });
    await page.getByTestId('plate-map').waitFor();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-page-1280x800.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await page.getByTestId('plate-map').waitFor();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-page-390x844.png'), fullPage: true });
    await page.getByTestId('plate-map').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-page-390x844-map.png') });
    await page.setViewportSize({ width: 1280, height: 800 });
    expect(await axeSerious(page)).toEqual([]);
  });

  it('a lab manager approves with a comment; the batch locks, live on the scientist page too', async () => {
    const managerContext = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const manager = await managerContext.newPage();
    await signIn(manager, server.url, 'manager@equilight.test');
    await manager.goto(`${server.url}/batches/${batchId}`);
    await manager.getByTestId('approve').click();
    await manager.getByTestId('reason-input').fill('Calibration and fit checked; approved.');
    await manager.getByTestId('reason-confirm').click();
    await manager.getByTestId('batch-state').getByText('Approved').waitFor();
    await manager.getByTestId('what-if-locked').waitFor();
    await manager.getByTestId('approval-record').waitFor();
    await manager.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-page-approved.png'), fullPage: true });
    await managerContext.close();

    await page.getByTestId('batch-state').getByText('Approved').waitFor({ timeout: 10_000 });
    await page.getByTestId('what-if-locked').waitFor();
  });

  it('the approved batch shows its approval record (engine, input SHA-256) and the PDF names it', async () => {
    await page.getByTestId('approval-record').waitFor({ timeout: 10_000 });
    const records = (await page.evaluate(
      async (id) => (await fetch(`/api/batches/${id}/results`)).json(),
      batchId,
    )) as { id: number; engine: { version: string }; files: { sha256: string }[] }[];
    expect(records).toHaveLength(1);
    const record = records[0];
    await expect(page.getByTestId('approval-record').locator('h2').innerText()).resolves.toBe(
      `Approval record ${record.id}`,
    );
    await expect(page.getByTestId('record-engine').innerText()).resolves.toBe(record.engine.version);
    await expect(page.getByTestId('record-files').innerText()).resolves.toContain(record.files[0].sha256);
    // Today's engine is the one that approved: no note, a quiet "same result" line instead.
    await page.getByTestId('engine-same').waitFor();
    await expect(page.getByTestId('engine-note').count()).resolves.toBe(0);
    await expect(
      (await page.getByTestId('approve').count()) + (await page.getByTestId('mark-reviewed').count()),
    ).toBe(0);

    const res = await page.request.get(`${server.url}/api/batches/${batchId}/report.pdf`);
    const text = extractPdfText(await res.body()).replace(/\s+/g, ' ');
    expect(text).toContain(`record ${record.id}, approved by`);
    expect(text).toContain(record.engine.version);

    await page.setViewportSize({ width: 1280, height: 800 });
    await page.getByTestId('approval-record').scrollIntoViewIfNeeded();
    await page.screenshot({
      path: path.join(SCREENSHOT_DIR, 'batch-page-approved-1280x800.png'),
      fullPage: true,
    });
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-page-approved-record-1280x800.png') });
    await page.setViewportSize({ width: 390, height: 844 });
    await page.getByTestId('approval-record').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-page-approved-record-390x844.png') });
    await page.screenshot({
      path: path.join(SCREENSHOT_DIR, 'batch-page-approved-390x844.png'),
      fullPage: true,
    });
    await page.setViewportSize({ width: 1280, height: 800 });
    expect(await axeSerious(page)).toEqual([]);
  });

  it("shows a later engine's different answer as a note beside the record (display check, with a doctored engineCheck)", async () => {
    // The server side of this (a real later engine on the same database) is tested in approval-record.spec.ts;
    // here only the page's rendering of that answer is looked at, so the answer is rewritten in flight.
    await page.route('**/api/batches/*/analysis?engineCheck=true', async (route) => {
      const response = await route.fetch();
      const body = (await response.json()) as {
        record: { summary: Record<string, unknown> };
        engineCheck: Record<string, unknown>;
      };
      body.engineCheck = {
        engineVersion: '0.2.0+5e1ec7ed0000',
        sameEngine: false,
        differs: true,
        inputsMatch: true,
        current: {
          ...body.record.summary,
          k: 912.3,
          kCi95: [871.4, 955.0],
          kText: '912 L·mol⁻¹ (95 % CI 871 to 955)',
        },
        error: null,
      };
      await route.fulfill({ response, json: body });
    });
    try {
      await page.reload();
      await page.getByTestId('engine-note').waitFor({ timeout: 10_000 });
      await expect(page.getByTestId('engine-note').innerText()).resolves.toContain(
        'Re-analysis with the current engine (0.2.0+5e1ec7ed0000) gives K (1:1) = 912 L·mol⁻¹',
      );
      // The record itself is what stays on show.
      await expect(page.getByTestId('best-k-value').innerText()).resolves.not.toContain('912');
      await page.getByTestId('approval-record').scrollIntoViewIfNeeded();
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-page-approved-note-1280x800.png') });
      await page.setViewportSize({ width: 390, height: 844 });
      await page.getByTestId('engine-note').scrollIntoViewIfNeeded();
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'batch-page-approved-note-390x844.png') });
      await page.setViewportSize({ width: 1280, height: 800 });
      expect(await axeSerious(page)).toEqual([]);
    } finally {
      await page.unroute('**/api/batches/*/analysis?engineCheck=true');
    }
  });

  it('the approval mail arrives in the SMTP stand-in (Outbox)', async () => {
    const admin = await apiAs(browser, server.url, 'admin@equilight.test');
    try {
      let subjects: string[] = [];
      for (let i = 0; i < 50 && !subjects.some((s) => s.includes(`Batch approved: ${BATCH_NAME}`)); i++) {
        const outbox = (await admin.call('GET', '/api/outbox?pageSize=100')) as {
          items: { subject: string }[];
        };
        subjects = outbox.items.map((m) => m.subject);
        await new Promise((r) => setTimeout(r, 200));
      }
      expect(subjects).toContain(`Batch approved: ${BATCH_NAME}`);
    } finally {
      await admin.ctx.close();
    }
  });
});
