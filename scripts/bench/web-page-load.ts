/**
 * Page load of one batch page in Chromium: navigation → K and the plate map on screen, bytes on the wire
 * and long tasks, with a cold cache (a fresh browser context per run) and a warm one (same context).
 * Used by web-p4.ts (npm run bench:web).
 */
import fs from 'node:fs';
import path from 'node:path';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_PASSWORD, REPO_ROOT } from '../../web/e2e/support/server-process';
import { median } from './bench-kit';

export interface LoadRun {
  /** ms from the navigation's time origin until K and the plate map were in the DOM and a frame ran. */
  kVisibleMs: number;
  /** Encoded (compressed) bytes received, headers included; cached responses count 0. */
  bytes: number;
  /** Long tasks (> 50 ms) from navigation until one second after K showed, ms each. */
  longTasksMs: number[];
  /**
   * The page's main-thread tasks over 50 ms of CPU time (Chromium trace, thread time), in the same
   * window: on a machine shared with other work a task's wall time also counts the time it waited for a
   * core; its CPU time does not.
   */
  longTasksCpuMs: number[];
  /** Renderer main-thread tasks over 50 ms of CPU that ran none of the page's work (navigation commit). */
  browserTasksCpuMs: number[];
  /**
   * CPU time of all the page's renderer main-thread tasks in the same window (traced load): less noisy than
   * counts of long tasks when comparing two builds.
   */
  mainThreadCpuMs: number;
  /**
   * CPU time of the load's longest task that ran the page's work (traced load): how close the page comes to
   * a long task whatever else the machine is doing.
   */
  longestTaskCpuMs: number;
}

export interface TraceEvent {
  name: string;
  ph: string;
  pid: number;
  tid: number;
  ts: number;
  dur?: number;
  tdur?: number;
  args?: { name?: string; data?: { url?: string; functionName?: string } };
}

/**
 * Trace events that show a task ran the page's own work: its scripts, timers, frames, events, HTML and
 * style parsing, style, layout and paint. A renderer task with none of them is the browser's (committing a
 * navigation, starting a renderer process).
 */
const PAGE_WORK = new Set([
  'EvaluateScript',
  'v8.evaluateModule',
  'FunctionCall',
  'v8.callFunction',
  'TimerFire',
  'FireAnimationFrame',
  'EventDispatch',
  'ParseHTML',
  'ParseAuthorStyleSheet',
  'UpdateLayoutTree',
  'Layout',
  'Paint',
  'RunMicrotasks',
]);

/** Trace categories that record the page's work inside each task. */
export const TRACE_CATEGORIES = [
  'toplevel',
  'devtools.timeline',
  'disabled-by-default-devtools.timeline',
  'v8',
];

/** The complete (`X`) events that ran on a renderer's main thread. */
export function onRendererMain(events: readonly TraceEvent[]): TraceEvent[] {
  const mainThreads = new Set(
    events
      .filter((e) => e.ph === 'M' && e.name === 'thread_name' && e.args?.name === 'CrRendererMain')
      .map((e) => `${e.pid}:${e.tid}`),
  );
  return events.filter((e) => e.ph === 'X' && mainThreads.has(`${e.pid}:${e.tid}`));
}

/**
 * Main-thread tasks of renderer processes whose CPU time exceeds 50 ms, ms each: those running the page's
 * work, and the browser's own (no page work inside). BENCH_TASKS=1 prints what each long page task ran.
 */
export function longCpuTasks(trace: Buffer): {
  page: number[];
  browser: number[];
  totalMs: number;
  longestPageMs: number;
} {
  const events = (JSON.parse(trace.toString('utf8')) as { traceEvents: TraceEvent[] }).traceEvents;
  const onMain = onRendererMain(events);
  const work = onMain.filter((e) => PAGE_WORK.has(e.name));
  const page: number[] = [];
  const browser: number[] = [];
  let totalMs = 0;
  let longestPageMs = 0;
  let longestPage: TraceEvent | null = null;
  const hasOwnWork = (task: TraceEvent): boolean => {
    const end = task.ts + (task.dur ?? 0);
    return work.some((e) => e.pid === task.pid && e.tid === task.tid && e.ts >= task.ts && e.ts <= end);
  };
  for (const task of onMain) {
    const cpuMs = (task.tdur ?? 0) / 1000;
    const wallMs = (task.dur ?? 0) / 1000;
    if (task.name === 'RunTask') totalMs += cpuMs;
    if (task.name === 'RunTask' && wallMs > 50 && cpuMs <= 50 && process.env['BENCH_TASKS']) {
      const end = task.ts + (task.dur ?? 0);
      const inside = onMain
        .filter(
          (e) => e !== task && e.pid === task.pid && e.tid === task.tid && e.ts >= task.ts && e.ts <= end,
        )
        .sort((a, b) => (b.dur ?? 0) - (a.dur ?? 0))
        .slice(0, 8)
        .map((e) => {
          const where = e.args?.data?.functionName || e.args?.data?.url?.split('/').pop() || '';
          return `${e.name}${where ? ` ${where}` : ''} ${((e.dur ?? 0) / 1000).toFixed(0)}/${((e.tdur ?? 0) / 1000).toFixed(0)}`;
        });
      console.log(`      wall ${wallMs.toFixed(0)} ms (CPU ${cpuMs.toFixed(0)}): ${inside.join(' | ')}`);
    }
    if (task.name !== 'RunTask' || cpuMs <= Math.min(50, longestPageMs)) continue;
    const ownWork = hasOwnWork(task);
    if (ownWork && cpuMs > longestPageMs) [longestPageMs, longestPage] = [cpuMs, task];
    if (cpuMs > 50) (ownWork ? page : browser).push(cpuMs);
  }
  // BENCH_TIMELINE=1: every page task of 15 ms of CPU or more, in order (ms from the first, CPU/wall).
  const shown = process.env['BENCH_TIMELINE']
    ? onMain.filter((t) => t.name === 'RunTask' && (t.tdur ?? 0) >= 15_000 && hasOwnWork(t))
    : [];
  if (shown.length)
    console.log(
      `      tasks: ${shown
        .map((task) => {
          const end = task.ts + (task.dur ?? 0);
          const top = work
            .filter((e) => e.pid === task.pid && e.tid === task.tid && e.ts >= task.ts && e.ts <= end)
            .filter((e) => e.name !== 'v8.callFunction' && e.name !== 'FunctionCall')
            .sort((a, b) => (b.tdur ?? 0) - (a.tdur ?? 0))
            .slice(0, 4)
            .map((e) => `${e.name} ${((e.tdur ?? 0) / 1000).toFixed(0)}`);
          return `${((task.ts - onMain[0].ts) / 1000).toFixed(0)}: ${((task.tdur ?? 0) / 1000).toFixed(0)}/${((task.dur ?? 0) / 1000).toFixed(0)} (${top.join(', ')})`;
        })
        .join('\n             ')}`,
    );
  if (process.env['BENCH_TASKS'] && longestPage) {
    const task = longestPage;
    const end = task.ts + (task.dur ?? 0);
    const inside = work
      .filter((e) => e.pid === task.pid && e.tid === task.tid && e.ts >= task.ts && e.ts <= end)
      .sort((a, b) => (b.tdur ?? 0) - (a.tdur ?? 0))
      .slice(0, 6)
      .map((e) => {
        const where = e.args?.data?.functionName || e.args?.data?.url?.split('/').pop() || '';
        return `${e.name}${where ? ` ${where}` : ''} ${((e.tdur ?? 0) / 1000).toFixed(0)}`;
      });
    const [wallMs, cpuMs] = [(task.dur ?? 0) / 1000, (task.tdur ?? 0) / 1000];
    console.log(
      `      longest page task ${cpuMs.toFixed(0)} ms CPU (${wallMs.toFixed(0)} wall): ${inside.join(' | ')}`,
    );
  }
  return { page, browser, totalMs, longestPageMs };
}

export interface LoadFigures {
  cold: LoadRun[];
  warm: LoadRun[];
  /** The analysis request alone from the signed-in page, ms (median of the runs). */
  analysisFloorMs: number;
  batchId: number;
}

const SETTLE_MS = 1000;

type StorageState = Awaited<ReturnType<BrowserContext['storageState']>>;

/** Runs in the page before its own scripts: records long tasks and the moment K and the map show. */
const PAGE_PROBE = `(() => {
  const w = window;
  w.__eqLong = [];
  w.__eqLongAt = [];
  w.__eqK = null;
  try {
    new PerformanceObserver((list) => list.getEntries().forEach((e) => { w.__eqLong.push(e.duration); w.__eqLongAt.push(Math.round(e.startTime)); }))
      .observe({ type: 'longtask', buffered: true });
  } catch (e) {}
  // Long animation frames with what ran in them (script, how it was called, ms), for BENCH_TASKS=1.
  w.__eqLoaf = [];
  try {
    new PerformanceObserver((list) => list.getEntries().forEach((e) => w.__eqLoaf.push(
      Math.round(e.startTime) + '+' + Math.round(e.duration) + ' (render ' + Math.round(e.startTime + e.duration - e.renderStart) + '): ' +
      e.scripts.map((s) => (s.invoker || s.invokerType) + ' ' + (s.sourceURL.split('/').pop() || '') + ' ' + Math.round(s.duration)).join(', '))))
      .observe({ type: 'long-animation-frame', buffered: true });
  } catch (e) {}
  // No layout read in the mutation callback (it would force one inside the page's own task): once K and
  // the map are in the document, the map's size is read in the next frame, where the frame lays out anyway.
  let waiting = false;
  const check = () => {
    if (w.__eqK !== null || waiting) return;
    const k = document.querySelector('[data-testid="best-k-value"]');
    const map = document.querySelector('[data-testid="plate-map"]');
    if (k && map && k.textContent && k.textContent.trim()) {
      waiting = true;
      requestAnimationFrame(() => {
        waiting = false;
        if (map.isConnected && map.getBoundingClientRect().height > 0) w.__eqK = performance.now();
        else check();
      });
    }
  };
  new MutationObserver(check).observe(document, { childList: true, subtree: true, characterData: true });
})();`;

async function signedInContext(browser: Browser, url: string, email: string): Promise<BrowserContext> {
  const ctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
  await ctx.request.get(`${url}/api/auth/me`);
  const xsrf = (await ctx.cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
  const res = await ctx.request.post(`${url}/api/auth/login`, {
    data: { email, password: DEMO_PASSWORD },
    headers: { 'X-XSRF-TOKEN': xsrf },
  });
  if (!res.ok()) throw new Error(`sign-in as ${email}: ${res.status()} ${await res.text()}`);
  return ctx;
}

/** Sends the demo instrument's three 25 °C exports in as a signed-in upload and waits until all are stored. */
async function fillDemo25(ctx: BrowserContext, url: string): Promise<number> {
  const batches = (
    (await (await ctx.request.get(`${url}/api/batches?q=CX-25`)).json()) as {
      items: { id: number; name: string; runId: string; profileId: number; fileCount: number }[];
    }
  ).items;
  const batch = batches.find((b) => b.runId === 'CX-25');
  if (!batch) throw new Error('The demo 25 °C batch (run CX-25) is missing: start with SEED_DEMO=true.');
  const dir = path.join(REPO_ROOT, 'samples/demo/exports/cuvette-1');
  for (const name of ['CX-25-part1.csv', 'CX-25-part2.csv', 'CX-25-part3.csv']) {
    const xsrf = (await ctx.cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
    const res = await ctx.request.post(`${url}/api/ingest`, {
      headers: { 'X-XSRF-TOKEN': xsrf },
      multipart: {
        profileId: String(batch.profileId),
        file: { name, mimeType: 'text/csv', buffer: fs.readFileSync(path.join(dir, name)) },
      },
    });
    if (!res.ok()) throw new Error(`upload ${name}: ${res.status()} ${await res.text()}`);
  }
  const deadline = Date.now() + 60_000;
  for (;;) {
    const b = (await (await ctx.request.get(`${url}/api/batches/${batch.id}`)).json()) as {
      fileCount: number;
    };
    if (b.fileCount >= 3) return batch.id;
    if (Date.now() > deadline) throw new Error('The 25 °C exports were not stored within 60 s.');
    await new Promise((r) => setTimeout(r, 200));
  }
}

/**
 * One load of the page. Traced, it gives only the CPU time of its tasks: tracing slows the page down, so
 * the moment K shows, the bytes and the Long Tasks API's figures come from an untraced load.
 */
async function measureOnce(
  browser: Browser,
  page: Page,
  url: string,
  traced: boolean,
  warmUp = false,
): Promise<LoadRun> {
  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Network.enable');
  await cdp.send('Network.setCacheDisabled', { cacheDisabled: false });
  const received = new Map<string, number>();
  cdp.on('Network.dataReceived', (e) =>
    received.set(e.requestId, (received.get(e.requestId) ?? 0) + e.encodedDataLength),
  );
  cdp.on('Network.loadingFinished', (e) => received.set(e.requestId, e.encodedDataLength));
  if (traced) await browser.startTracing(page, { categories: TRACE_CATEGORIES });
  await page.goto(url);
  await page.waitForFunction(
    () => ((window as unknown as { __eqK: number | null }).__eqK ?? -1) > 0,
    undefined,
    {
      timeout: 30_000,
      polling: 20,
    },
  );
  await page.waitForTimeout(SETTLE_MS);
  const trace = traced ? await browser.stopTracing() : null;
  const { k, long } = await page.evaluate(() => {
    const w = window as unknown as { __eqK: number; __eqLong: number[] };
    return { k: w.__eqK, long: [...w.__eqLong] };
  });
  if (process.env['BENCH_TASKS'] && !warmUp)
    console.log(
      `      K at ${k.toFixed(0)} ms; long tasks (start+duration): ${await page.evaluate(() => {
        const w = window as unknown as { __eqLong: number[]; __eqLongAt: number[] };
        return w.__eqLongAt.map((at, i) => `${at}+${w.__eqLong[i].toFixed(0)}`).join(', ');
      })}\n        long frames: ${await page.evaluate(() => (window as unknown as { __eqLoaf: string[] }).__eqLoaf.join(' | '))}`,
    );
  await cdp.detach();
  const cpu = trace ? longCpuTasks(trace) : { page: [], browser: [], totalMs: 0, longestPageMs: 0 };
  return {
    kVisibleMs: k,
    bytes: [...received.values()].reduce((a, b) => a + b, 0),
    longTasksMs: long,
    longTasksCpuMs: cpu.page,
    browserTasksCpuMs: cpu.browser,
    mainThreadCpuMs: cpu.totalMs,
    longestTaskCpuMs: cpu.longestPageMs,
  };
}

/** An untraced load for the timings and a traced one (same cache state) for the tasks' CPU time. */
async function measure(browser: Browser, url: string, page: () => Promise<Page>): Promise<LoadRun> {
  const plain = await measureOnce(browser, await page(), url, false);
  const traced = await measureOnce(browser, await page(), url, true);
  return {
    ...plain,
    longTasksCpuMs: traced.longTasksCpuMs,
    browserTasksCpuMs: traced.browserTasksCpuMs,
    mainThreadCpuMs: traced.mainThreadCpuMs,
    longestTaskCpuMs: traced.longestTaskCpuMs,
  };
}

/** Cold and warm page loads of the demo 25 °C batch as the demo scientist, on each server in turn. */
export async function measureBatchPageLoad(
  browser: Browser,
  urls: readonly string[],
  runs: number,
): Promise<LoadFigures[]> {
  const targets: { url: string; batchId: number; state: StorageState; pageUrl: string }[] = [];
  for (const url of urls) {
    const setup = await signedInContext(browser, url, 'scientist@equilight.test');
    const batchId = await fillDemo25(setup, url);
    targets.push({ url, batchId, state: await setup.storageState(), pageUrl: `${url}/batches/${batchId}` });
    await setup.close();
  }
  const figures: LoadFigures[] = targets.map((t) => ({
    cold: [],
    warm: [],
    analysisFloorMs: 0,
    batchId: t.batchId,
  }));
  const newContext = async (state: StorageState) => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 800 }, storageState: state });
    await ctx.addInitScript(PAGE_PROBE);
    return ctx;
  };

  // One unmeasured cold load per server first: a server just started compiles its own code paths on the
  // first requests (static files, sessions, the analysis), which on 2 cores competes with the page being
  // measured; a server in use is past that.
  for (const t of targets) {
    const ctx = await newContext(t.state);
    await measureOnce(browser, await ctx.newPage(), t.pageUrl, false, true);
    await ctx.close();
  }

  // Interleaved, so that a busy moment of the machine falls on every server alike.
  for (let i = 0; i < runs; i++) {
    for (const [n, t] of targets.entries()) {
      const contexts: BrowserContext[] = [];
      const fresh = async () => {
        const ctx = await newContext(t.state);
        contexts.push(ctx);
        return ctx.newPage();
      };
      figures[n].cold.push(await measure(browser, t.pageUrl, fresh));
      for (const ctx of contexts) await ctx.close();
    }
  }
  const warmPages: Page[] = [];
  for (const t of targets) {
    const page = await (await newContext(t.state)).newPage();
    await measureOnce(browser, page, t.pageUrl, false); // fills the cache
    warmPages.push(page);
  }
  const floors: number[][] = targets.map(() => []);
  for (let i = 0; i < runs; i++) {
    for (const [n, t] of targets.entries()) {
      const page = warmPages[n];
      const again = async () => {
        await page.goto('about:blank');
        return page;
      };
      figures[n].warm.push(await measure(browser, t.pageUrl, again));
      floors[n].push(
        await page.evaluate(async (id) => {
          const started = performance.now();
          const res = await fetch(`/api/batches/${id}/analysis`);
          await res.json();
          return performance.now() - started;
        }, t.batchId),
      );
    }
  }
  for (const page of warmPages) await page.context().close();
  floors.forEach((f, n) => (figures[n].analysisFloorMs = median(f)));
  return figures;
}
