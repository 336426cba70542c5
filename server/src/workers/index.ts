import fs from 'node:fs';
import path from 'node:path';
import { Piscina } from 'piscina';
import type { BatchResult } from '../analysis/batch-types';
import type { AnalysisSettings } from '../analysis/options';
import type { SpectralAnalysisResult } from '../analysis/spectral-analysis';
import type { SpectralSettings } from '../analysis/spectral-options';
import type { Reading, SampleDefinition } from '../analysis/types';
import { AppError } from '../common/app-error';
import { ParseError } from '../parsers/parse-error';
import type { ParseRulesInput } from '../parsers/parse-rules';
import {
  IN_THREAD_PARSE_MAX_BYTES,
  MAX_MONTE_CARLO_DRAWS,
  MAX_QUEUED_TASKS,
  WORKER_STORE_MIN_READINGS,
} from './limits';
import { closeConnections, handleTask, type ParseOutcome, type StoreTarget, type WorkerTask } from './tasks';

export type { ReadingColumns } from './reading-columns';
export { fromColumns, READING_COLUMNS, rowValues } from './reading-columns';
export type { StoreTarget } from './tasks';

export {
  IN_THREAD_PARSE_MAX_BYTES,
  MAX_MONTE_CARLO_DRAWS,
  MAX_QUEUED_TASKS,
  WORKER_STORE_MIN_READINGS,
} from './limits';

/**
 * Parsing and analysis off the main thread, so that one big file or one heavy analysis never holds up
 * other requests (or the health check). Two small piscina pools: one thread for incoming files (so a
 * queue of analyses never delays a file), the other threads for analyses, at a lower CPU priority.
 * Limits: limits.ts.
 */

export interface WorkerOptions {
  /** Worker threads in all (at least 2): one for files, the rest for analyses. Default 2 (a 2-core server). */
  threads: number;
  /** Run tasks on the calling thread instead. Only for tests that ask for it (WORKERS_IN_THREAD_FOR_TESTS). */
  inThreadForTests: boolean;
}

let options: WorkerOptions = { threads: 2, inThreadForTests: false };
/** Nice value of analysis threads (see tasks.ts): the main thread comes first. */
const ANALYSIS_NICE = 10;

type PoolName = 'files' | 'analyses';
const pools = new Map<PoolName, Piscina>();

/** Set at start (createApp); a pool already running keeps its size until closed. */
export function configureWorkers(next: WorkerOptions): void {
  options = { ...next };
}

/** Stop the worker threads (server shutdown). The next task starts a new pool. */
export async function closeWorkers(): Promise<void> {
  const closing = [...pools.values()];
  pools.clear();
  await Promise.all(closing.map((p) => p.destroy()));
  closeConnections(); // in-thread tasks' database connections
}

/**
 * The worker file next to this module: compiled JavaScript under `node server/dist/main.js`; the
 * TypeScript source under jest (ts-jest) and tsx, where the worker loads it through tsx's require hook.
 */
function workerFile(): { filename: string; execArgv: string[] } {
  const compiled = path.join(__dirname, 'tasks.js');
  if (fs.existsSync(compiled)) return { filename: compiled, execArgv: [] };
  // Under jest: the same source bundled once per run (server/src/testing/bundle-worker-tasks.js).
  const bundled = process.env['EQUILIGHT_TEST_WORKER_TASKS'];
  if (bundled && fs.existsSync(bundled)) return { filename: bundled, execArgv: [] };
  const source = path.join(__dirname, 'tasks.ts');
  if (!fs.existsSync(source)) throw new Error(`no worker file next to ${__filename}`);
  const hasTsx = process.execArgv.some((a) => a.includes('tsx'));
  return {
    filename: source,
    execArgv: hasTsx ? process.execArgv : [...process.execArgv, '--require', require.resolve('tsx/cjs')],
  };
}

function pool(name: PoolName): Piscina {
  let found = pools.get(name);
  if (!found) {
    const { filename, execArgv } = workerFile();
    found = new Piscina({
      filename,
      name: 'handleTask',
      execArgv,
      minThreads: 0,
      maxThreads: name === 'files' ? 1 : Math.max(1, options.threads - 1),
      idleTimeout: 60_000,
      maxQueue: MAX_QUEUED_TASKS,
      workerData: { nice: name === 'analyses' ? ANALYSIS_NICE : 0 },
    });
    // An answer that arrives after its pool was destroyed (a shutdown while a task ran) has no task to go
    // to; piscina reports it as an 'error' event, which must not take the process down.
    found.on('error', (err: Error) => {
      if (!/Unexpected message from Worker/.test(err.message)) console.error('worker pool:', err);
    });
    pools.set(name, found);
  }
  return found;
}

async function run<T>(task: WorkerTask): Promise<T> {
  if (options.inThreadForTests || isSmallParse(task)) return (await handleTask(task)) as T;
  try {
    return (await pool(task.kind === 'parse' ? 'files' : 'analyses').run(task)) as T;
  } catch (err) {
    if (/queue is at limit/i.test((err as Error).message)) {
      throw new AppError('busy', 503, 'The server is busy with other analyses; try again in a moment.');
    }
    throw err;
  }
}

/** A file small enough to parse on the calling thread (IN_THREAD_PARSE_MAX_BYTES). */
function isSmallParse(task: WorkerTask): boolean {
  return task.kind === 'parse' && task.content.byteLength < IN_THREAD_PARSE_MAX_BYTES;
}

/** `analyzeBatch` on a worker thread, with Monte Carlo draws capped at MAX_MONTE_CARLO_DRAWS. */
export function runAnalysis(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  settings: AnalysisSettings,
): Promise<BatchResult> {
  const monteCarlo = settings.monteCarlo
    ? { ...settings.monteCarlo, draws: Math.min(settings.monteCarlo.draws ?? 0, MAX_MONTE_CARLO_DRAWS) }
    : undefined;
  return run<BatchResult>({
    kind: 'analyse',
    readings,
    samples,
    settings: monteCarlo ? { ...settings, monteCarlo } : settings,
  });
}

/** `analyzeSpectra` (the whole-spectrum analysis) on an analysis thread. */
export function runSpectra(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  settings: SpectralSettings,
): Promise<SpectralAnalysisResult> {
  return run<SpectralAnalysisResult>({ kind: 'spectra', readings, samples, settings });
}

export type ParsedFile = Extract<ParseOutcome, { ok: true }>;

/**
 * `parseInstrumentFile` on a worker thread (files under IN_THREAD_PARSE_MAX_BYTES: on this thread);
 * readings come back as columns. With `store`, a file of
 * WORKER_STORE_MIN_READINGS or more readings is written to the database by the worker
 * (`storedByWorker`, `readings` null). A bad file throws the same ParseError as in-thread parsing.
 */
export async function parseFile(
  content: Buffer,
  fileName: string,
  rules?: ParseRulesInput,
  store?: Omit<StoreTarget, 'minReadings'>,
): Promise<ParsedFile> {
  const outcome = await run<ParseOutcome>({
    kind: 'parse',
    content: new Uint8Array(content.buffer, content.byteOffset, content.byteLength),
    fileName,
    rules,
    store: store ? { ...store, minReadings: WORKER_STORE_MIN_READINGS } : undefined,
  });
  if (!outcome.ok) throw new ParseError(outcome.parseError);
  return outcome;
}
