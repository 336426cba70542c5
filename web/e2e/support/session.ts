import fs from 'node:fs';
import path from 'node:path';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_PASSWORD, REPO_ROOT } from './server-process';

/** Sign in through the sign-in page and wait for the app's navigation. */
export async function signIn(page: Page, url: string, email: string): Promise<void> {
  await page.goto(`${url}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('main-nav').waitFor();
}

export type ApiCall = (method: string, urlPath: string, data?: unknown) => Promise<Record<string, unknown>>;

export interface ApiClient {
  call: ApiCall;
  ctx: BrowserContext;
  /** The session's current XSRF token, for requests made outside `call` (uploads). */
  xsrf(): Promise<string>;
}

/** A signed-in API client in its own browser context, sending the XSRF cookie back as the header. */
export async function apiAs(browser: Browser, url: string, email: string): Promise<ApiClient> {
  const ctx = await browser.newContext();
  await ctx.request.get(`${url}/api/auth/me`);
  const xsrf = async () => (await ctx.cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
  const call: ApiCall = async (method, urlPath, data) => {
    const res = await ctx.request.fetch(`${url}${urlPath}`, {
      method,
      data,
      headers: { 'X-XSRF-TOKEN': await xsrf() },
    });
    if (!res.ok()) throw new Error(`${method} ${urlPath} → ${res.status()} ${await res.text()}`);
    return (await res.json()) as Record<string, unknown>;
  };
  await call('POST', '/api/auth/login', { email, password: DEMO_PASSWORD });
  return { call, ctx, xsrf };
}

/** The demo analysis samples' folder (readings.csv, manifest.csv). */
export const ANALYSIS_SAMPLES = path.join(REPO_ROOT, 'samples/analysis');

/** The demo manifest (samples/analysis/manifest.csv) as rows keyed by column. */
export function sampleManifestRows(): Record<string, string>[] {
  const [header, ...lines] = fs
    .readFileSync(path.join(ANALYSIS_SAMPLES, 'manifest.csv'), 'utf8')
    .trim()
    .split(/\r?\n/);
  const columns = header!.split(',');
  return lines.map((line) => Object.fromEntries(line.split(',').map((cell, i) => [columns[i], cell])));
}
