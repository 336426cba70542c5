/**
 * P1: parse + store one 384-well, 3-wavelength plate-grid export through the real ingest path
 * (archive read, parser, one storing transaction with the final-status check), median of 40, against a
 * floor measured in the same run, interleaved file by file:
 * - SQLite: csv-parse of the same text plus one raw better-sqlite3 transaction inserting the same rows
 *   with one prepared statement;
 * - PostgreSQL: csv-parse plus one raw `pg` transaction inserting the same rows in one multi-row INSERT.
 * Run: npm run bench:ingest [-- --db sqlite|postgres|both --repeats 40] (default both, 40). PostgreSQL:
 * EQUILIGHT_BENCH_POSTGRES_URL (default postgres://postgres@127.0.0.1:5432/test), in a schema of its own
 * that is dropped at the end.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { parse } from 'csv-parse/sync';
import type { DataSource } from 'typeorm';
import type { DatabaseConfig } from '../../server/src/config';
import { openDatabase } from '../../server/src/database/data-source';
import { EventBus } from '../../server/src/events/event-bus';
import { RawFileArchive } from '../../server/src/ingest/archive';
import { type IngestJobData, IngestService } from '../../server/src/ingest/ingest.service';
import { InstrumentsService } from '../../server/src/instruments/instruments.service';
import { SqliteJobQueue } from '../../server/src/queue/sqlite-queue';
import { closeWorkers } from '../../server/src/workers';
import { DEFAULT_PARSING_RULES } from '../../server/src/contracts/settings';

function repeatsOption(): number {
  const i = process.argv.indexOf('--repeats');
  const value = i >= 0 ? Number(process.argv[i + 1]) : 40;
  if (!Number.isInteger(value) || value < 1) throw new Error('--repeats must be a whole number above 0');
  return value;
}

const REPEATS = repeatsOption();
/** Untimed runs first, so both sides are measured with warm JIT code. */
const WARM_UP = 15;
const WAVELENGTHS = [405, 450, 620];
const ROWS = 'ABCDEFGHIJKLMNOP';
const POSTGRES_URL = process.env['EQUILIGHT_BENCH_POSTGRES_URL'] ?? 'postgres://postgres@127.0.0.1:5432/test';

function dbOption(): ('sqlite' | 'postgres')[] {
  const i = process.argv.indexOf('--db');
  const value = i >= 0 ? process.argv[i + 1] : 'both';
  if (value === 'both') return ['sqlite', 'postgres'];
  if (value === 'sqlite' || value === 'postgres') return [value];
  throw new Error('--db must be sqlite, postgres or both');
}

function plateGrid(seed: number): string {
  const lines = [`run_id,BENCH-${seed}`, 'temperature_c,25.0'];
  for (const wl of WAVELENGTHS) {
    lines.push(`wavelength_nm,${wl}`);
    lines.push(['', ...Array.from({ length: 24 }, (_, i) => i + 1)].join(','));
    for (const [r, row] of [...ROWS].entries()) {
      const cells = Array.from({ length: 24 }, (_, c) =>
        (0.05 + ((seed * 31 + r * 24 + c + wl) % 250) / 100).toFixed(4),
      );
      lines.push([row, ...cells].join(','));
    }
  }
  return `${lines.join('\n')}\n`;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

/** The floor's parse: csv-parse, then the grid's cells as (position, wavelength, absorbance) rows. */
function floorRows(text: string): [string, number, number][] {
  const records = parse(text, { relax_column_count: true }) as string[][];
  const rows: [string, number, number][] = [];
  let wavelength = 0;
  for (const record of records) {
    if (record[0] === 'wavelength_nm') wavelength = Number(record[1]);
    else if (/^[A-P]$/.test(record[0]))
      for (let c = 1; c < record.length; c++) rows.push([`${record[0]}${c}`, wavelength, Number(record[c])]);
  }
  return rows;
}

const FLOOR_TABLE =
  'CREATE TABLE floor_readings (id INTEGER PRIMARY KEY AUTOINCREMENT, intake_file_id INTEGER, position TEXT, wavelength_nm DOUBLE PRECISION, absorbance DOUBLE PRECISION)';

interface Floor {
  once(text: string, fileId: number): Promise<number>;
  close(): Promise<void>;
}

/** SQLite floor: one raw prepared-statement transaction (WAL, as the app's file). */
function sqliteFloor(file: string): Floor {
  const db = new Database(file);
  db.pragma('journal_mode = WAL');
  db.exec(FLOOR_TABLE);
  const insert = db.prepare(
    'INSERT INTO floor_readings (intake_file_id, position, wavelength_nm, absorbance) VALUES (?, ?, ?, ?)',
  );
  const store = db.transaction((fileId: number, rows: [string, number, number][]) => {
    for (const [position, wl, absorbance] of rows) insert.run(fileId, position, wl, absorbance);
  });
  return {
    async once(text, fileId) {
      const start = performance.now();
      store(fileId, floorRows(text));
      return performance.now() - start;
    },
    async close() {
      db.close();
    },
  };
}

/** The part of `pg`'s client used here (`pg` ships no types, and @types/pg is not a dependency). */
interface PgClient {
  connect(): Promise<void>;
  query(sql: string, values?: unknown[]): Promise<unknown>;
  end(): Promise<void>;
}
type PgClientClass = new (config: { connectionString: string; options: string }) => PgClient;

/** PostgreSQL floor: one raw `pg` transaction with one multi-row INSERT, in the bench's schema. */
async function postgresFloor(schema: string): Promise<Floor> {
  const pgModule: string = 'pg'; // a plain string: the untyped module is not looked up for types
  const { Client } = (await import(pgModule)) as { Client: PgClientClass };
  const client = new Client({ connectionString: POSTGRES_URL, options: `-c search_path=${schema}` });
  await client.connect();
  await client.query(FLOOR_TABLE.replace('id INTEGER PRIMARY KEY AUTOINCREMENT', 'id SERIAL PRIMARY KEY'));
  return {
    async once(text, fileId) {
      const start = performance.now();
      const rows = floorRows(text);
      const values: unknown[] = [];
      const tuples = rows.map(([position, wl, absorbance], i) => {
        values.push(fileId, position, wl, absorbance);
        return `($${4 * i + 1}, $${4 * i + 2}, $${4 * i + 3}, $${4 * i + 4})`;
      });
      await client.query('BEGIN');
      await client.query(
        `INSERT INTO floor_readings (intake_file_id, position, wavelength_nm, absorbance) VALUES ${tuples.join(', ')}`,
        values,
      );
      await client.query('COMMIT');
      return performance.now() - start;
    },
    async close() {
      await client.end();
    },
  };
}

async function benchProfile(dataSource: DataSource) {
  const instruments = new InstrumentsService(dataSource);
  const { profile } = await instruments.create({
    name: 'Bench reader',
    kind: 'plate_reader',
    plateFormat: '384',
    fileFormat: 'plate_grid',
    rules: { ...DEFAULT_PARSING_RULES, delimiter: ',' },
    pathLengthCm: null,
    fillVolumeUl: 80,
    wellDiameterMm: 3.3,
    defaultWavelengthNm: null,
    dropSubfolder: 'bench',
    fileNamePattern: null,
    active: true,
  });
  return instruments.get(profile.id);
}

/** The app and its floor, file by file; returns the medians. */
async function measure(kind: 'sqlite' | 'postgres', dir: string): Promise<{ app: number; floor: number }> {
  const schema = `bench_ingest_${process.pid}`;
  const database: DatabaseConfig =
    kind === 'sqlite'
      ? { type: 'sqlite', file: path.join(dir, 'bench.sqlite') }
      : { type: 'postgres', url: POSTGRES_URL, schema };
  const dataSource = await openDatabase({ database });
  const floor = kind === 'sqlite' ? sqliteFloor(path.join(dir, 'floor.sqlite')) : await postgresFloor(schema);
  try {
    const entity = await benchProfile(dataSource);
    // A queue with no worker: jobs are recorded, and this script runs the processor itself.
    const ingest = new IngestService(
      dataSource,
      new RawFileArchive(path.join(dir, `archive-${kind}`)),
      new SqliteJobQueue<IngestJobData>('bench', dataSource),
      new EventBus(),
    );
    const app: number[] = [];
    const floorMs: number[] = [];
    for (let i = 0; i < WARM_UP + REPEATS; i++) {
      const text = plateGrid(i);
      const receipt = await ingest.receive({
        content: Buffer.from(text),
        originalName: `bench-${i}.csv`,
        profile: entity,
        source: 'upload',
      });
      const start = performance.now();
      const status = await ingest.process({
        id: String(i),
        name: 'parse-and-store',
        data: { intakeFileId: receipt.id },
        attemptsMade: 0,
      });
      const elapsed = performance.now() - start;
      if (status !== 'stored' && status !== 'unassigned') throw new Error(`bench file ${i} was ${status}`);
      const floorElapsed = await floor.once(text, i);
      if (i >= WARM_UP) {
        app.push(elapsed);
        floorMs.push(floorElapsed);
      }
    }
    return { app: median(app), floor: median(floorMs) };
  } finally {
    await floor.close();
    if (kind === 'postgres') await dataSource.query(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
    await dataSource.destroy();
  }
}

async function main(): Promise<void> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-bench-'));
  const readings = 384 * WAVELENGTHS.length;
  console.log(
    `P1 parse + store: 384-well plate grid, ${WAVELENGTHS.length} wavelengths (${readings} readings), ` +
      `median of ${REPEATS}, app and floor interleaved file by file`,
  );
  try {
    for (const kind of dbOption()) {
      const { app, floor } = await measure(kind, dir);
      const floorName =
        kind === 'sqlite'
          ? 'csv-parse + raw better-sqlite3 prepared-statement transaction'
          : 'csv-parse + raw pg multi-row INSERT transaction';
      console.log(`  ${kind === 'sqlite' ? 'SQLite' : 'PostgreSQL'}`);
      console.log(`    Equilight ingest.process  ${app.toFixed(2)} ms`);
      console.log(`    floor (${floorName})  ${floor.toFixed(2)} ms`);
      console.log(`    ratio ${(app / floor).toFixed(2)}x${kind === 'sqlite' ? ' (aim <= 1.5x)' : ''}`);
    }
  } finally {
    await closeWorkers();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
