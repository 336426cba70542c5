/* global URL, console */
// One jest run, four projects: the server (with analysis, parsers, watcher) on SQLite, the server's
// database tests again on PostgreSQL, the Angular web app, and the browser tests that drive Debian's
// Chromium against a real server.
const fs = require('node:fs');
const net = require('node:net');
const path = require('node:path');
const { createCjsPreset } = require('jest-preset-angular/presets');

const esmPackages = [
  'p-queue',
  'p-timeout',
  'eventemitter3',
  'chokidar',
  'readdirp',
  // jcampconverter and its dependencies are ES modules.
  'jcampconverter',
  'ensure-string',
  'dynamic-typing',
  'ml-array-median',
  'ml-array-max',
  'ml-array-min',
  'ml-array-rescale',
  'is-any-array',
  'median-quickselect',
  'gyromagnetic-ratio',
];
const transformIgnorePatterns = [`node_modules/(?!(${esmPackages.join('|')})/)`];
// The shared modules' path aliases (tsconfig.json `paths`), for the projects that run on Node.
const sharedModules = {
  '^@equilight/analysis$': '<rootDir>/server/src/analysis/index.ts',
  '^@equilight/contracts$': '<rootDir>/server/src/contracts/index.ts',
};
const nodeTransform = {
  '^.+\\.[tj]sx?$': ['ts-jest', { tsconfig: '<rootDir>/server/tsconfig.spec.json' }],
};

const POSTGRES_URL = process.env.EQUILIGHT_TEST_POSTGRES_URL || 'postgres://postgres@127.0.0.1:5432/test';

const REDIS_URL = process.env.EQUILIGHT_TEST_REDIS_URL || 'redis://127.0.0.1:6379';

/** Does a server answer at this address (a TCP connection within 2 s)? */
function answers(url, defaultPort) {
  const { hostname, port } = new URL(url);
  return new Promise((resolve) => {
    const socket = net.connect({ host: hostname, port: Number(port || defaultPort) });
    const done = (ok) => {
      socket.destroy();
      resolve(ok);
    };
    socket.setTimeout(2000, () => done(false));
    socket.once('connect', () => done(true));
    socket.once('error', () => done(false));
  });
}

/** The server's test files that start the app on a database (startTestApp): the PostgreSQL pass. */
function databaseTestFiles() {
  const found = [];
  const walk = (dir) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else if (entry.name.endsWith('.spec.ts') && fs.readFileSync(full, 'utf8').includes('startTestApp('))
        found.push(full);
    }
  };
  walk(path.join(__dirname, 'server/src'));
  return found;
}

/**
 * The PostgreSQL pass, or null with one line saying why it is skipped. EQUILIGHT_REQUIRE_POSTGRES=1 (set
 * by .ci/run) turns a missing PostgreSQL into a failure; EQUILIGHT_TEST_POSTGRES=off skips the pass on
 * purpose (a quick local run).
 */
async function postgresPass() {
  const required = process.env.EQUILIGHT_REQUIRE_POSTGRES === '1';
  if (process.env.EQUILIGHT_TEST_POSTGRES === 'off' && !required) {
    console.log('[jest] PostgreSQL pass skipped: EQUILIGHT_TEST_POSTGRES=off');
    return null;
  }
  if (!(await answers(POSTGRES_URL, 5432))) {
    const why = `no PostgreSQL answers at ${POSTGRES_URL.replace(/\/\/[^@]*@/, '//')}`;
    if (required)
      throw new Error(`The PostgreSQL pass is required (EQUILIGHT_REQUIRE_POSTGRES=1) but ${why}.`);
    console.log(`[jest] PostgreSQL pass skipped: ${why} (EQUILIGHT_REQUIRE_POSTGRES=1 makes this a failure)`);
    process.env.EQUILIGHT_TEST_POSTGRES = 'off';
    return null;
  }
  return {
    displayName: 'server-pg',
    rootDir: __dirname,
    testEnvironment: 'node',
    testMatch: databaseTestFiles(),
    setupFilesAfterEnv: ['<rootDir>/server/src/testing/postgres-pass.ts'],
    transform: nodeTransform,
    transformIgnorePatterns,
    moduleNameMapper: sharedModules,
  };
}

const projects = [
  {
    displayName: 'server',
    rootDir: __dirname,
    testEnvironment: 'node',
    testMatch: ['<rootDir>/server/src/**/*.spec.ts', '<rootDir>/watcher/src/**/*.spec.ts'],
    transform: nodeTransform,
    transformIgnorePatterns,
    moduleNameMapper: sharedModules,
  },
  {
    displayName: 'web',
    rootDir: __dirname,
    ...createCjsPreset({
      tsconfig: '<rootDir>/web/tsconfig.spec.json',
      testEnvironment: 'jest-preset-angular/environments/jest-jsdom-env',
    }),
    setupFilesAfterEnv: ['<rootDir>/web/src/setup-jest.ts'],
    testMatch: ['<rootDir>/web/src/**/*.spec.ts'],
    moduleNameMapper: {
      ...sharedModules,
      // import.meta (new Worker(new URL(…))) does not load under CommonJS; jsdom has no Worker anyway.
      '^\\./what-if-worker$': '<rootDir>/web/src/testing/no-web-worker.ts',
    },
  },
  {
    displayName: 'browser',
    rootDir: __dirname,
    testEnvironment: 'node',
    testMatch: ['<rootDir>/web/e2e/**/*.e2e.ts'],
    transform: nodeTransform,
    transformIgnorePatterns,
    moduleNameMapper: sharedModules,
  },
];

/**
 * The tests on Redis (server/src/testing/redis.ts `describeWithRedis`) run when a Redis server answers at
 * EQUILIGHT_TEST_REDIS_URL (default redis://127.0.0.1:6379); otherwise they are skipped with one line
 * saying why, or, with EQUILIGHT_REQUIRE_REDIS=1 (set by .ci/run), the run fails. The answer reaches the
 * test files through EQUILIGHT_TEST_REDIS (on/off).
 */
async function redisTests() {
  const required = process.env.EQUILIGHT_REQUIRE_REDIS === '1';
  if (await answers(REDIS_URL, 6379)) {
    process.env.EQUILIGHT_TEST_REDIS = 'on';
    return;
  }
  const why = `no Redis answers at ${REDIS_URL.replace(/\/\/[^@]*@/, '//')}`;
  if (required) throw new Error(`The Redis tests are required (EQUILIGHT_REQUIRE_REDIS=1) but ${why}.`);
  console.log(`[jest] Redis tests skipped: ${why} (EQUILIGHT_REQUIRE_REDIS=1 makes this a failure)`);
  process.env.EQUILIGHT_TEST_REDIS = 'off';
}

module.exports = async () => {
  await redisTests();
  const pg = await postgresPass();
  // 30 s a test or hook, not jest's 5 s: on a loaded 2-core machine starting a test app alone took over 15 s.
  return {
    testTimeout: 30_000,
    // A test worker is replaced once its heap passes 1 GB after a file. The web project's workers ended a full
    // run at ~1.3 GB of memory and took over half a second to tear down after their last file, so jest killed
    // them and said "A worker process has failed to exit gracefully" (nothing leaked: both had no timers or
    // sockets left and had already run their exit handlers).
    workerIdleMemoryLimit: '1GB',
    globalSetup: '<rootDir>/server/src/testing/bundle-worker-tasks.js',
    projects: pg ? [projects[0], pg, ...projects.slice(1)] : projects,
  };
};
