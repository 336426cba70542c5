import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { launchChromium } from './support/browser';
import { DEMO_PASSWORD, type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';

jest.setTimeout(120_000);

/** Elements wider than the window, and text suffixes that overlap their input's text. */
async function layoutProblems(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const out: string[] = [];
    const width = document.documentElement.clientWidth;
    for (const el of document.querySelectorAll<HTMLElement>(
      'eq-planner-page mat-form-field, eq-planner-page fieldset',
    )) {
      const r = el.getBoundingClientRect();
      const cell = el.parentElement!.getBoundingClientRect();
      if (el.tagName === 'FIELDSET' && r.right > cell.right + 0.5)
        out.push(`fieldset past the form: ${el.querySelector('legend')?.textContent}`);
      if (r.width > 0 && r.right > width + 0.5)
        out.push(`past the right edge: ${el.textContent?.trim().slice(0, 40)}`);
    }
    for (const field of document.querySelectorAll<HTMLElement>('eq-planner-page mat-form-field')) {
      const control = field.querySelector('input, mat-select');
      const f = field.getBoundingClientRect();
      const c = control?.getBoundingClientRect();
      if (c && c.width > 0 && (c.right > f.right + 0.5 || c.left < f.left - 0.5))
        out.push(`input past its field: ${field.querySelector('mat-label')?.textContent?.trim()}`);
    }
    for (const suffix of document.querySelectorAll<HTMLElement>(
      'eq-planner-page .mat-mdc-form-field-text-suffix',
    )) {
      const field = suffix.closest('mat-form-field')!;
      const input = field.querySelector('input')!;
      const s = suffix.getBoundingClientRect();
      const i = input.getBoundingClientRect();
      if (s.left < i.right - 0.5) out.push(`suffix overlaps: ${suffix.textContent?.trim()}`);
      const f = field.getBoundingClientRect();
      if (s.right > f.right + 0.5) out.push(`suffix outside its field: ${suffix.textContent?.trim()}`);
      // an empty field's label sits inside it, beside the suffix: the two must not run into each other
      const label = field.querySelector<HTMLElement>(
        '.mdc-floating-label:not(.mdc-floating-label--float-above)',
      );
      if (label && label.getBoundingClientRect().right > s.left + 0.5)
        out.push(`label runs into its suffix: ${label.textContent?.trim()}`);
      const box = field.closest('fieldset')?.getBoundingClientRect();
      if (box && (f.right > box.right + 0.5 || f.left < box.left - 0.5))
        out.push(`field past its fieldset: ${suffix.textContent?.trim()}`);
    }
    return out;
  });
}

describe('the Planner in Chromium', () => {
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

  it.each([
    { width: 1280, height: 800 },
    { width: 390, height: 844 },
  ])('plans on a plate layout with reagent cautions at $width×$height', async (viewport) => {
    const context = await browser.newContext({ viewport });
    const page = await context.newPage();
    await page.goto(`${server.url}/planner`);
    await page.waitForURL(/\/sign-in/);
    await page.getByLabel('E-mail').fill('manager@equilight.test');
    await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByTestId('stock-a').waitFor();
    // A plate with blanks and standards in column 1 and 2; the mixtures go to the rest.
    const layoutName = `Planner plate ${viewport.width}`;
    const status = await page.evaluate(async (name) => {
      const xsrf = decodeURIComponent(/(?:^|; )XSRF-TOKEN=([^;]*)/.exec(document.cookie)?.[1] ?? '');
      const positions = 'ABCDEFGH'.split('').flatMap((r, i) => [
        { position: `${r}1`, role: i < 2 ? 'blank' : 'standard' },
        { position: `${r}2`, role: 'standard' },
      ]);
      const res = await fetch('/api/layouts', {
        method: 'POST',
        headers: { 'Content-Type': 'application/json', 'X-XSRF-TOKEN': xsrf },
        body: JSON.stringify({ name, format: '96', positions }),
      });
      return res.status;
    }, layoutName);
    expect(status).toBe(201);
    await page.reload();
    await page.getByTestId('stock-a').waitFor();
    // the optional fields start empty, their labels inside the field
    expect(await layoutProblems(page)).toEqual([]);
    await page.getByTestId('reagent-a').fill('Iron(III) nitrate');
    await page.getByTestId('reagent-b').fill('Potassium thiocyanate');
    await page.getByTestId('cas-b').fill('333-20-0');
    await page.getByTestId('loq').fill('0.0001');
    await page.getByTestId('layout').click();
    await page.getByRole('option', { name: new RegExp(layoutName) }).click();
    await page.getByTestId('plate-preview').waitFor();
    await page.getByTestId('fill-volume').waitFor();
    const name = `planner-${viewport.width}x${viewport.height}`;
    // The shell scrolls its content area, not the window: one picture per part of the page.
    await page.locator('h1', { hasText: 'Planner' }).scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}-top.png`) });
    await page.getByTestId('reagent-a').evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}-stocks.png`) });
    await page.getByTestId('layout').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`) });
    await page.locator('.eq-table-wrap').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}-table.png`) });
    await page.getByTestId('plate-preview').evaluate((el) => el.scrollIntoView({ block: 'end' }));
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}-preview.png`) });
    expect(await page.locator('.eq-table-wrap [data-testid="pipetting-table"] thead').innerText()).toContain(
      'µL',
    );
    expect(await page.getByTestId('cautions').innerText()).toContain('H272');
    const firstRow = await page
      .locator('.eq-table-wrap [data-testid="pipetting-table"] tbody tr')
      .first()
      .innerText();
    expect(firstRow).toMatch(/^A3\b/);
    expect(await layoutProblems(page)).toEqual([]);
    await context.close();
  });
});
