import fs from 'node:fs';
import path from 'node:path';
import { EVERYONE, rolesOf } from '@equilight/contracts';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { axeSerious } from './support/axe';
import { launchChromium } from './support/browser';
import { REPO_ROOT, type RunningServer, startServer } from './support/server-process';
import { signIn } from './support/session';

jest.setTimeout(180_000);

// Every routed page, as every role that may open it, scanned by axe-core in Chromium: no serious or
// critical violation, all content inside landmarks, and no skipped heading level; and no icon squeezed.

type Role = 'admin' | 'lab_manager' | 'scientist';

/** Rules of lower impact than "serious" that the app keeps too. */
const ALSO_RULES = ['region', 'heading-order', 'landmark-one-main', 'page-has-heading-one'];

interface RoutedPage {
  /** The route's path in app.routes.ts. */
  route: string;
  /** The address visited (ids filled in from the demo data). */
  url: (ids: DemoIds) => string;
  roles: readonly Role[];
}

interface DemoIds {
  plateBatch: number;
  approvedBatch: number;
  plateLayout: number;
  manifest: number;
}

const SIGNED_IN_PAGES: RoutedPage[] = [
  { route: '', url: () => '/', roles: EVERYONE },
  { route: 'not-allowed', url: () => '/not-allowed', roles: EVERYONE },
  { route: 'batches', url: () => '/batches', roles: rolesOf('get', '/api/batches') },
  { route: 'batches/new', url: () => '/batches/new', roles: rolesOf('post', '/api/batches') },
  {
    route: 'batches/:id',
    url: (i) => `/batches/${i.plateBatch}`,
    roles: rolesOf('get', '/api/batches/{id}'),
  },
  // Not next to the other batch: the router keeps the page for a new id, and `open` waits for a new heading.
  { route: 'temperatures', url: () => '/temperatures', roles: rolesOf('get', '/api/temperatures') },
  {
    route: 'batches/:id',
    url: (i) => `/batches/${i.approvedBatch}`,
    roles: rolesOf('get', '/api/batches/{id}'),
  },
  { route: 'layouts', url: () => '/layouts', roles: rolesOf('get', '/api/layouts') },
  { route: 'layouts/new', url: () => '/layouts/new', roles: rolesOf('post', '/api/layouts') },
  {
    route: 'layouts/:id',
    url: (i) => `/layouts/${i.plateLayout}`,
    roles: rolesOf('get', '/api/layouts/{id}'),
  },
  { route: 'manifests', url: () => '/manifests', roles: rolesOf('get', '/api/manifests') },
  { route: 'manifests/new', url: () => '/manifests/new', roles: rolesOf('post', '/api/manifests') },
  {
    route: 'manifests/:id',
    url: (i) => `/manifests/${i.manifest}`,
    roles: rolesOf('get', '/api/manifests/{id}'),
  },
  { route: 'planner', url: () => '/planner', roles: EVERYONE },
  { route: 'audit', url: () => '/audit', roles: rolesOf('get', '/api/audit') },
  { route: 'people', url: () => '/people', roles: rolesOf('get', '/api/users') },
  { route: 'api-docs', url: () => '/api-docs', roles: EVERYONE },
  { route: 'intake', url: () => '/intake', roles: rolesOf('get', '/api/intake') },
  { route: 'instruments', url: () => '/instruments', roles: rolesOf('get', '/api/instruments') },
  { route: 'outbox', url: () => '/outbox', roles: rolesOf('get', '/api/outbox') },
  { route: 'webhooks', url: () => '/webhooks', roles: rolesOf('get', '/api/webhooks') },
];

const SIGNED_OUT_PAGES = ['sign-in', 'forgot-password', 'set-password'];

const PEOPLE: { role: Role; email: string }[] = [
  { role: 'admin', email: 'admin@equilight.test' },
  { role: 'lab_manager', email: 'manager@equilight.test' },
  { role: 'scientist', email: 'scientist@equilight.test' },
];

/** The paths app.routes.ts declares (the catch-all redirect left out). */
function declaredRoutes(): string[] {
  const source = fs.readFileSync(path.join(REPO_ROOT, 'web/src/app/app.routes.ts'), 'utf8');
  return [...source.matchAll(/path: '([^']*)'/g)].map((m) => m[1]).filter((p) => p !== '**');
}

/** Requests the page has in flight: a page is ready when none is left for a moment. */
function trackRequests(page: Page): () => number {
  let open = 0;
  page.on('request', () => open++);
  page.on('requestfinished', () => open--);
  page.on('requestfailed', () => open--);
  return () => open;
}

async function quiet(page: Page, inFlight: () => number): Promise<void> {
  let calmSince = Date.now();
  const deadline = Date.now() + 15_000;
  while (Date.now() < deadline) {
    if (inFlight() > 0) calmSince = Date.now();
    else if (Date.now() - calmSince >= 250) return;
    await page.waitForTimeout(50);
  }
}

/**
 * Open a page inside the running app (the router follows a history change, as it does for the browser's
 * back button), so one sign-in and one copy of axe serve every page of a role; wait until its heading is
 * shown, its data arrived and deferred parts rendered.
 */
async function open(page: Page, url: string, inFlight: () => number): Promise<void> {
  await page.evaluate((to) => {
    if (location.pathname === to) return;
    document.querySelectorAll('h1').forEach((h) => h.setAttribute('data-left', ''));
    history.pushState(null, '', to);
    dispatchEvent(new PopStateEvent('popstate', { state: null }));
  }, url);
  await page.waitForFunction(
    (to) => location.pathname === to && document.querySelector('h1:not([data-left]), main [role="alert"]'),
    url,
    { timeout: 15_000 },
  );
  await quiet(page, inFlight);
  // Deferred blocks (`@defer (on viewport)`) render once scrolled to.
  await page.evaluate(() => {
    for (const el of [document.scrollingElement, document.querySelector('mat-sidenav-content')])
      el?.scrollTo(0, el.scrollHeight);
  });
  await page.waitForTimeout(100);
  await quiet(page, inFlight);
}

/**
 * Shown icons whose box is narrower than the glyph (0.8 em): an icon beside text in a flex row shrinks
 * unless told not to, and then shows as a sliver (the what-if panel's lock did).
 */
async function squeezedIcons(page: Page): Promise<string[]> {
  return page.$$eval('mat-icon', (icons) =>
    icons
      .filter((el) => (el as HTMLElement).offsetParent !== null)
      .map((el) => ({
        name: (el.textContent ?? '').trim(),
        width: el.getBoundingClientRect().width,
        em: parseFloat(getComputedStyle(el).fontSize),
      }))
      .filter((i) => i.width < i.em * 0.8)
      .map((i) => `${i.name} ${i.width.toFixed(1)}px wide at ${i.em}px`),
  );
}

describe('every page passes an axe scan as every role', () => {
  let server: RunningServer;
  let browser: Browser;
  let ids: DemoIds;

  beforeAll(async () => {
    server = await startServer({ SEED_DEMO: 'true' });
    browser = await launchChromium();
    const ctx = await browser.newContext();
    const page = await ctx.newPage();
    await signIn(page, server.url, 'admin@equilight.test');
    const get = async <T>(p: string) => (await (await ctx.request.get(`${server.url}${p}`)).json()) as T;
    const { items: batches } = await get<{ items: { id: number; state: string; layoutId: number }[] }>(
      '/api/batches?pageSize=500',
    );
    const layouts = await get<{ id: number; format: string }[]>('/api/layouts');
    const manifests = await get<{ id: number; layoutId: number }[]>('/api/manifests');
    const plateLayout = layouts.find((l) => l.format === '96')!.id;
    ids = {
      plateLayout,
      plateBatch: batches.find((b) => b.layoutId === plateLayout)!.id,
      approvedBatch: batches.find((b) => b.state === 'approved')!.id,
      manifest: manifests.find((m) => m.layoutId === plateLayout)!.id,
    };
    await ctx.close();
  });

  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  it('covers every route of the app', () => {
    const covered = new Set([...SIGNED_IN_PAGES.map((p) => p.route), ...SIGNED_OUT_PAGES]);
    expect(declaredRoutes().filter((r) => !covered.has(r))).toEqual([]);
  });

  it('signed out: the sign-in and password pages', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 800 }, bypassCSP: true });
    const page = await ctx.newPage();
    const problems: string[] = [];
    for (const route of SIGNED_OUT_PAGES) {
      await page.goto(`${server.url}/${route}`);
      await page.locator('h1').first().waitFor();
      await page.waitForLoadState('networkidle');
      for (const v of await axeSerious(page, undefined, ALSO_RULES)) problems.push(`/${route}: ${v}`);
    }
    await ctx.close();
    expect(problems).toEqual([]);
  });

  /** Every page a role may open, scanned in one signed-in context; one line per problem. */
  async function scanAs(role: Role, email: string): Promise<string[]> {
    const ctx: BrowserContext = await browser.newContext({
      viewport: { width: 1280, height: 800 },
      bypassCSP: true,
    });
    const page = await ctx.newPage();
    const inFlight = trackRequests(page);
    await signIn(page, server.url, email);
    const problems: string[] = [];
    for (const p of SIGNED_IN_PAGES.filter((x) => x.roles.includes(role))) {
      const url = p.url(ids);
      try {
        await open(page, url, inFlight);
      } catch (e) {
        problems.push(`${role} ${url}: did not show a heading (${String(e).split('\n')[0]})`);
      }
      for (const v of await axeSerious(page, undefined, ALSO_RULES)) problems.push(`${role} ${url}: ${v}`);
      for (const icon of await squeezedIcons(page)) problems.push(`${role} ${url}: icon squeezed: ${icon}`);
    }
    await ctx.close();
    return problems;
  }

  it.each(PEOPLE)('$role: every page the role may open', async ({ role, email }) => {
    expect(await scanAs(role, email)).toEqual([]);
  });
});
