// `npm start`: the Equilight server, the drop-folder watcher (with the demo configuration the server
// writes on first start) and, once, the demo instrument that drops the invented demo exports.
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const dataDir = path.resolve(root, process.env.DATA_DIR ?? 'data');
const port = process.env.PORT ?? '4210';
const host = process.env.HOST && process.env.HOST !== '0.0.0.0' ? process.env.HOST : '127.0.0.1';
const serverUrl = `http://${host}:${port}`;
const children = [];
let stopping = false;

function run(name, args, env = {}) {
  const child = spawn(process.execPath, args, {
    cwd: root,
    stdio: 'inherit',
    env: { ...process.env, ...env },
  });
  child.on('exit', (code, signal) => {
    console.log(`[start] ${name} exited (${signal ?? code})`);
    // The server is the product: only its exit stops everything (a watcher with a bad configuration says why and exits).
    if (name === 'server') shutdown(code ?? 1);
  });
  children.push(child);
  return child;
}

function shutdown(code) {
  if (stopping) return;
  stopping = true;
  for (const child of children) if (child.exitCode === null) child.kill('SIGTERM');
  setTimeout(() => process.exit(code), 1500).unref();
}
process.on('SIGINT', () => shutdown(0));
process.on('SIGTERM', () => shutdown(0));

async function waitForServer() {
  for (let i = 0; i < 600; i++) {
    try {
      if ((await fetch(`${serverUrl}/api/health`)).ok) return true;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  return false;
}

// The demo has one lab manager, who creates and approves: four-eyes approval is off here unless asked for.
run('server', ['server/dist/main.js'], {
  FOUR_EYES_APPROVAL: process.env.FOUR_EYES_APPROVAL ?? 'false',
});
if (await waitForServer()) {
  const watcherConfig = path.join(dataDir, 'watcher.demo.json');
  if (!fs.existsSync(watcherConfig))
    console.log('[start] no demo watcher configuration (SEED_DEMO=false?): the watcher is not started');
  else if (process.env.START_WATCHER !== 'false') {
    run('watcher', ['watcher/dist/watcher/src/main.js'], {
      EQUILIGHT_WATCHER_CONFIG: watcherConfig,
      EQUILIGHT_SERVER_URL: serverUrl,
    });
    const marker = path.join(dataDir, '.demo-instrument-done');
    if (!fs.existsSync(marker) && process.env.DEMO_INSTRUMENT !== 'false') {
      run('demo instrument', [
        'scripts/demo-instrument.mjs',
        '--drop',
        path.join(dataDir, 'drop'),
        '--marker',
        marker,
      ]);
    }
  }
  console.log(`[start] Equilight is at http://localhost:${port} (demo sign-in: scientist@equilight.test)`);
}
