import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import type { Express } from 'express';
import type { AnalysisEngine } from '../analysis-engine/analysis-engine';
import type { DataSource } from 'typeorm';
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
  stop(): Promise<void>;
}

/** A supertest agent on `app` that keeps cookies and sends the XSRF header, optionally signed in. */
export async function signedInAgent(app: Express, role?: keyof typeof DEMO_EMAILS): Promise<TestAgent> {
  const a = request.agent(app);
  const first = await a.get('/api/health');
  const xsrf = /XSRF-TOKEN=([^;]+)/.exec(String(first.headers['set-cookie'] ?? ''))?.[1];
  if (!xsrf) throw new Error('no XSRF cookie issued');
  a.set('X-XSRF-TOKEN', decodeURIComponent(xsrf));
  if (role) {
    const res = await a.post('/api/auth/login').send({ email: DEMO_EMAILS[role], password: DEMO_PASSWORD });
    if (res.status !== 200)
      throw new Error(`sign-in as ${role} failed: ${res.status} ${JSON.stringify(res.body)}`);
  }
  return a;
}

/**
 * A real app on a real SQLite file in a temporary folder, seeded with the demo people. The demo people
 * have one lab manager, so four-eyes approval is off unless a test turns it on (FOUR_EYES_APPROVAL).
 */
export async function startTestApp(
  env: Record<string, string> = {},
  options: { engine?: AnalysisEngine } = {},
): Promise<TestApp> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-test-'));
  const config = loadConfig({
    NODE_ENV: 'test',
    DATA_DIR: dir,
    DEMO_PASSWORD,
    WEB_DIST_DIR: path.join(dir, 'no-web'),
    FOUR_EYES_APPROVAL: 'false',
    ...env,
  });
  const dataSource = await openDatabase(config);
  const equilight = createApp({ config, dataSource, log: () => undefined, engine: options.engine });
  await seedDemoPeople(equilight.services.users, DEMO_PASSWORD);
  await equilight.start();

  const agent = async (role?: keyof typeof DEMO_EMAILS): Promise<TestAgent> =>
    signedInAgent(equilight.app, role);

  return {
    ...equilight,
    config,
    dataSource,
    dir,
    agent,
    async stop() {
      await equilight.close();
      await dataSource.destroy();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
