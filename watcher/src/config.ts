import fs from 'node:fs';
import path from 'node:path';
import * as z from 'zod';

/**
 * The watcher's configuration: a JSON file (path in EQUILIGHT_WATCHER_CONFIG) and/or environment
 * variables, which win over the file. Validated once at start. No other watcher file reads process.env.
 */

/** Same rule as an instrument profile's drop sub-folder on the server. */
const FOLDER_RE = /^[A-Za-z0-9][A-Za-z0-9_-]{0,79}$/;
/** Same shape the server accepts in `Authorization: Bearer …`. */
const TOKEN_RE = /^eqt_[A-Za-z0-9_-]{20,100}$/;
/** A watcher credential (Instruments page → Watchers): one for every folder the server names. */
const WATCHER_TOKEN_RE = /^eqw_[A-Za-z0-9_-]{20,100}$/;
/** Folder names the watcher itself writes into inside an instrument folder. */
export const RESERVED_FOLDERS = ['done', 'rejected', 'quarantined'] as const;

const instrumentSchema = z.strictObject({
  folder: z
    .string()
    .trim()
    .regex(FOLDER_RE, 'must be one folder name of letters, digits, - or _ (no slashes or dots)')
    .refine((f) => !(RESERVED_FOLDERS as readonly string[]).includes(f.toLowerCase()), {
      message: 'must not be "done", "rejected" or "quarantined" (the watcher writes those)',
    }),
  // The message never echoes the value: it is a secret.
  token: z.string().trim().regex(TOKEN_RE, 'must be an instrument token (eqt_…) from the Instruments page'),
});

const positiveMs = (max: number) => z.number().int().min(1).max(max);
/** "is required" when missing, otherwise what was expected. */
const expecting = (what: string) => ({
  error: (issue: { input?: unknown }) => (issue.input === undefined ? 'is required' : `must be ${what}`),
});

const configSchema = z
  .strictObject({
    serverUrl: z
      .string()
      .trim()
      .regex(/^https?:\/\/[^\s/]+/, 'must be an http:// or https:// address, e.g. http://127.0.0.1:4210')
      .default('http://127.0.0.1:4210'),
    dropDir: z.string(expecting('a folder path (the shared drop folder)')).trim().min(1, 'is required'),
    spoolDir: z
      .string(expecting('a folder path (a local folder for the spool)'))
      .trim()
      .min(1, 'is required'),
    settleMs: z.number().int().min(50).max(600_000).default(1500),
    maxConcurrentUploads: z.number().int().min(1).max(16).default(4),
    retryInitialMs: positiveMs(600_000).default(500),
    retryMaxMs: positiveMs(3_600_000).default(30_000),
    requestTimeoutMs: positiveMs(3_600_000).default(120_000),
    shutdownGraceMs: z.number().int().min(0).max(600_000).default(5000),
    /** Poll the file system instead of native events (network shares that send no events). */
    usePolling: z.boolean().default(false),
    instruments: z.array(instrumentSchema, expecting('a list of { "folder": …, "token": … }')).default([]),
    /**
     * A watcher credential: the watcher asks the server which folders to watch (every
     * `folderPollMs`) and sends their files with it. Folders in `instruments` keep their own token.
     */
    watcherToken: z
      .string()
      .trim()
      .regex(WATCHER_TOKEN_RE, 'must be a watcher credential (eqw_…) from the Instruments page')
      .optional(),
    folderPollMs: z.number().int().min(200).max(3_600_000).default(5000),
    /** How often the watcher reports itself to the server (version, folders watched). */
    heartbeatMs: z.number().int().min(200).max(3_600_000).default(60_000),
    /** How often to ask for the final state of a file the server is still parsing. */
    statusPollMs: z.number().int().min(50).max(600_000).default(2000),
  })
  .refine((c) => c.instruments.length > 0 || c.watcherToken !== undefined, {
    message: 'needs at least one { folder, token }, or a watcherToken',
    path: ['instruments'],
  })
  .refine((c) => c.retryMaxMs >= c.retryInitialMs, {
    message: 'must be at least retryInitialMs',
    path: ['retryMaxMs'],
  })
  .refine((c) => new Set(c.instruments.map((i) => i.folder.toLowerCase())).size === c.instruments.length, {
    message: 'lists the same folder twice',
    path: ['instruments'],
  });

export type WatcherConfig = z.infer<typeof configSchema>;
export type WatcherConfigInput = z.input<typeof configSchema>;
export type InstrumentConfig = WatcherConfig['instruments'][number];

export class WatcherConfigError extends Error {}

/** Check a configuration object (already merged); paths are made absolute against `baseDir`. */
export function parseWatcherConfig(
  input: unknown,
  baseDir = process.cwd(),
  source = 'configuration',
): WatcherConfig {
  const parsed = configSchema.safeParse(input);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => {
      const where = issue.path.length > 0 ? issue.path.join('.') : '(top level)';
      return `  ${where}: ${issue.message}`;
    });
    throw new WatcherConfigError(`Invalid watcher configuration (${source}):\n${lines.join('\n')}`);
  }
  const config = parsed.data;
  config.dropDir = path.resolve(baseDir, config.dropDir);
  config.spoolDir = path.resolve(baseDir, config.spoolDir);
  config.serverUrl = config.serverUrl.replace(/\/+$/, '');
  for (const instrument of config.instruments) {
    const folderDir = path.join(config.dropDir, instrument.folder);
    if (isInside(config.spoolDir, folderDir) || config.spoolDir === config.dropDir) {
      throw new WatcherConfigError(
        `Invalid watcher configuration (${source}):\n  spoolDir: must not be the drop folder or inside an instrument folder`,
      );
    }
  }
  return config;
}

function isInside(child: string, parent: string): boolean {
  const rel = path.relative(parent, child);
  return rel === '' || (!rel.startsWith('..') && !path.isAbsolute(rel));
}

/**
 * Parse `EQUILIGHT_INSTRUMENTS`: `folder=token` pairs separated by commas, semicolons or new lines.
 */
function parseInstrumentList(text: string): Array<{ folder: string; token: string }> {
  return text
    .split(/[,;\n]/)
    .map((pair) => pair.trim())
    .filter((pair) => pair.length > 0)
    .map((pair) => {
      const eq = pair.indexOf('=');
      if (eq < 0) {
        throw new WatcherConfigError(
          'Invalid watcher configuration (environment):\n  EQUILIGHT_INSTRUMENTS: expected folder=token pairs separated by commas',
        );
      }
      return { folder: pair.slice(0, eq).trim(), token: pair.slice(eq + 1).trim() };
    });
}

function envNumber(env: NodeJS.ProcessEnv, name: string): number | undefined {
  const text = env[name];
  if (text === undefined || text.trim() === '') return undefined;
  const value = Number(text);
  if (!Number.isFinite(value)) {
    throw new WatcherConfigError(`Invalid watcher configuration (environment):\n  ${name}: must be a number`);
  }
  return value;
}

/**
 * Read the configuration file named by EQUILIGHT_WATCHER_CONFIG (if any), apply the environment on
 * top, and validate. Relative paths in the file are relative to the file; in the environment, to `cwd`.
 */
export function loadWatcherConfig(env: NodeJS.ProcessEnv = process.env, cwd = process.cwd()): WatcherConfig {
  const merged: Record<string, unknown> = {};
  const file = env['EQUILIGHT_WATCHER_CONFIG']?.trim();
  let source = 'environment';
  if (file) {
    const filePath = path.resolve(cwd, file);
    let text: string;
    try {
      text = fs.readFileSync(filePath, 'utf8');
    } catch (err) {
      throw new WatcherConfigError(
        `Cannot read the watcher configuration file ${filePath}: ${(err as Error).message}`,
      );
    }
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch (err) {
      throw new WatcherConfigError(`${filePath} is not valid JSON: ${(err as Error).message}`);
    }
    if (typeof json !== 'object' || json === null || Array.isArray(json)) {
      throw new WatcherConfigError(`${filePath} must hold a JSON object`);
    }
    Object.assign(merged, json);
    for (const key of ['dropDir', 'spoolDir'] as const) {
      if (typeof merged[key] === 'string') merged[key] = path.resolve(path.dirname(filePath), merged[key]);
    }
    source = `${filePath} and environment`;
  }
  const strings: Array<[string, string]> = [
    ['EQUILIGHT_SERVER_URL', 'serverUrl'],
    ['EQUILIGHT_DROP_DIR', 'dropDir'],
    ['EQUILIGHT_SPOOL_DIR', 'spoolDir'],
  ];
  for (const [name, key] of strings) {
    const value = env[name]?.trim();
    if (value) merged[key] = key === 'serverUrl' ? value : path.resolve(cwd, value);
  }
  const numbers: Array<[string, string]> = [
    ['EQUILIGHT_SETTLE_MS', 'settleMs'],
    ['EQUILIGHT_MAX_UPLOADS', 'maxConcurrentUploads'],
  ];
  for (const [name, key] of numbers) {
    const value = envNumber(env, name);
    if (value !== undefined) merged[key] = value;
  }
  if (env['EQUILIGHT_USE_POLLING']?.trim()) {
    merged['usePolling'] = ['1', 'true', 'yes'].includes(env['EQUILIGHT_USE_POLLING'].trim().toLowerCase());
  }
  const watcherToken = env['EQUILIGHT_WATCHER_TOKEN']?.trim();
  if (watcherToken) merged['watcherToken'] = watcherToken;
  const instruments = env['EQUILIGHT_INSTRUMENTS']?.trim();
  if (instruments) merged['instruments'] = parseInstrumentList(instruments);
  return parseWatcherConfig(merged, cwd, source);
}
