import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { sleep } from './support';
import { freePort } from '../../../server/src/testing/free-port';

export { freePort };

export const REPO_ROOT = path.resolve(__dirname, '../../..');
/** The built server; another build can be named in EQUILIGHT_E2E_SERVER_MAIN (e.g. one made from a clean checkout). */
export const SERVER_MAIN =
  process.env['EQUILIGHT_E2E_SERVER_MAIN'] ?? path.join(REPO_ROOT, 'server/dist/main.js');
export const WATCHER_MAIN = path.join(REPO_ROOT, 'watcher/dist/watcher/src/main.js');
export const E2E_PASSWORD = 'equilight-watcher-e2e';

export function requireBuilt(): void {
  for (const file of [SERVER_MAIN, WATCHER_MAIN]) {
    if (!fs.existsSync(file))
      throw new Error(`Build first: npm run build (${path.relative(REPO_ROOT, file)} is missing).`);
  }
}

/** A child process whose output is kept for failure messages. */
export class Child {
  private log = '';
  readonly process: ChildProcess;
  readonly exited: Promise<void>;

  constructor(name: string, script: string, env: Record<string, string>) {
    this.process = spawn(process.execPath, [script], {
      cwd: REPO_ROOT,
      env: { ...process.env, ...env },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    this.process.stdout!.on('data', (d) => (this.log += d));
    this.process.stderr!.on('data', (d) => (this.log += d));
    this.exited = new Promise((resolve) => this.process.once('exit', () => resolve()));
    this.log += `[${name} pid ${this.process.pid}]\n`;
  }

  output(): string {
    return this.log;
  }

  get running(): boolean {
    return this.process.exitCode === null && this.process.signalCode === null;
  }

  /** Stop cleanly (SIGTERM) or abruptly (SIGKILL), and wait for the exit. */
  async stop(signal: 'SIGTERM' | 'SIGKILL' = 'SIGTERM'): Promise<void> {
    if (this.running) this.process.kill(signal);
    await this.exited;
  }
}

/** Start the built server on a fixed port and data folder; resolves once /api/health answers. */
export async function startServer(port: number, dataDir: string): Promise<Child> {
  const child = new Child('server', SERVER_MAIN, {
    NODE_ENV: 'test',
    PORT: String(port),
    HOST: '127.0.0.1',
    DATA_DIR: dataDir,
    DEMO_PASSWORD: E2E_PASSWORD,
    WEB_DIST_DIR: path.join(dataDir, 'no-web'),
  });
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (!child.running) throw new Error(`server exited early:\n${child.output()}`);
    try {
      const res = await fetch(`http://127.0.0.1:${port}/api/health`);
      if (res.ok) return child;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`server did not answer within 60 s:\n${child.output()}`);
    await sleep(100);
  }
}

export function startWatcherProcess(configFile: string): Child {
  return new Child('watcher', WATCHER_MAIN, { EQUILIGHT_WATCHER_CONFIG: configFile });
}

/** A signed-in session against the real server: cookies kept by hand, XSRF token echoed on writes. */
export class Session {
  private readonly cookies = new Map<string, string>();

  constructor(readonly baseUrl: string) {}

  static async signIn(baseUrl: string, email: string, password: string): Promise<Session> {
    const session = new Session(baseUrl);
    await session.request('GET', '/api/health');
    const res = await session.request('POST', '/api/auth/login', { email, password });
    if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${await res.text()}`);
    return session;
  }

  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  async request(method: string, url: string, json?: unknown): Promise<Response> {
    const headers: Record<string, string> = { cookie: this.cookieHeader() };
    const xsrf = this.cookies.get('XSRF-TOKEN');
    if (method !== 'GET' && xsrf) headers['X-XSRF-TOKEN'] = decodeURIComponent(xsrf);
    if (json !== undefined) headers['content-type'] = 'application/json';
    const res = await fetch(`${this.baseUrl}${url}`, {
      method,
      headers,
      body: json === undefined ? undefined : JSON.stringify(json),
    });
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair!.indexOf('=');
      this.cookies.set(pair!.slice(0, eq).trim(), pair!.slice(eq + 1).trim());
    }
    return res;
  }

  async json<T>(method: string, url: string, body?: unknown): Promise<T> {
    const res = await this.request(method, url, body);
    const text = await res.text();
    if (!res.ok) throw new Error(`${method} ${url} → ${res.status} ${text}`);
    return JSON.parse(text) as T;
  }
}

export interface IntakeItem {
  id: number;
  status: string;
  readingCount: number;
  sha256: string;
  originalName: string;
}
