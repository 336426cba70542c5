/**
 * Health under load: does one big file plus heavy analyses hold up everyone else?
 *
 * Starts the built server (its own process, a temporary data folder with the invented demo scenario),
 * then probes GET /api/health every 50 ms:
 *   1. floor: with no other load, for FLOOR_SECONDS;
 *   2. load: while a ~20 MB generated long-table export (1.15 M readings) is ingested (parsed and stored)
 *      and four analyses with the most Monte Carlo draws a batch may ask for run at once, repeated
 *      until the file is stored.
 * Prints p50/p95/p99/max health latency for both, and their ratio. Aim: p99 under load below 100 ms.
 *
 * Run: npm run build:server && npm run bench:health [-- --readings 1150000 --floor-seconds 5]
 * Another build can be measured with EQUILIGHT_BENCH_SERVER_MAIN=/path/to/dist/main.js.
 */
import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort } from '../../server/src/testing/free-port';

const ROOT = path.resolve(__dirname, '../..');
const SERVER_MAIN = process.env['EQUILIGHT_BENCH_SERVER_MAIN'] ?? path.join(ROOT, 'server/dist/main.js');
const PASSWORD = 'equilight-bench-health';
const PROBE_EVERY_MS = 50;
const ANALYSES_AT_ONCE = 4;
/** The most draws batch settings accept (server/src/workers/limits.ts); older builds accept more. */
const MONTE_CARLO_DRAWS = 5000;

function option(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  const value = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isFinite(value) || value <= 0) throw new Error(`--${name} must be a positive number`);
  return value;
}

const READINGS = option('readings', 1_150_000);
const FLOOR_SECONDS = option('floor-seconds', 5);

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

function percentile(values: number[], p: number): number {
  const s = [...values].sort((a, b) => a - b);
  const rank = (p / 100) * (s.length - 1);
  const lo = Math.floor(rank);
  const hi = Math.ceil(rank);
  return s[lo]! + (s[hi]! - s[lo]!) * (rank - lo);
}

/** A 384-well long-table export: every position at one wavelength after another (200 nm, 201 nm, …). */
function largeExport(readings: number): string {
  const rows = 'ABCDEFGHIJKLMNOP';
  const lines = ['position,wavelength_nm,absorbance'];
  for (let i = 0; i < readings; i++) {
    const well = i % 384;
    const wavelength = 200 + Math.floor(i / 384);
    const absorbance = 0.05 + ((i * 7919) % 2500) / 1000;
    lines.push(`${rows[Math.floor(well / 24)]}${(well % 24) + 1},${wavelength},${absorbance.toFixed(4)}`);
  }
  return `${lines.join('\n')}\n`;
}

async function startServer(
  port: number,
  dataDir: string,
): Promise<{ child: ChildProcess; log: () => string }> {
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
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early:\n${log}`);
    try {
      if ((await fetch(`http://127.0.0.1:${port}/api/health`)).ok) return { child, log: () => log };
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`server did not answer within 60 s:\n${log}`);
    await sleep(100);
  }
}

interface Session {
  request(method: string, url: string, body?: unknown): Promise<Response>;
}

async function signIn(base: string, email: string): Promise<Session> {
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
  const session: Session = {
    async request(method, url, body) {
      const headers: Record<string, string> = { cookie: cookie() };
      if (method !== 'GET') headers['x-xsrf-token'] = decodeURIComponent(jar.get('XSRF-TOKEN') ?? '');
      if (body !== undefined) headers['content-type'] = 'application/json';
      const res = await fetch(`${base}${url}`, {
        method,
        headers,
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      keep(res);
      return res;
    },
  };
  const res = await session.request('POST', '/api/auth/login', { email, password: PASSWORD });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${await res.text()}`);
  return session;
}

async function json<T>(res: Promise<Response>): Promise<T> {
  const r = await res;
  const text = await r.text();
  if (!r.ok) throw new Error(`${r.status} ${text.slice(0, 300)}`);
  return JSON.parse(text) as T;
}

let failedProbes = 0;

/** Probe /api/health every PROBE_EVERY_MS until `stop()` says so; latencies in ms. */
async function probeHealth(base: string, stop: () => boolean): Promise<number[]> {
  const latencies: number[] = [];
  while (!stop()) {
    const started = performance.now();
    try {
      const res = await fetch(`${base}/api/health`);
      await res.arrayBuffer();
      if (!res.ok) throw new Error(`health answered ${res.status}`);
    } catch {
      // A stalled server may drop the connection: the probe failed, after this long.
      failedProbes++;
    }
    const elapsed = performance.now() - started;
    latencies.push(elapsed);
    await sleep(Math.max(0, PROBE_EVERY_MS - elapsed));
  }
  return latencies;
}

function line(label: string, values: number[]): string {
  const f = (v: number) => v.toFixed(1).padStart(8);
  return (
    `  ${label.padEnd(22)} n=${String(values.length).padStart(5)}  p50 ${f(percentile(values, 50))} ms` +
    `  p95 ${f(percentile(values, 95))} ms  p99 ${f(percentile(values, 99))} ms  max ${f(Math.max(...values))} ms`
  );
}

async function main(): Promise<void> {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-bench-health-'));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const server = await startServer(port, path.join(root, 'data'));
  try {
    const admin = await signIn(base, 'admin@equilight.test');
    const manager = await signIn(base, 'manager@equilight.test');
    const created = await json<{ profile: { id: number }; token: string }>(
      admin.request('POST', '/api/instruments', {
        name: 'Bench reader (384)',
        kind: 'plate_reader',
        plateFormat: '384',
        fileFormat: 'long_table',
        dropSubfolder: 'bench-health',
      }),
    );
    // Heavy analyses: the demo batches that hold readings (reopened if approved), with the most
    // Monte Carlo draws allowed.
    const { items: batches } = await json<{ items: Array<{ id: number; state: string; fileCount: number }> }>(
      manager.request('GET', '/api/batches?pageSize=100'),
    );
    const heavy = batches.filter((b) => b.fileCount > 0).slice(0, ANALYSES_AT_ONCE);
    if (heavy.length === 0) throw new Error('no demo batch with readings to analyse');
    for (const b of heavy) {
      if (b.state === 'approved') {
        await json(
          manager.request('POST', `/api/batches/${b.id}/reopen`, { reason: 'benchmark: heavy analysis' }),
        );
      }
      await json(
        manager.request('PUT', `/api/batches/${b.id}/settings`, {
          settings: { monteCarloDraws: MONTE_CARLO_DRAWS },
          reason: 'benchmark: heavy analysis',
        }),
      );
    }
    const content = largeExport(READINGS);

    // 1. floor: health with nothing else going on.
    const floorEnds = Date.now() + FLOOR_SECONDS * 1000;
    const floor = await probeHealth(base, () => Date.now() > floorEnds);

    // 2. load: the big file and four heavy analyses at once, while the probe runs.
    let loadDone = false;
    const probing = probeHealth(base, () => loadDone);
    const started = performance.now();
    const form = new FormData();
    form.append('file', new Blob([content]), 'BENCH-HEALTH-0001.csv');
    const receipt = await json<{ id: number }>(
      fetch(`${base}/api/ingest`, {
        method: 'POST',
        headers: { authorization: `Bearer ${created.token}` },
        body: form,
      }),
    );
    const uploadedMs = performance.now() - started;
    let analyses = 0;
    const failures: string[] = [];
    let fileDone = false;
    const analysing = (async () => {
      // Keep four analyses in flight until the file has landed (at least one round).
      do {
        await Promise.all(
          Array.from({ length: ANALYSES_AT_ONCE }, (_, i) =>
            json(manager.request('GET', `/api/batches/${heavy[i % heavy.length]!.id}/analysis`)).then(
              () => analyses++,
              // Counted and shown, not fatal: a stalled server may drop connections.
              (err: unknown) => failures.push(String((err as Error).cause ?? err)),
            ),
          ),
        );
      } while (!fileDone);
    })();
    let file: { status: string; readingCount: number; error: string | null };
    for (;;) {
      file = await json(admin.request('GET', `/api/intake/${receipt.id}`));
      if (!['queued', 'parsing'].includes(file.status)) break;
      await sleep(250);
    }
    const storedMs = performance.now() - started;
    fileDone = true;
    await analysing;
    const loadMs = performance.now() - started;
    loadDone = true;
    const load = await probing;

    console.log(
      `Health under load (server ${path.relative(ROOT, SERVER_MAIN)}, probe every ${PROBE_EVERY_MS} ms, ` +
        `${os.cpus().length} CPU(s) seen)`,
    );
    console.log(
      `  file: ${(Buffer.byteLength(content) / 1024 / 1024).toFixed(1)} MB, ${READINGS.toLocaleString('en')} readings → ` +
        `${file.status}${file.error ? ` (${file.error.slice(0, 120)})` : ''}, ${file.readingCount.toLocaleString('en')} stored; ` +
        `upload answered in ${(uploadedMs / 1000).toFixed(1)} s, stored after ${(storedMs / 1000).toFixed(1)} s`,
    );
    console.log(
      `  analyses: ${analyses} of demo batch(es) ${heavy.map((b) => b.id).join(', ')} with ` +
        `${MONTE_CARLO_DRAWS} Monte Carlo draws, ${ANALYSES_AT_ONCE} at a time; load over after ${(loadMs / 1000).toFixed(1)} s`,
    );
    if (failedProbes > 0)
      console.log(`  failed health probes (counted at the time they failed): ${failedProbes}`);
    if (failures.length > 0) {
      console.log(`  failed analysis requests: ${failures.length} (first: ${failures[0]!.slice(0, 120)})`);
    }
    console.log(line('floor (no load)', floor));
    console.log(line('under load', load));
    const p99 = percentile(load, 99);
    console.log(
      `  ratio p99 under load / floor p99: ${(p99 / percentile(floor, 99)).toFixed(1)}x; ` +
        `aim p99 < 100 ms: ${p99 < 100 ? 'met' : 'NOT met'}`,
    );
  } catch (err) {
    console.error(server.log().slice(-3000));
    throw err;
  } finally {
    server.child.kill('SIGTERM');
    await new Promise((resolve) => server.child.once('exit', resolve));
    fs.rmSync(root, { recursive: true, force: true });
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
