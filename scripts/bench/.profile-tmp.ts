import fs from 'node:fs';
import { launchChromium } from '../../web/e2e/support/browser';
import { DEMO_PASSWORD, startServer } from '../../web/e2e/support/server-process';

async function main() {
  const server = await startServer({ SEED_DEMO: 'true', SMTP_STANDIN: 'false' });
  const browser = await launchChromium();
  try {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    await ctx.request.get(`${server.url}/api/auth/me`);
    const xsrf = (await ctx.cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
    await ctx.request.post(`${server.url}/api/auth/login`, { data: { email: 'scientist@equilight.test', password: DEMO_PASSWORD }, headers: { 'X-XSRF-TOKEN': xsrf } });
    const batches = (await (await ctx.request.get(`${server.url}/api/batches`)).json()) as { id: number; runId: string; profileId: number }[];
    const b = batches.find((x) => x.runId === 'CX-25')!;
    for (const name of ['CX-25-part1.csv', 'CX-25-part2.csv', 'CX-25-part3.csv']) {
      await ctx.request.post(`${server.url}/api/ingest`, { headers: { 'X-XSRF-TOKEN': xsrf }, multipart: { profileId: String(b.profileId), file: { name, mimeType: 'text/csv', buffer: fs.readFileSync(`samples/demo/exports/cuvette-1/${name}`) } } });
    }
    await new Promise((r) => setTimeout(r, 3000));
    await ctx.addInitScript(`window.__lt=[];new PerformanceObserver(l=>l.getEntries().forEach(e=>window.__lt.push([Math.round(e.startTime),Math.round(e.duration)]))).observe({type:'longtask',buffered:true});`);
    const page = await ctx.newPage();
    const cdp = await ctx.newCDPSession(page);
    await cdp.send('Profiler.enable');
    await cdp.send('Profiler.setSamplingInterval', { interval: 200 });
    await cdp.send('Profiler.start');
    await page.goto(`${server.url}/batches/${b.id}`);
    await page.getByTestId('best-k-value').waitFor();
    const kAt = await page.evaluate(() => performance.now());
    await page.waitForTimeout(1500);
    const { profile } = await cdp.send('Profiler.stop');
    const info = await page.evaluate(() => ({
      lt: (window as any).__lt,
      res: performance.getEntriesByType('resource').map((r: any) => [r.name.split('/').pop(), Math.round(r.startTime), Math.round(r.responseEnd), r.transferSize, r.decodedBodySize]),
      nav: (performance.getEntriesByType('navigation')[0] as any).responseEnd,
    }));
    console.log('K seen at ~', Math.round(kAt), 'nav responseEnd', Math.round(info.nav));
    console.log('long tasks [start, dur]', JSON.stringify(info.lt));
    for (const r of info.res) console.log('  ', r.join('  '));
    // CPU by 100 ms window, top function per window
    let t = (profile.startTime);
    const byIdW = new Map(profile.nodes.map((n) => [n.id, n]));
    const win = new Map<number, Map<string, number>>();
    profile.samples!.forEach((id, i) => { t += profile.timeDeltas![i]; const n = byIdW.get(id)!; if (n.callFrame.functionName === '(idle)') return; const w = Math.floor((t - profile.startTime) / 1000 / 100); const m = win.get(w) ?? new Map(); const key = (n.callFrame.url.split('/').pop() || n.callFrame.functionName); m.set(key, (m.get(key) ?? 0) + profile.timeDeltas![i] / 1000); win.set(w, m); });
    for (const [w, m] of [...win.entries()].sort((a, b) => a[0] - b[0])) console.log(`  ${w * 100}ms:`, [...m.entries()].sort((a, b) => b[1] - a[1]).slice(0, 4).map(([k, v]) => `${k} ${v.toFixed(0)}`).join(', '));
    fs.writeFileSync('/tmp/speed-prof/load.cpuprofile', JSON.stringify(profile));
    // self time by function+url
    const self = new Map<string, number>();
    const byId = new Map(profile.nodes.map((n) => [n.id, n]));
    const dt = profile.timeDeltas ?? [];
    profile.samples!.forEach((id, i) => {
      const n = byId.get(id)!;
      const key = `${n.callFrame.functionName || '(anon)'} ${n.callFrame.url.split('/').pop()}:${n.callFrame.lineNumber}`;
      self.set(key, (self.get(key) ?? 0) + (dt[i] ?? 0) / 1000);
    });
    const byUrl = new Map<string, number>();
    profile.samples!.forEach((id, i) => {
      const n = byId.get(id)!;
      const key = n.callFrame.url.split('/').pop() || n.callFrame.functionName;
      byUrl.set(key, (byUrl.get(key) ?? 0) + (dt[i] ?? 0) / 1000);
    });
    console.log([...self.entries()].sort((a, b) => b[1] - a[1]).slice(0, 30).map(([k, v]) => `${v.toFixed(0)} ms ${k}`).join('\n'));
    console.log('--- by url');
    console.log([...byUrl.entries()].sort((a, b) => b[1] - a[1]).slice(0, 20).map(([k, v]) => `${v.toFixed(0)} ms ${k}`).join('\n'));
  } finally {
    await browser.close();
    await server.stop();
  }
}
main();
