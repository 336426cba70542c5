/**
 * P2: a file settled in the drop folder → its `file.stored` event received by a WebSocket client,
 * p50/p95 over 100 files, printed beside the watcher's settle threshold. The floor, measured in the
 * same run: the same kind of file POSTed straight to /api/ingest (no watcher) → `file.stored`.
 *
 * Real parts: the built server as its own process on a temporary data folder, the watcher (in this
 * process) on a temporary drop folder, a `ws` client signed in with a session cookie.
 * Run: npm run build:server && npm run bench:ingest-latency [-- --files 100 --settle-ms 1500 --interval-ms 150]
 */
import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import WebSocket from 'ws';
import { parseWatcherConfig } from '../../watcher/src/config';
import { consoleLogger, silentLogger } from '../../watcher/src/logger';
import { createWatcher } from '../../watcher/src/watcher';

const ROOT = path.resolve(__dirname, '../..');
const SERVER_MAIN = process.env['EQUILIGHT_BENCH_SERVER_MAIN'] ?? path.join(ROOT, 'server/dist/main.js');
const PASSWORD = 'equilight-bench-latency';

function option(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  const value = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isFinite(value) || value <= 0) throw new Error(`--${name} must be a positive number`);
  return value;
}

const FILES = option('files', 100);
const SETTLE_MS = option('settle-ms', 1500);
/** Time between two files: a steady stream, so several settle at once as on a busy instrument PC. */
const INTERVAL_MS = option('interval-ms', 150);
const FLOOR_FILES = option('floor-files', 30);

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

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
    srv.on('error', reject);
  });
}

async function startServer(port: number, dataDir: string): Promise<ChildProcess> {
  if (!fs.existsSync(SERVER_MAIN))
    throw new Error(`Build first: npm run build:server (${SERVER_MAIN} is missing)`);
  let log = '';
  const child = spawn(process.execPath, [SERVER_MAIN], {
    cwd: ROOT,
    env: {
      ...process.env,
      NODE_ENV: 'test',
      PORT: String(port),
      HOST: '127.0.0.1',
      DATA_DIR: dataDir,
      DEMO_PASSWORD: PASSWORD,
      WEB_DIST_DIR: path.join(dataDir, 'no-web'),
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (d) => (log += d));
  child.stderr!.on('data', (d) => (log += d));
  const deadline = Date.now() + 20_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early:\n${log}`);
    try {
      if ((await fetch(`http://127.0.0.1:${port}/api/health`)).ok) return child;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`server did not answer within 20 s:\n${log}`);
    await sleep(100);
  }
}

/** Sign in as the demo admin; returns the cookie header and the XSRF token for writes. */
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

async function main(): Promise<void> {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-bench-latency-'));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const server = await startServer(port, path.join(root, 'data'));
  let watcher: ReturnType<typeof createWatcher> | undefined;
  let ws: WebSocket | undefined;
  try {
    const session = await signIn(base);
    const created = await fetch(`${base}/api/instruments`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', cookie: session.cookie, 'x-xsrf-token': session.xsrf },
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

    // file.stored events by run id (from the file name), with their arrival time.
    const storedAt = new Map<string, number>();
    ws = new WebSocket(`ws://127.0.0.1:${port}/api/events`, { headers: { cookie: session.cookie } });
    ws.on('message', (raw) => {
      const event = JSON.parse(String(raw)) as { type: string; data: { runId?: string } };
      if (event.type === 'file.stored' && event.data.runId) storedAt.set(event.data.runId, performance.now());
    });
    await new Promise((resolve, reject) => {
      ws!.once('open', resolve);
      ws!.once('error', reject);
    });

    // Floor: the server's own part, straight POSTs one after another.
    const floor: number[] = [];
    for (let i = 0; i < FLOOR_FILES; i++) {
      const runId = `LAT-${9000 + i}`;
      const form = new FormData();
      form.append('file', new Blob([plateExport(9000 + i)], { type: 'text/csv' }), `${runId}.csv`);
      const start = performance.now();
      const res = await fetch(`${base}/api/ingest`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}` },
        body: form,
      });
      if (res.status !== 202) throw new Error(`direct upload failed: ${res.status} ${await res.text()}`);
      while (!storedAt.has(runId)) await sleep(1);
      floor.push(storedAt.get(runId)! - start);
    }

    const dropDir = path.join(root, 'drop');
    const config = parseWatcherConfig({
      serverUrl: base,
      dropDir,
      spoolDir: path.join(root, 'spool'),
      settleMs: SETTLE_MS,
      instruments: [{ folder: 'latency-reader', token }],
    });
    watcher = createWatcher(config, {
      logger: process.argv.includes('--verbose') ? consoleLogger : silentLogger,
    });
    await watcher.start();

    const writtenAt = new Map<string, number>();
    for (let i = 0; i < FILES; i++) {
      const runId = `LAT-${1000 + i}`;
      fs.writeFileSync(path.join(dropDir, 'latency-reader', `${runId}.csv`), plateExport(1000 + i));
      writtenAt.set(runId, performance.now());
      await sleep(INTERVAL_MS);
    }
    const deadline = Date.now() + SETTLE_MS + 60_000;
    while ([...writtenAt.keys()].some((id) => !storedAt.has(id))) {
      if (Date.now() > deadline) throw new Error('not every file was stored within a minute');
      await sleep(20);
    }

    // "Settled" = last write + settle threshold; what is left is the watcher's and the server's work.
    const afterSettle = [...writtenAt].map(([id, t]) => storedAt.get(id)! - t - SETTLE_MS);
    const fromWrite = [...writtenAt].map(([id, t]) => storedAt.get(id)! - t);
    const f = (ms: number) => `${ms.toFixed(0).padStart(6)} ms`;
    const p95 = percentile(fromWrite, 95);
    const floorP95 = percentile(floor, 95);
    console.log(`P2 ingest latency: ${FILES} files, one every ${INTERVAL_MS} ms, 96 readings each`);
    console.log(`  settle threshold                       ${f(SETTLE_MS)}`);
    console.log(`  last write → file.stored        p50 ${f(percentile(fromWrite, 50))}   p95 ${f(p95)}`);
    console.log(
      `  settled → file.stored           p50 ${f(percentile(afterSettle, 50))}   p95 ${f(percentile(afterSettle, 95))}`,
    );
    console.log(
      `  floor: POST → file.stored       p50 ${f(percentile(floor, 50))}   p95 ${f(floorP95)}   (${FLOOR_FILES} direct uploads, no watcher)`,
    );
    console.log(
      `  p95 vs aim (threshold + 250 ms = ${SETTLE_MS + 250} ms): ${p95 <= SETTLE_MS + 250 ? 'within' : 'OVER'} ` +
        `by ${Math.abs(SETTLE_MS + 250 - p95).toFixed(0)} ms; ` +
        `watcher's share of p95 after settling: ${(percentile(afterSettle, 95) - floorP95).toFixed(0)} ms above the floor ` +
        `(ratio ${(percentile(afterSettle, 95) / floorP95).toFixed(2)}×)`,
    );
  } finally {
    ws?.close();
    await watcher?.stop();
    server.kill('SIGTERM');
    await new Promise((resolve) => server.once('exit', resolve));
    fs.rmSync(root, { recursive: true, force: true });
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
