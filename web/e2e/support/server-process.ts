import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort } from '../../../server/src/testing/free-port';

export const REPO_ROOT = path.resolve(__dirname, '../../..');
export const SCREENSHOT_DIR = path.join(REPO_ROOT, 'test-output', 'screenshots');
export const DEMO_PASSWORD = 'equilight-e2e-demo';

export interface RunningServer {
  url: string;
  dataDir: string;
  process: ChildProcess;
  output(): string;
  stop(): Promise<void>;
}

/**
 * Start the built server (server/dist, dist/web) as a real process on a temporary database; `root` is
 * another checkout's build (a benchmark compares against the code before a change).
 */
export async function startServer(
  env: Record<string, string> = {},
  root = REPO_ROOT,
): Promise<RunningServer> {
  const main = path.join(root, 'server/dist/main.js');
  if (!fs.existsSync(main) || !fs.existsSync(path.join(root, 'dist/web/browser/index.html'))) {
    throw new Error('Build first: npm run build (the browser tests run against the built app).');
  }
  const port = await freePort();
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-e2e-'));
  let log = '';
  const child = spawn(process.execPath, [main], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'test',
      PORT: String(port),
      DATA_DIR: dataDir,
      DEMO_PASSWORD,
      PASSWORD_HASH_ROUNDS_FOR_TESTS: '4',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (d) => (log += d));
  child.stderr!.on('data', (d) => (log += d));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early:\n${log}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`server did not answer within 60 s:\n${log}`);
    await new Promise((r) => setTimeout(r, 150));
  }
  return {
    url,
    dataDir,
    process: child,
    output: () => log,
    async stop() {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once('exit', r));
        child.kill('SIGTERM');
        await exited;
      }
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
