import fs from 'node:fs';
import path from 'node:path';
import { Piscina } from 'piscina';
import type { BatchResult } from '../analysis/batch-types';
import type { AnalysisSettings } from '../analysis/options';
import type { Reading, SampleDefinition } from '../analysis/types';
import { AppError } from '../common/app-error';
import { ParseError } from '../parsers/parse-error';
import type { ParseRulesInput } from '../parsers/parse-rules';
import { MAX_MONTE_CARLO_DRAWS, MAX_QUEUED_TASKS, WORKER_STORE_MIN_READINGS } from './limits';
import { handleTask, type ParseOutcome, type StoreTarget, type WorkerTask } from './tasks';

export type { ReadingColumns } from './reading-columns';
export { fromColumns, READING_COLUMNS, rowValues } from './reading-columns';
export type { StoreTarget } from './tasks';

export { MAX_MONTE_CARLO_DRAWS, MAX_QUEUED_TASKS, WORKER_STORE_MIN_READINGS } from './limits';

/**
 * Parsing and analysis off the main thread: a small pool of worker threads (piscina), so that one big
 * file or one heavy analysis never holds up other requests (or the health check). Limits: limits.ts.
 */

export interface WorkerOptions {
  /** Worker threads at most; the lab server is small (2 cores): the default is 2. */
  threads: number;
  /** Run tasks on the calling thread instead. Only for tests that ask for it (WORKERS_IN_THREAD_FOR_TESTS). */
  inThreadForTests: boolean;
}

let options: WorkerOptions = { threads: 2, inThreadForTests: false };
let pool: Piscina | undefined;

/** Set at start (createApp); a pool already running keeps its size until closed. */
export function configureWorkers(next: WorkerOptions): void {
  options = { ...next };
}

/** Stop the worker threads (server shutdown). The next task starts a new pool. */
export async function closeWorkers(): Promise<void> {
  const closing = pool;
  pool = undefined;
  await closing?.destroy();
}

/**
 * The worker file next to this module: compiled JavaScript under `node server/dist/main.js`; the
 * TypeScript source under jest (ts-jest) and tsx, where the worker loads it through tsx's require hook.
 */
function workerFile(): { filename: string; execArgv: string[] } {
  const compiled = path.join(__dirname, 'tasks.js');
  if (fs.existsSync(compiled)) return { filename: compiled, execArgv: [] };
  const source = path.join(__dirname, 'tasks.ts');
  if (!fs.existsSync(source)) throw new Error(`no worker file next to ${__filename}`);
  const hasTsx = process.execArgv.some((a) => a.includes('tsx'));
  return {
    filename: source,
    execArgv: hasTsx ? process.execArgv : [...process.execArgv, '--require', require.resolve('tsx/cjs')],
  };
}

function thePool(): Piscina {
  if (!pool) {
    const { filename, execArgv } = workerFile();
    pool = new Piscina({
      filename,
      name: 'handleTask',
      execArgv,
      minThreads: 0,
      maxThreads: options.threads,
      idleTimeout: 60_000,
      maxQueue: MAX_QUEUED_TASKS,
    });
  }
  return pool;
}

async function run<T>(task: WorkerTask): Promise<T> {
  if (options.inThreadForTests) return (await handleTask(task)) as T;
  try {
    return (await thePool().run(task)) as T;
  } catch (err) {
    if (/queue is at limit/i.test((err as Error).message)) {
      throw new AppError('busy', 503, 'The server is busy with other analyses; try again in a moment.');
    }
    throw err;
  }
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

export type ParsedFile = Extract<ParseOutcome, { ok: true }>;

/**
 * `parseInstrumentFile` on a worker thread; readings come back as columns. With `store`, a file of
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
