// jest globalSetup: the worker threads' task file (server/src/workers/tasks.ts) bundled once per run, so
// each test app's worker pool starts on plain JavaScript, as `node server/dist/main.js` does, instead
// of compiling the analysis module again through tsx's require hook in every new thread (about a
// second of CPU per pool). Packages stay outside the bundle and load from node_modules.
const path = require('node:path');
const { buildSync } = require('esbuild');

module.exports = function bundleWorkerTasks() {
  const root = path.resolve(__dirname, '../../..');
  const outfile = path.join(root, 'node_modules/.cache/equilight-tests/worker-tasks.js');
  buildSync({
    entryPoints: [path.join(root, 'server/src/workers/tasks.ts')],
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    packages: 'external',
    tsconfig: path.join(root, 'server/tsconfig.json'),
    outfile,
    logLevel: 'silent',
  });
  process.env.EQUILIGHT_TEST_WORKER_TASKS = outfile;
};
