import fs from 'node:fs';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { launchChromium } from './support/browser';
import { type RunningDropWatcher, startDropWatcher } from './support/drop-watcher';
import { eventually } from './support/eventually';
import { REPO_ROOT, type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';
import { apiAs, sampleManifestRows, signIn } from './support/session';

jest.setTimeout(240_000);

const SAMPLES = path.join(REPO_ROOT, 'samples/analysis');
const PROFILE_NAME = 'Cuvette bench 4 (watcher test)';
const FOLDER = 'cuvette-bench-4';

describe('a watcher joins a new profile live; a lab manager assigns its unassigned file from Intake', () => {
  let server: RunningServer;
  let browser: Browser;
  let drop: RunningDropWatcher;
  let profileId: number;

  beforeAll(async () => {
    server = await startServer();
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    // One watcher credential; the watcher is told its folders by the server.
    const admin = await apiAs(browser, server.url, 'admin@equilight.test');
    const credential = (await admin.call('POST', '/api/watchers', { name: 'Bench PC 4' }))['token'] as string;
    await admin.ctx.close();
    drop = await startDropWatcher(server.url, {
      watcherToken: credential,
      folderPollMs: 300,
      heartbeatMs: 1000,
      statusPollMs: 200,
    });
  });

  afterAll(async () => {
    await drop?.stop();
    await browser?.close();
    await server?.stop();
  });

  it('shows the new profile watched on Instruments without restarting the watcher', async () => {
    const admin = await apiAs(browser, server.url, 'admin@equilight.test');
    const created = await admin.call('POST', '/api/instruments', {
      name: PROFILE_NAME,
      kind: 'cuvette_spectrophotometer',
      plateFormat: 'cuvette',
      fileFormat: 'long_table',
      pathLengthCm: 1,
      dropSubfolder: FOLDER,
      fileNamePattern: '^(?<run>MLX-\\d+)',
    });
    profileId = (created['profile'] as { id: number }).id;
    await admin.ctx.close();

    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const page = await context.newPage();
    await signIn(page, server.url, 'admin@equilight.test');
    const row = () => page.locator('tr', { hasText: PROFILE_NAME }).getByTestId('watched');
    const watched = await eventually(
      async () => {
        await page.goto(`${server.url}/instruments`);
        await page.getByTestId('profiles-table').waitFor();
        await row().waitFor();
        return row().innerText();
      },
      (text) => /Watched/.test(text),
      30_000,
    );
    expect(watched).toMatch(/Watched\s+(just now|\d+ s ago) · v0\.1\.0/);
    expect(watched).toContain('v0.1.0');
    expect(fs.existsSync(path.join(drop.dropDir, FOLDER))).toBe(true);
    await expect(page.getByTestId('watchers').innerText()).resolves.toContain('Bench PC 4');
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'instruments-1280x800.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(300);
    // On a phone the actions column stays on screen (sticky), so editing is one tap away.
    const edit = page.getByRole('button', { name: `Edit ${PROFILE_NAME}` });
    const box = await edit.boundingBox();
    expect(box).not.toBeNull();
    expect(box!.x + box!.width).toBeLessThanOrEqual(390);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'instruments-390x844.png'), fullPage: true });

    // A lab manager reads the profile without being able to change it.
    const managerContext = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const manager = await managerContext.newPage();
    await signIn(manager, server.url, 'manager@equilight.test');
    await manager.goto(`${server.url}/instruments`);
    await manager.getByRole('button', { name: `Read ${PROFILE_NAME}` }).click();
    await manager.getByRole('heading', { name: `${PROFILE_NAME} (read only)` }).waitFor();
    await expect(manager.getByTestId('profile-save').count()).resolves.toBe(0);
    await expect(manager.getByTestId('file-name-pattern').isDisabled()).resolves.toBe(true);
    await expect(manager.getByTestId('add-profile').count()).resolves.toBe(0);
    await managerContext.close();
    await context.close();
  });

  it('assigns an unassigned file to a batch from Intake, then links file and batch both ways', async () => {
    // The instrument exports run MLX-8; no batch waits for it, so it is stored unassigned.
    const target = path.join(drop.dropDir, FOLDER, 'MLX-8.csv');
    fs.writeFileSync(`${target}.tmp`, fs.readFileSync(path.join(SAMPLES, 'readings.csv')));
    fs.renameSync(`${target}.tmp`, target);
    await eventually(
      async () => fs.existsSync(path.join(drop.dropDir, FOLDER, 'done', 'MLX-8.csv')),
      (done) => done,
      30_000,
    );

    // A batch for another run id (it does not take the file by itself).
    const manager = await apiAs(browser, server.url, 'manager@equilight.test');
    const rows = sampleManifestRows();
    const layout = await manager.call('POST', '/api/layouts', {
      name: 'Bench 4 cuvettes (browser test)',
      format: 'cuvette',
      cuvetteCount: rows.length,
      positions: rows.map((r) => ({
        position: r['position'],
        role: r['role'],
        ...(r['replicate_group'] ? { replicateGroup: r['replicate_group'] } : {}),
      })),
    });
    const manifest = await manager.call('POST', '/api/manifests', {
      name: 'Bench 4 MLX-9 (browser test)',
      layoutId: layout['id'],
      rows,
      acceptMismatches: true,
    });
    const batch = await manager.call('POST', '/api/batches', {
      name: 'Bench 4 batch MLX-9',
      profileId,
      layoutId: layout['id'],
      manifestId: manifest['id'],
      runId: 'MLX-9',
      systemName: 'M–L (browser test)',
      temperatureC: 25,
    });
    await manager.ctx.close();

    const context = await browser.newContext({
      viewport: { width: 1280, height: 800 },
      acceptDownloads: true,
    });
    const page = await context.newPage();
    await signIn(page, server.url, 'manager@equilight.test');
    await page.goto(`${server.url}/intake`);
    const row = page.locator('tr', { hasText: 'MLX-8.csv' });
    await row.getByTestId('unassigned-hint').waitFor();
    await expect(row.getByTestId('unassigned-hint').innerText()).resolves.toBe(
      'No batch waits for run id MLX-8 — create one, or assign by hand.',
    );
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'intake-1280x800.png'), fullPage: true });

    // The raw archived file, under its own name.
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      row.getByTestId('raw-download').click(),
    ]);
    expect(download.suggestedFilename()).toBe('MLX-8.csv');
    expect(fs.readFileSync((await download.path())!)).toEqual(
      fs.readFileSync(path.join(SAMPLES, 'readings.csv')),
    );

    await row.getByTestId('assign').click();
    await page.getByTestId('assign-batch').waitFor();
    await expect(page.getByTestId('assign-batch').innerText()).resolves.toContain('Bench 4 batch MLX-9');
    await page.getByTestId('assign-confirm').click();
    await row.getByTestId('batch-link').waitFor({ timeout: 15_000 });
    await expect(row.innerText()).resolves.toContain('Stored');

    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(300);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'intake-390x844.png'), fullPage: true });
    await page.setViewportSize({ width: 1280, height: 800 });

    // Intake row → batch; batch's file → Intake row.
    await row.getByTestId('batch-link').click();
    await page.waitForURL(`**/batches/${batch['id']}`);
    // The sections load when they scroll into view.
    await page.locator('.eq-bd__tabs').first().scrollIntoViewIfNeeded();
    await page.getByRole('tab', { name: 'Files' }).click();
    const link = page.getByTestId('file-intake-link');
    await link.waitFor();
    await expect(link.innerText()).resolves.toBe('MLX-8.csv');
    await expect(page.getByTestId('file-raw-download').count()).resolves.toBe(1);
    await link.click();
    await page.waitForURL(/\/intake\?q=[0-9a-f]{64}$/);
    await page.locator('tr', { hasText: 'MLX-8.csv' }).waitFor();
    await expect(page.locator('tbody tr', { hasText: '.csv' }).count()).resolves.toBe(1);
    await context.close();
  });
});
