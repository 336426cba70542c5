import fs from 'node:fs';
import os from 'node:os';
import { isMainThread, workerData } from 'node:worker_threads';
import Database from 'better-sqlite3';
import { analyzeBatch } from '../analysis/batch';
import type { BatchResult } from '../analysis/batch-types';
import type { AnalysisSettings } from '../analysis/options';
import { analyzeSpectra, type SpectralAnalysisResult } from '../analysis/spectral-analysis';
import type { SpectralSettings } from '../analysis/spectral-options';
import type { Reading, SampleDefinition } from '../analysis/types';
import { ParseError, type ParseErrorDetails } from '../parsers/parse-error';
import { parseInstrumentFile } from '../parsers/parse-instrument-file';
import type { ParseRulesInput } from '../parsers/parse-rules';
import type { ParsedRun } from '../parsers/reading-set';
import { READING_COLUMNS, type ReadingColumns, rowValues, toColumns } from './reading-columns';

/**
 * The work done off the main thread. Only pure modules (analysis, parsers) and better-sqlite3 are
 * imported here: no Express, no TypeORM. The same functions run in-thread when configured for tests.
 */

/**
 * Analysis threads run at a lower CPU priority (`workerData.nice`), so that busy analyses leave the main
 * thread the CPU it needs to answer at once (Linux: a thread's own id takes a per-thread nice value;
 * elsewhere, or without permission, nothing changes). Never the file thread: it holds SQLite's write
 * lock while storing, and a starved lock holder would make the main thread wait.
 */
function lowerThreadPriority(nice: unknown): void {
  if (isMainThread || typeof nice !== 'number' || nice <= 0 || process.platform !== 'linux') return;
  try {
    const threadId = Number(fs.readlinkSync('/proc/thread-self').split('/').pop());
    if (Number.isInteger(threadId) && threadId > 0) os.setPriority(threadId, nice);
  } catch {
    // not allowed or not available: run at the normal priority
  }
}
lowerThreadPriority((workerData as { nice?: unknown } | undefined)?.nice);

/** Where a large file's readings go straight from the worker: the server's own SQLite file. */
export interface StoreTarget {
  sqliteFile: string;
  intakeFileId: number;
  /** Files with at least this many readings are stored by the worker (see `storeReadings`). */
  minReadings: number;
}

export interface AnalyseTask {
  kind: 'analyse';
  readings: readonly Reading[];
  samples: readonly SampleDefinition[];
  settings: AnalysisSettings;
}

export interface ParseTask {
  kind: 'parse';
  content: Uint8Array;
  fileName: string;
  rules?: ParseRulesInput;
  store?: StoreTarget;
}

/** The whole-spectrum analysis of a batch with spectra (see `analyzeSpectra`). */
export interface SpectraTask {
  kind: 'spectra';
  readings: readonly Reading[];
  samples: readonly SampleDefinition[];
  settings: SpectralSettings;
}

export type WorkerTask = AnalyseTask | ParseTask | SpectraTask;

export type ParseOutcome =
  | {
      ok: true;
      format: ParsedRun['format'];
      metadata: ParsedRun['metadata'];
      warnings: string[];
      readingCount: number;
      /** The readings, or null when the worker stored them already (`storedByWorker`). */
      readings: ReadingColumns | null;
      storedByWorker: boolean;
    }
  | { ok: false; parseError: ParseErrorDetails };

/** Rows per storing transaction in the worker: each holds SQLite's write lock for a few ms only. */
export const STORE_CHUNK_ROWS = 1000;
/**
 * Pause between two chunks. SQLite's lock is not fair: a writer that takes it again at once starves the
 * main thread, whose own writes (a session touched on every request) then wait in its busy handler,
 * blocking every request. The pause leaves the lock free most of the time.
 */
export const STORE_PAUSE_MS = 10;

const connections = new Map<string, Database.Database>();

function connection(file: string): Database.Database {
  let db = connections.get(file);
  if (!db) {
    db = new Database(file);
    db.pragma('busy_timeout = 10000');
    db.pragma('foreign_keys = ON');
    connections.set(file, db);
  }
  return db;
}

/**
 * A large file's readings, written by the worker in chunks of STORE_CHUNK_ROWS with a pause between,
 * after deleting any the file had (a re-run after a crash). The rows stay invisible (analysis reads only
 * files whose status is final) until the main thread sets the status in its own transaction; a job that
 * fails for good deletes them again. The main thread's own writes wait a few ms at most, never seconds.
 */
export async function storeReadings(target: StoreTarget, readings: ReadingColumns): Promise<void> {
  const db = connection(target.sqliteFile);
  db.prepare('DELETE FROM readings WHERE intake_file_id = ?').run(target.intakeFileId);
  const insert = db.prepare(
    `INSERT INTO readings (intake_file_id, ${READING_COLUMNS.join(', ')}) VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const chunk = db.transaction((from: number, to: number) => {
    for (let i = from; i < to; i++) insert.run(target.intakeFileId, ...rowValues(readings, i));
  });
  for (let from = 0; from < readings.count; from += STORE_CHUNK_ROWS) {
    if (from > 0) await new Promise((resolve) => setTimeout(resolve, STORE_PAUSE_MS));
    chunk(from, Math.min(readings.count, from + STORE_CHUNK_ROWS));
  }
}

async function parse(task: ParseTask): Promise<ParseOutcome> {
  let run: ParsedRun;
  try {
    run = await parseInstrumentFile(Buffer.from(task.content), task.fileName, task.rules);
  } catch (err) {
    // A ParseError is an answer (the file is bad), not a fault: it crosses the thread as data.
    if (err instanceof ParseError) return { ok: false, parseError: err.details };
    throw err;
  }
  const columns = toColumns(run.readings);
  const store = task.store !== undefined && columns.count >= task.store.minReadings ? task.store : undefined;
  if (store) await storeReadings(store, columns);
  return {
    ok: true,
    format: run.format,
    metadata: run.metadata,
    warnings: run.warnings,
    readingCount: columns.count,
    readings: store ? null : columns,
    storedByWorker: store !== undefined,
  };
}

/** The worker's entry (piscina calls it by name); also called directly in-thread for tests. */
export async function handleTask(
  task: WorkerTask,
): Promise<BatchResult | ParseOutcome | SpectralAnalysisResult> {
  switch (task.kind) {
    case 'analyse':
      return analyzeBatch(task.readings, task.samples, task.settings);
    case 'spectra':
      return analyzeSpectra(task.readings, task.samples, task.settings);
    case 'parse':
      return parse(task);
  }
}

/** Close the worker's database connections (at pool shutdown). */
export function closeConnections(): void {
  for (const db of connections.values()) db.close();
  connections.clear();
}
