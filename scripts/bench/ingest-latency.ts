/**
 * P2 under load: files dropped at a steady rate (default 20 per second) into the drop folder of the real
 * watcher process → their `file.stored` event at each of 50 signed-in WebSocket clients. p50/p95 are
 * printed beside the watcher's settle time: the aim is p95 ≤ settle + 250 ms. The floor, measured in
 * the same run: the same kind of file POSTed straight to /api/ingest (no watcher, one at a time) →
 * `file.stored` at every client.
 *
 * Real parts: the built server as its own process on a temporary data folder, the built watcher as its
 * own process on a temporary drop folder (configured through its environment, as in production), and
 * 50 `ws` clients, each signed in with its own session.
 * Run: npm run build:server && npm run build:watcher && npm run bench:ingest-latency
 *      [-- --files 200 --rate 20 --settle-ms 1000 --clients 50]
 * EQUILIGHT_BENCH_SERVER_MAIN / EQUILIGHT_BENCH_WATCHER_MAIN run other builds (e.g. of an older commit).
 */
import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import WebSocket from 'ws';
import { freePort } from '../../server/src/testing/free-port';

const ROOT = path.resolve(__dirname, '../..');
const SERVER_MAIN = process.env['EQUILIGHT_BENCH_SERVER_MAIN'] ?? path.join(ROOT, 'server/dist/main.js');
const WATCHER_MAIN =
  process.env['EQUILIGHT_BENCH_WATCHER_MAIN'] ?? path.join(ROOT, 'watcher/dist/watcher/src/main.js');
const PASSWORD = 'equilight-bench-latency';

function option(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  const value = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isFinite(value) || value <= 0) throw new Error(`--${name} must be a positive number`);
  return value;
}

/** --log <file>: keep the watcher's and the server's output there (to see where the time goes). */
function textOption(name: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

const FILES = option('files', 200);
/** Files per second, written on a fixed schedule (not "sleep after each"), so the rate holds. */
const RATE = option('rate', 20);
const SETTLE_MS = option('settle-ms', 1000);
const CLIENTS = option('clients', 50);
const FLOOR_FILES = option('floor-files', 30);
const AIM_MS = 250;

const ROWS = 'ABCDEFGH';
function plateExport(seed: number): string {
  const lines = ['position,wavelength_nm,absorbance'];
  for (let r = 0; r < 8; r++) {
    for (let c = 1; c <= 12; c++) {
      // Unique for every seed, so no file is a duplicate of another.
      lines.push(`${ROWS[r]}${c},450,${(0.1 + (seed * 96 + r * 12 + c) / 1e6).toFixed(6)}`);
    }
  }
  return `${lines.join('\n')}\n`;
}

function percentile(values: number[], p: number): number {
  const s = [...values].sort((a, b) => a - b);
  const rank = (p / 100) * (s.length - 1);
  const lo = Math.floor(rank);
  const hi = Math.ceil(rank);
  return s[lo]! + (s[hi]! - s[lo]!) * (rank - lo);
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** A child process whose output is kept, for failure messages and for "ready" lines. */
function startChild(script: string, env: Record<string, string>): { child: ChildProcess; log: () => string } {
  if (!fs.existsSync(script))
    throw new Error(`Build first: npm run build:server && npm run build:watcher (${script} is missing)`);
  let log = '';
  const child = spawn(process.execPath, [script], {
    cwd: ROOT,
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (d) => (log += d));
  child.stderr!.on('data', (d) => (log += d));
  return { child, log: () => log };
}

async function stopChild(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise((resolve) => child.once('exit', resolve));
  child.kill('SIGTERM');
  await exited;
}

async function waitFor(what: string, ok: () => Promise<boolean> | boolean, log: () => string): Promise<void> {
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (await ok()) return;
    if (Date.now() > deadline) throw new Error(`${what} did not happen within 30 s:\n${log()}`);
    await sleep(50);
  }
}

/** Sign in as the demo admin (a new session each time); returns the cookie header and the XSRF token. */
async function signIn(base: string): Promise<{ cookie: string; xsrf: string }> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair!.indexOf('=');
      jar.set(pair!.slice(0, eq), pair!.slice(eq + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
  keep(await fetch(`${base}/api/health`));
  const xsrf = decodeURIComponent(jar.get('XSRF-TOKEN') ?? '');
  const res = await fetch(`${base}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', cookie: cookie(), 'x-xsrf-token': xsrf },
    body: JSON.stringify({ email: 'admin@equilight.test', password: PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${await res.text()}`);
  keep(res);
  // Sign-in issues a new XSRF token bound to the new session.
  return { cookie: cookie(), xsrf: decodeURIComponent(jar.get('XSRF-TOKEN') ?? '') };
}

/** One signed-in live client: when each run id's `file.stored` reached it. */
async function liveClient(
  port: number,
  cookie: string,
): Promise<{ ws: WebSocket; storedAt: Map<string, number> }> {
  const storedAt = new Map<string, number>();
  const ws = new WebSocket(`ws://127.0.0.1:${port}/api/events`, { headers: { cookie } });
  ws.on('message', (raw) => {
    const at = performance.now();
    const event = JSON.parse(String(raw)) as { type: string; data: { runId?: string } };
    if (event.type === 'file.stored' && event.data.runId) storedAt.set(event.data.runId, at);
  });
  await new Promise((resolve, reject) => {
    ws.once('open', resolve);
    ws.once('error', reject);
  });
  return { ws, storedAt };
}

async function main(): Promise<void> {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-bench-latency-'));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const dataDir = path.join(root, 'data');
  const server = startChild(SERVER_MAIN, {
    NODE_ENV: 'test',
    PORT: String(port),
    HOST: '127.0.0.1',
    DATA_DIR: dataDir,
    DEMO_PASSWORD: PASSWORD,
    WEB_DIST_DIR: path.join(dataDir, 'no-web'),
  });
  let watcher: ReturnType<typeof startChild> | undefined;
  const clients: { ws: WebSocket; storedAt: Map<string, number> }[] = [];
  try {
    await waitFor(
      'the server answering /api/health',
      async () => {
        if (server.child.exitCode !== null) throw new Error(`server exited early:\n${server.log()}`);
        return fetch(`${base}/api/health`).then(
          (r) => r.ok,
          () => false,
        );
      },
      server.log,
    );
    const admin = await signIn(base);
    const created = await fetch(`${base}/api/instruments`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', cookie: admin.cookie, 'x-xsrf-token': admin.xsrf },
      body: JSON.stringify({
        name: 'Latency reader',
        kind: 'plate_reader',
        plateFormat: '96',
        fileFormat: 'long_table',
        dropSubfolder: 'latency-reader',
        fileNamePattern: '^(?<run>LAT-\\d+)',
      }),
    });
    if (created.status !== 201)
      throw new Error(`creating the profile failed: ${created.status} ${await created.text()}`);
    const { token } = (await created.json()) as { token: string };

    for (let i = 0; i < CLIENTS; i++) clients.push(await liveClient(port, (await signIn(base)).cookie));
    /** When every client had the file's event (the slowest client counts), or undefined. */
    const everyClientAt = (runId: string): number | undefined => {
      let last = 0;
      for (const c of clients) {
        const at = c.storedAt.get(runId);
        if (at === undefined) return undefined;
        last = Math.max(last, at);
      }
      return last;
    };

    // Floor: the server's own part, straight POSTs one after another.
    const floor: number[] = [];
    for (let i = 0; i < FLOOR_FILES; i++) {
      const runId = `LAT-${90000 + i}`;
      const form = new FormData();
      form.append('file', new Blob([plateExport(90000 + i)], { type: 'text/csv' }), `${runId}.csv`);
      const start = performance.now();
      const res = await fetch(`${base}/api/ingest`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}` },
        body: form,
      });
      if (res.status !== 202) throw new Error(`direct upload failed: ${res.status} ${await res.text()}`);
      await waitFor(
        `file.stored of ${runId} at every client`,
        () => everyClientAt(runId) !== undefined,
        server.log,
      );
      floor.push(everyClientAt(runId)! - start);
    }

    const dropDir = path.join(root, 'drop');
    watcher = startChild(WATCHER_MAIN, {
      EQUILIGHT_SERVER_URL: base,
      EQUILIGHT_DROP_DIR: dropDir,
      EQUILIGHT_SPOOL_DIR: path.join(root, 'spool'),
      EQUILIGHT_SETTLE_MS: String(SETTLE_MS),
      EQUILIGHT_INSTRUMENTS: `latency-reader=${token}`,
    });
    const watcherLog = watcher.log;
    await waitFor(
      'the watcher finishing its first scan',
      () => /initial scan .* done/.test(watcherLog()),
      watcherLog,
    );

    const writtenAt = new Map<string, number>();
    const intervalMs = 1000 / RATE;
    const start = performance.now();
    for (let i = 0; i < FILES; i++) {
      const due = start + i * intervalMs;
      const wait = due - performance.now();
      if (wait > 0) await sleep(wait);
      const runId = `LAT-${10000 + i}`;
      fs.writeFileSync(path.join(dropDir, 'latency-reader', `${runId}.csv`), plateExport(10000 + i));
      writtenAt.set(runId, performance.now());
    }
    const writeSeconds = (performance.now() - start) / 1000;
    // A file whose event never reaches a client is a fault: reported, and left out of the figures.
    const lost = await waitFor(
      'file.stored of every dropped file at every client',
      () => [...writtenAt.keys()].every((id) => everyClientAt(id) !== undefined),
      () => '',
    ).then(
      () => [],
      () => [...writtenAt.keys()].filter((id) => everyClientAt(id) === undefined),
    );
    for (const id of lost) writtenAt.delete(id);

    // Per delivery (file × client), and per file at its slowest client.
    const deliveries: number[] = [];
    for (const [id, t] of writtenAt) for (const c of clients) deliveries.push(c.storedAt.get(id)! - t);
    if (deliveries.length === 0) throw new Error(`no file reached every client:\n${watcherLog()}`);
    const slowest = [...writtenAt].map(([id, t]) => everyClientAt(id)! - t);
    const f = (ms: number) => `${ms.toFixed(0).padStart(6)} ms`;
    const p95 = percentile(deliveries, 95);
    const aim = SETTLE_MS + AIM_MS;
    console.log(
      `P2 ingest latency under load: ${FILES} files at ${(FILES / writeSeconds).toFixed(1)} files/s (aimed ${RATE}), ` +
        `96 readings each, watcher process, ${CLIENTS} signed-in live clients`,
    );
    console.log(`  settle time                                 ${f(SETTLE_MS)}`);
    console.log(
      `  write → file.stored, every delivery   p50 ${f(percentile(deliveries, 50))}   p95 ${f(p95)}   max ${f(Math.max(...deliveries))}`,
    );
    console.log(
      `  write → file.stored, slowest client   p50 ${f(percentile(slowest, 50))}   p95 ${f(percentile(slowest, 95))}`,
    );
    console.log(
      `  beyond the settle time                p50 ${f(percentile(deliveries, 50) - SETTLE_MS)}   p95 ${f(p95 - SETTLE_MS)}`,
    );
    console.log(
      `  floor: POST → file.stored at every client   p50 ${f(percentile(floor, 50))}   p95 ${f(percentile(floor, 95))}` +
        `   (${FLOOR_FILES} direct uploads one at a time, no watcher)`,
    );
    if (lost.length > 0)
      console.log(
        `  LOST: ${lost.length} file(s) stored but their file.stored never reached every client ` +
          `within 30 s (${lost.slice(0, 5).join(', ')}); left out of the figures above`,
      );
    console.log(
      `  p95 vs aim (settle + ${AIM_MS} ms = ${aim} ms): ${p95 <= aim ? 'within' : 'OVER'} by ${Math.abs(aim - p95).toFixed(0)} ms` +
        `; beyond settle ${(p95 - SETTLE_MS).toFixed(0)} ms = ${((p95 - SETTLE_MS) / percentile(floor, 95)).toFixed(1)}× the floor's p95`,
    );
  } finally {
    const logFile = textOption('log');
    if (logFile) fs.writeFileSync(logFile, `${watcher?.log() ?? ''}\n--- server ---\n${server.log()}`);
    for (const c of clients) c.ws.close();
    if (watcher) await stopChild(watcher.child);
    await stopChild(server.child);
    fs.rmSync(root, { recursive: true, force: true });
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
