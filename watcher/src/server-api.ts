import fs from 'node:fs';
import path from 'node:path';
import * as z from 'zod';
import {
  type WatchedFolders,
  fileStatusSchema,
  watchedFoldersSchema,
} from '../../server/src/contracts/watchers';

/** The watcher's calls besides uploads: which folders to watch, a file's final state, its own report. */

// The answers' shapes are the server's own contracts (server/src/contracts), one definition for both.
const foldersSchema = watchedFoldersSchema;
export type ServerFolders = WatchedFolders;
const statusSchema = fileStatusSchema;

/** Final states of a received file: the watcher moves the original once the file reaches one. */
export const FINAL_STATES = new Set(['stored', 'duplicate', 'quarantined', 'unassigned']);

export type CallResult<T> =
  | { kind: 'ok'; value: T }
  /** 404: the server does not know the route (an older server) or the file. */
  | { kind: 'unknown' }
  | { kind: 'unauthorized'; httpStatus: number }
  | { kind: 'failed'; reason: string };

async function call<T>(
  url: string,
  token: string,
  schema: z.ZodType<T>,
  init: { method?: string; body?: unknown; timeoutMs: number; signal?: AbortSignal },
): Promise<CallResult<T>> {
  let response: Response;
  let text: string;
  try {
    const timeout = AbortSignal.timeout(init.timeoutMs);
    response = await fetch(url, {
      method: init.method ?? 'GET',
      headers: {
        Authorization: `Bearer ${token}`,
        Accept: 'application/json',
        ...(init.body !== undefined ? { 'Content-Type': 'application/json' } : {}),
      },
      body: init.body !== undefined ? JSON.stringify(init.body) : undefined,
      redirect: 'manual',
      signal: init.signal ? AbortSignal.any([init.signal, timeout]) : timeout,
    });
    text = await response.text();
  } catch (err) {
    const cause = (err as { cause?: { code?: string } }).cause;
    return { kind: 'failed', reason: `server unreachable (${cause?.code ?? (err as Error).message})` };
  }
  if (response.status === 404) return { kind: 'unknown' };
  if (response.status === 401 || response.status === 403)
    return { kind: 'unauthorized', httpStatus: response.status };
  if (response.status !== 200) return { kind: 'failed', reason: `server answered ${response.status}` };
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    return { kind: 'failed', reason: 'the answer is not JSON' };
  }
  const parsed = schema.safeParse(json);
  return parsed.success
    ? { kind: 'ok', value: parsed.data }
    : { kind: 'failed', reason: 'unexpected answer' };
}

export function fetchFolders(
  serverUrl: string,
  token: string,
  timeoutMs: number,
): Promise<CallResult<ServerFolders>> {
  return call(`${serverUrl}/api/watcher/folders`, token, foldersSchema, { timeoutMs });
}

export function fetchFileStatus(
  serverUrl: string,
  token: string,
  intakeId: number,
  timeoutMs: number,
): Promise<CallResult<z.infer<typeof statusSchema>>> {
  return call(`${serverUrl}/api/watcher/files/${intakeId}`, token, statusSchema, { timeoutMs });
}

export function sendHeartbeat(
  serverUrl: string,
  token: string,
  report: { version: string; hostname: string; folders: string[] },
  timeoutMs: number,
): Promise<CallResult<unknown>> {
  return call(`${serverUrl}/api/watcher/heartbeat`, token, z.unknown(), {
    method: 'POST',
    body: report,
    timeoutMs,
  });
}

/** The watcher's version: the Equilight release it was built from (the repository's package.json). */
export function watcherVersion(): string {
  // From watcher/src (tests) or watcher/dist/watcher/src (built): the first package.json of the product upwards.
  for (let dir = __dirname; ; dir = path.dirname(dir)) {
    try {
      const pkg = JSON.parse(fs.readFileSync(path.join(dir, 'package.json'), 'utf8')) as {
        name?: unknown;
        version?: unknown;
      };
      if (pkg.name === 'equilight' && typeof pkg.version === 'string' && pkg.version)
        return pkg.version.slice(0, 40);
    } catch {
      // none here: go up
    }
    if (path.dirname(dir) === dir) return 'unknown';
  }
}
