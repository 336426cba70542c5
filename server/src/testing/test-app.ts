import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import type { Express } from 'express';
import type { AnalysisEngine } from '../analysis-engine/analysis-engine';
import { DataSource } from 'typeorm';
import { createApp, type EquilightApp } from '../app';
import { type AppConfig, loadConfig } from '../config';
import { openDatabase } from '../database/data-source';
import { seedDemoPeople } from '../seed/demo-people';

export const DEMO_PASSWORD = 'equilight-demo-test';
export const DEMO_EMAILS = {
  admin: 'admin@equilight.test',
  lab_manager: 'manager@equilight.test',
  scientist: 'scientist@equilight.test',
} as const;

export interface TestApp extends EquilightApp {
  config: AppConfig;
  dataSource: DataSource;
  dir: string;
  /** A supertest agent that keeps cookies and sends the XSRF header, optionally signed in. */
  agent(role?: keyof typeof DEMO_EMAILS): Promise<TestAgent>;
  /** Shut down and remove the data folder. */
  stop(): Promise<void>;
  /** Shut down and keep the data folder (to inspect it, damage it, or start on it again). */
  shutDown(): Promise<void>;
}

/**
 * Make an agent behave like the web app: whenever a response sets a new XSRF-TOKEN cookie (the first
 * visit, sign-in, sign-out), later requests echo that value in X-XSRF-TOKEN.
 */
export function followXsrfCookie(a: TestAgent): void {
  const agent = a as unknown as { _saveCookies(res: { headers: Record<string, unknown> }): void };
  const save = agent._saveCookies.bind(a);
  agent._saveCookies = (res) => {
    save(res);
    const xsrf = /XSRF-TOKEN=([^;]+)/.exec(String(res.headers['set-cookie'] ?? ''))?.[1];
    if (xsrf) a.set('X-XSRF-TOKEN', decodeURIComponent(xsrf));
  };
}

/** A supertest agent on `app` that keeps cookies and sends the XSRF header, optionally signed in. */
export async function signedInAgent(app: Express, role?: keyof typeof DEMO_EMAILS): Promise<TestAgent> {
  const a = request.agent(app);
  // Take up every XSRF cookie the server issues (a new one, bound to the session, comes with sign-in).
  followXsrfCookie(a);
  const first = await a.get('/api/health');
  if (!/XSRF-TOKEN=/.test(String(first.headers['set-cookie'] ?? '')))
    throw new Error('no XSRF cookie issued');
  if (role) {
    const res = await a.post('/api/auth/login').send({ email: DEMO_EMAILS[role], password: DEMO_PASSWORD });
    if (res.status !== 200)
      throw new Error(`sign-in as ${role} failed: ${res.status} ${JSON.stringify(res.body)}`);
  }
  return a;
}

/** Set by the PostgreSQL pass of the tests (jest project `server-pg`): run the apps on PostgreSQL. */
export const TEST_ON_POSTGRES = process.env['EQUILIGHT_TEST_DATABASE'] === 'postgres';
/** The PostgreSQL database that pass uses; each test app gets a fresh schema of its own in it. */
export const TEST_POSTGRES_URL =
  process.env['EQUILIGHT_TEST_POSTGRES_URL'] ?? 'postgres://postgres@127.0.0.1:5432/test';

/** The schema a test app's data folder maps to (the same folder, as on a restart, the same schema). */
function schemaFor(dir: string): string {
  return `t_${crypto.createHash('sha256').update(dir).digest('hex').slice(0, 20)}`;
}

/** On the PostgreSQL pass: the database settings of a test app, unless the test chose a database itself. */
function databaseEnv(dir: string, env: Record<string, string>): Record<string, string> {
  if (!TEST_ON_POSTGRES || env['DATABASE_URL']) return {};
  return { DATABASE_URL: TEST_POSTGRES_URL, DATABASE_SCHEMA: schemaFor(dir) };
}

/** Drops a test app's schema once the app has let go of its connections. */
async function dropSchema(schema: string): Promise<void> {
  const admin = new DataSource({ type: 'postgres', url: TEST_POSTGRES_URL });
  await admin.initialize();
  try {
    await admin.query(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
  } finally {
    await admin.destroy();
  }
}

/** Raw SQL in a test, written with `?` placeholders, run on either database (PostgreSQL numbers them). */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- as DataSource.query: rows of any shape
export function testQuery<T = any>(
  dataSource: DataSource,
  sql: string,
  params: readonly unknown[] = [],
): Promise<T> {
  let n = 0;
  const text = dataSource.driver.options.type === 'postgres' ? sql.replace(/\?/g, () => `$${++n}`) : sql;
  return dataSource.query(text, [...params]) as Promise<T>;
}

// Read through globalThis: benchmarks load this module outside jest, where describe and it do not exist.
/** Tests of the SQLite file itself (pages, PRAGMAs, triggers, file backups): skipped on the PostgreSQL pass. */
export const sqliteOnly = (
  TEST_ON_POSTGRES ? globalThis.describe?.skip : globalThis.describe
) as typeof describe;
/** One test of SQLite itself (a trigger written in its dialect): skipped on the PostgreSQL pass. */
export const itSqliteOnly = (TEST_ON_POSTGRES ? globalThis.it?.skip : globalThis.it) as typeof it;

/**
 * A real app on a real SQLite file in a temporary folder (on the PostgreSQL pass, a fresh schema), seeded with the demo people. The demo people
 * have one lab manager, so four-eyes approval is off unless a test turns it on (FOUR_EYES_APPROVAL).
 */
export async function startTestApp(
  env: Record<string, string> = {},
  /** An existing data folder to start on again (a restart), or options with one and/or an analysis engine. */
  options: string | { engine?: AnalysisEngine; existingDir?: string } = {},
): Promise<TestApp> {
  const opts = typeof options === 'string' ? { existingDir: options } : options;
  const dir = opts.existingDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-test-'));
  const config = loadConfig({
    NODE_ENV: 'test',
    DATA_DIR: dir,
    DEMO_PASSWORD,
    WEB_DIST_DIR: path.join(dir, 'no-web'),
    FOUR_EYES_APPROVAL: 'false',
    // bcrypt at cost 4: every sign-in of every test would otherwise spend ~100 ms of CPU hashing.
    PASSWORD_HASH_ROUNDS_FOR_TESTS: '4',
    ...databaseEnv(dir, env),
    ...env,
  });
  const dataSource = await openDatabase(config);
  const equilight = createApp({ config, dataSource, log: () => undefined, engine: opts.engine });
  await seedDemoPeople(equilight.services.users, DEMO_PASSWORD);
  await equilight.start();

  const agent = async (role?: keyof typeof DEMO_EMAILS): Promise<TestAgent> =>
    signedInAgent(equilight.app, role);

  const shutDown = async (): Promise<void> => {
    await equilight.close();
    if (dataSource.isInitialized) await dataSource.destroy();
  };

  return {
    ...equilight,
    config,
    dataSource,
    dir,
    agent,
    async stop() {
      await shutDown();
      if (config.database.type === 'postgres' && config.database.schema)
        await dropSchema(config.database.schema);
      fs.rmSync(dir, { recursive: true, force: true });
    },
    shutDown,
  };
}
