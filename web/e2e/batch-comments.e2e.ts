import fs from 'node:fs';
import path from 'node:path';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { axeSerious } from './support/axe';
import { launchChromium } from './support/browser';
import { type RunningServer, SCREENSHOT_DIR, startServer } from './support/server-process';
import { signIn } from './support/session';

jest.setTimeout(180_000);

// Two people have the same demo batch open; what one writes under Comments appears on the other's
// page through the live channel, without a reload.

describe('comments on a batch, live on a second page', () => {
  let server: RunningServer;
  let browser: Browser;
  let scientistCtx: BrowserContext;
  let managerCtx: BrowserContext;
  let scientist: Page;
  let manager: Page;
  let batchUrl: string;

  beforeAll(async () => {
    server = await startServer();
    browser = await launchChromium();
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    // bypassCSP lets the test inject axe-core; the app's own pages run under the server's CSP.
    scientistCtx = await browser.newContext({ viewport: { width: 1280, height: 800 }, bypassCSP: true });
    managerCtx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    scientist = await scientistCtx.newPage();
    manager = await managerCtx.newPage();
    await signIn(scientist, server.url, 'scientist@equilight.test');
    await signIn(manager, server.url, 'manager@equilight.test');
    // A batch of the demo scenario with readings in it.
    const res = await scientist.request.get(`${server.url}/api/batches?pageSize=500`);
    const batches = ((await res.json()) as { items: { id: number; fileCount: number }[] }).items;
    const batch = batches.find((b) => b.fileCount > 0) ?? batches[0];
    if (!batch) throw new Error('the demo scenario has no batch');
    batchUrl = `${server.url}/batches/${batch.id}`;
  });

  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  const section = (page: Page) => page.getByTestId('batch-comments');
  const bodies = (page: Page) => section(page).getByTestId('comment-body').allInnerTexts();

  it('a comment written on one page appears on the other without a reload, and a reply sits under it', async () => {
    await scientist.goto(batchUrl);
    await manager.goto(batchUrl);
    for (const page of [scientist, manager]) {
      await section(page).scrollIntoViewIfNeeded();
      await section(page).getByText('No comments yet.').waitFor();
    }
    // Both pages hold their live connection before anything is written.
    await scientist.locator('[data-connected="true"]').waitFor();
    await manager.locator('[data-connected="true"]').waitFor();
    const managerLoads: string[] = [];
    manager.on('framenavigated', (f) => managerLoads.push(f.url()));

    const field = section(scientist).getByRole('textbox', { name: 'New comment' });
    const words = 'Mixture M4 looks cloudy; worth a second read before approval.';
    await field.fill(words);
    await section(scientist).getByText(`${words.length} / 4000 characters`).waitFor();
    await section(scientist).getByRole('button', { name: 'Add comment' }).click();
    await section(scientist).getByTestId('comment-body').first().waitFor();
    expect(await field.inputValue()).toBe('');

    // The lab manager's page shows it through the live channel.
    await section(manager)
      .getByText('Mixture M4 looks cloudy; worth a second read before approval.')
      .waitFor({ timeout: 10_000 });
    expect(managerLoads).toEqual([]);
    const thread = section(manager).getByTestId('comment-thread').first();
    expect(await thread.getByTestId('comment-role').innerText()).toBe('Scientist');
    // The app's one date style (locale-aware, to the minute).
    expect(await thread.getByTestId('comment-time').innerText()).toMatch(/\b\d{1,2}:\d\d\b/);

    // The manager replies; the reply appears indented under it on the scientist's page.
    await thread.getByRole('button', { name: /^Reply to / }).click();
    await section(manager)
      .getByRole('textbox', { name: /^Reply to / })
      .fill('Agreed: re-read M4 on Thursday.');
    await section(manager).getByRole('button', { name: 'Send reply' }).click();
    const reply = section(scientist)
      .getByTestId('comment-replies')
      .getByText('Agreed: re-read M4 on Thursday.');
    await reply.waitFor({ timeout: 10_000 });
    const [threadBox, replyBox] = await Promise.all([
      section(scientist).getByTestId('comment-thread').first().boundingBox(),
      reply.boundingBox(),
    ]);
    expect(replyBox!.x).toBeGreaterThan(threadBox!.x + 16);
    expect(await bodies(scientist)).toEqual([
      'Mixture M4 looks cloudy; worth a second read before approval.',
      'Agreed: re-read M4 on Thursday.',
    ]);
  });

  it('a removed comment reads "Comment removed" on both pages, and its reply stays', async () => {
    await section(scientist)
      .getByTestId('comment-thread')
      .first()
      .getByTestId('comment-remove')
      .first()
      .click();
    await section(scientist).getByRole('button', { name: 'Remove', exact: true }).click();
    for (const page of [scientist, manager]) {
      await section(page).getByTestId('comment-removed').waitFor({ timeout: 10_000 });
      expect(await bodies(page)).toEqual(['Agreed: re-read M4 on Thursday.']);
    }
  });

  it('looks right at 1280×800 and 390×844, and the section passes an axe scan', async () => {
    const field = section(scientist).getByRole('textbox', { name: 'New comment' });
    await field.fill('Plate re-read booked for Thursday 09:00, same cuvettes, fresh blank.');
    await section(scientist).getByRole('button', { name: 'Add comment' }).click();
    await section(scientist).getByTestId('comment-reply').first().waitFor();
    // An open reply with a draft, and a draft in the new-comment field, as a person sees them mid-way.
    await section(scientist).getByTestId('comment-reply').first().click();
    await section(scientist)
      .getByRole('textbox', { name: /^Reply to / })
      .fill('Thanks, I will bring the M4 cuvette.');
    await field.fill('A note that is still being written');
    for (const [width, height] of [
      [1280, 800],
      [390, 844],
    ] as const) {
      await scientist.setViewportSize({ width, height });
      await section(scientist).scrollIntoViewIfNeeded();
      await scientist.waitForTimeout(200);
      await section(scientist).screenshot({
        path: path.join(SCREENSHOT_DIR, `batch-comments-${width}x${height}.png`),
      });
      await scientist.screenshot({
        path: path.join(SCREENSHOT_DIR, `batch-comments-page-${width}x${height}.png`),
      });
      // Nothing sticks out sideways at either width.
      const overflow = await scientist.evaluate(
        () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
      );
      expect(overflow).toBeLessThanOrEqual(0);
    }
    await scientist.setViewportSize({ width: 1280, height: 800 });
    expect(await axeSerious(scientist, '[data-testid="batch-comments"]')).toEqual([]);
  });
});
