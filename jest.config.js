// One jest run, three projects: the server (with analysis, parsers, watcher), the Angular web app,
// and the browser tests that drive Debian's Chromium against a real server.
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

module.exports = {
  projects: [
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
  ],
};
