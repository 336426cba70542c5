import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { launchChromium } from './support/browser';
import { eventually, expectEventually } from './support/eventually';
import { DEMO_PASSWORD, type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';

jest.setTimeout(120_000);

const LAYOUT_NAME = 'Azo dye calibration plate';
const MANIFEST_NAME = 'Azo dye run 31';
const BATCH_NAME = 'Azo dye run 31 batch';

const HEADER =
  'position,sample_id,role,concentration_M,dilution_factor,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL,replicate_group';

/** Invented samples for the plate built below; `standardB2` is the cell the first upload leaves empty. */
function manifestCsv(standardB2: string): string {
  const rows = [
    'A1,BLANK-1,blank,,,,,,,,',
    'A2,BLANK-2,blank,,,,,,,,',
    'A3,BLANK-3,blank,,,,,,,,',
    'B1,STD-1,standard,0.00002,,,,,,,S1',
    `B2,STD-2,standard,${standardB2},,,,,,,S1`,
    'B3,STD-3,standard,0.00002,,,,,,,S1',
    'B4,STD-4,standard,0.00006,,,,,,,S2',
    'B5,STD-5,standard,0.00006,,,,,,,S2',
    'B6,STD-6,standard,0.00006,,,,,,,S2',
    'D1,TEA-1,unknown,,2,,,,,,',
    'D2,TEA-2,unknown,,2,,,,,,',
    'D3,TEA-3,unknown,,4,,,,,,',
  ];
  return `${[HEADER, ...rows].join('\n')}\n`;
}

/** Waits until the editor's selection counter reads `text` (the grid answers each key in turn). */
let selectedCount: (text: string) => Promise<void>;

describe('a lab manager goes from an empty layout to a batch waiting for its files', () => {
  let server: RunningServer;
  let browser: Browser;
  let page: Page;
  let tmp: string;

  beforeAll(async () => {
    server = await startServer();
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-manifest-'));
    const context = await browser.newContext({ viewport: { width: 1400, height: 1000 } });
    page = await context.newPage();
    selectedCount = async (text) => {
      await page.waitForFunction(
        (expected) =>
          document.querySelector('[data-testid="selected-count"]')?.textContent?.trim() === expected,
        text,
        { timeout: 10_000 },
      );
    };
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill('manager@equilight.test');
    await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByTestId('main-nav').waitFor();
  });
  afterAll(async () => {
    await browser?.close();
    await server?.stop();
    if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
  });

  const well = (position: string, scope = '[data-testid="layout-grid"]') =>
    page.locator(`${scope} [data-position="${position}"]`);

  async function drag(from: string, to: string): Promise<void> {
    await well(from).hover();
    await page.mouse.down();
    await well(to).hover();
    await page.mouse.up();
  }

  it('builds a 96-well layout with blanks, standards in replicate groups and unknowns, and saves it', async () => {
    await page.getByTestId('main-nav').getByText('Layouts').click();
    await page.getByTestId('new-layout').click();
    await page.waitForURL(/\/layouts\/new$/);
    await page.getByTestId('layout-name').fill(LAYOUT_NAME);

    // A 384-well plate stays usable: small wells, still reachable by keyboard.
    await page.getByRole('radio', { name: '384-well plate' }).click();
    await expectEventually(() => page.locator('[data-testid="layout-grid"] [role="gridcell"]').count(), 384);
    await well('A1').focus();
    await page.keyboard.press('Control+End');
    await expectEventually(
      () => page.evaluate(() => document.activeElement?.getAttribute('data-position')),
      'P24',
    );
    await page.keyboard.press('Space');
    await expectEventually(() => page.getByTestId('selected-count').innerText(), '1 selected');
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'layout-editor-384.png') });
    await page.getByRole('radio', { name: '96-well plate' }).click();
    await expectEventually(() => page.locator('[data-testid="layout-grid"] [role="gridcell"]').count(), 96);
    await expectEventually(() => page.getByTestId('selected-count').innerText(), '0 selected');

    // Blanks: click, then shift-click.
    await well('A1').click();
    await well('A3').click({ modifiers: ['Shift'] });
    await expectEventually(() => page.getByTestId('selected-count').innerText(), '3 selected');
    await page.getByTestId('assign-blank').click();

    // Standards: two dragged rectangles, each a replicate group.
    const group = page.getByLabel('Replicate group');
    await drag('B1', 'B3');
    await group.fill('S1');
    await page.getByTestId('assign-standard').click();
    await drag('B4', 'B6');
    await group.fill('S2');
    await page.getByTestId('assign-standard').click();

    // Unknowns: the keyboard.
    await group.fill('');
    await well('D1').focus();
    // One key at a time, each answered before the next, as a person types.
    await page.keyboard.press('Space');
    await selectedCount('1 selected');
    await page.keyboard.press('Shift+ArrowRight');
    await selectedCount('2 selected');
    await page.keyboard.press('Shift+ArrowRight');
    await selectedCount('3 selected');
    await page.getByTestId('assign-unknown').click();

    await expectEventually(() => well('B2').getAttribute('aria-label'), 'B2, standard, group S1');
    await expectEventually(() => well('B5').getAttribute('aria-label'), 'B5, standard, group S2');
    await expectEventually(() => well('A2').getAttribute('aria-label'), 'A2, blank');
    await expectEventually(() => well('D3').getAttribute('aria-label'), 'D3, unknown');
    await expectEventually(() => well('D4').getAttribute('aria-label'), 'D4, empty');

    await page.getByTestId('save-layout').click();
    await page.waitForURL(/\/layouts\/\d+$/);
    await page.getByText('saved as version 1').waitFor();
    await page.locator('h1', { hasText: 'v1' }).waitFor();

    // Show a selection in the picture, then leave it.
    await well('F1').click();
    await well('G4').click({ modifiers: ['Shift'] });
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'layout-editor.png'), fullPage: true });
    await page.keyboard.press('Escape');
  });

  it('uploads a manifest with one error, sees it with its row and column, fixes it, sees it mapped and saves it', async () => {
    const bad = path.join(tmp, 'azo-run-31.csv');
    const fixed = path.join(tmp, 'azo-run-31-fixed.csv');
    fs.writeFileSync(bad, manifestCsv(''));
    fs.writeFileSync(fixed, manifestCsv('0.00002'));

    await page.getByTestId('main-nav').getByText('Manifests').click();
    await page.getByTestId('new-manifest').click();
    await page.waitForURL(/\/manifests\/new$/);
    await page.getByTestId('manifest-name').fill(MANIFEST_NAME);
    await page.getByTestId('manifest-layout').click();
    await page.getByRole('option', { name: new RegExp(LAYOUT_NAME) }).click();
    await page.getByTestId('mapped-grid').waitFor();

    await page.getByTestId('manifest-file').setInputFiles(bad);
    await page.getByTestId('check-manifest').click();
    const problems = page.locator('[data-testid="manifest-problems"] [data-testid="problem"]');
    await problems.first().waitFor();
    expect(
      await eventually(
        () => problems.count(),
        (n) => n === 1,
      ),
    ).toBe(1);
    const problem = (await problems.first().innerText()).replace(/\s+/g, ' ');
    expect(problem).toContain('Row 6');
    expect(problem).toContain('concentration_M');
    expect(problem).toContain('missing concentration_M: a standard needs it');

    await page.getByTestId('manifest-file').setInputFiles(fixed);
    await page.getByTestId('check-manifest').click();
    await page.getByText('No problems found').waitFor();
    await page.getByText('No mismatches: every position matches the layout').waitFor();
    await expectEventually(
      () => well('B2', '[data-testid="mapped-grid"]').getAttribute('aria-label'),
      'B2, standard, group S1, sample STD-2',
    );
    expect(
      await eventually(
        () => well('D3', '[data-testid="mapped-grid"]').innerText(),
        (t) => t.includes('TEA-3'),
      ),
    ).toContain('TEA-3');

    await page.getByTestId('save-manifest').click();
    await page.waitForURL(/\/manifests\/\d+$/);
    await page.locator('h1', { hasText: MANIFEST_NAME }).waitFor();
    await page.getByTestId('mapped-grid').waitFor();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'manifest-mapped.png'), fullPage: true });
  });

  it('creates a batch from the layout and manifest, which waits open for its files', async () => {
    await page.goto(`${server.url}/batches/new`);
    await page.getByTestId('batch-name').fill(BATCH_NAME);
    await page.getByTestId('batch-instrument').click();
    await page.getByRole('option', { name: /Plate reader 1 \(demo\)/ }).click();
    await page.getByTestId('batch-run-id').fill('AZO-31');
    await page.getByTestId('batch-layout').click();
    await page.getByRole('option', { name: new RegExp(LAYOUT_NAME) }).click();
    await page.getByTestId('batch-manifest').click();
    await page.getByRole('option', { name: new RegExp(MANIFEST_NAME) }).click();
    await page.getByTestId('create-batch').click();
    await page.waitForURL(/\/batches(\/\d+)?$/);

    const batches = await page.evaluate(async () => (await (await fetch('/api/batches')).json()).items);
    const batch = (
      batches as {
        name: string;
        state: string;
        fileCount: number;
        layoutName: string;
        manifestName: string;
      }[]
    ).find((b) => b.name === BATCH_NAME);
    expect(batch).toEqual(
      expect.objectContaining({
        state: 'open',
        fileCount: 0,
        layoutName: LAYOUT_NAME,
        manifestName: MANIFEST_NAME,
      }),
    );
  });
});
