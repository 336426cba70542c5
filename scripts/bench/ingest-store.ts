/**
 * P1: parse + store one 384-well, 3-wavelength plate-grid export through the real ingest path
 * (archive read, parser, one bulk transaction), median of 20, against a floor measured in the same run:
 * csv-parse of the same text plus one raw better-sqlite3 transaction inserting the same rows.
 * Run: npm run bench:ingest
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { parse } from 'csv-parse/sync';
import { openDatabase } from '../../server/src/database/data-source';
import { EventBus } from '../../server/src/events/event-bus';
import { RawFileArchive } from '../../server/src/ingest/archive';
import { type IngestJobData, IngestService } from '../../server/src/ingest/ingest.service';
import { InstrumentsService } from '../../server/src/instruments/instruments.service';
import { SqliteJobQueue } from '../../server/src/queue/sqlite-queue';
import { closeWorkers } from '../../server/src/workers';
import { DEFAULT_PARSING_RULES } from '../../server/src/contracts/settings';

const REPEATS = 20;
/** Untimed runs first, so both sides are measured with warm JIT code. */
const WARM_UP = 15;
const WAVELENGTHS = [405, 450, 620];
const ROWS = 'ABCDEFGHIJKLMNOP';

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

/** The floor: csv-parse of the text, then one raw prepared-statement transaction. */
function floorOnce(db: Database.Database, text: string, fileId: number): number {
  const start = performance.now();
  const records = parse(text, { relax_column_count: true }) as string[][];
  const rows: [string, number, number][] = [];
  let wavelength = 0;
  for (const record of records) {
    if (record[0] === 'wavelength_nm') wavelength = Number(record[1]);
    else if (/^[A-P]$/.test(record[0]))
      for (let c = 1; c < record.length; c++) rows.push([`${record[0]}${c}`, wavelength, Number(record[c])]);
  }
  const insert = db.prepare(
    'INSERT INTO readings (intake_file_id, position, wavelength_nm, absorbance) VALUES (?, ?, ?, ?)',
  );
  db.transaction(() => {
    for (const [position, wl, absorbance] of rows) insert.run(fileId, position, wl, absorbance);
  })();
  return performance.now() - start;
}

async function main(): Promise<void> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-bench-'));
  const dataSource = await openDatabase({
    database: { type: 'sqlite', file: path.join(dir, 'bench.sqlite') },
  });
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
  const entity = await instruments.get(profile.id);
  // A queue with no worker: jobs are recorded, and this script runs the processor itself.
  const ingest = new IngestService(
    dataSource,
    new RawFileArchive(path.join(dir, 'archive')),
    new SqliteJobQueue<IngestJobData>('bench', dataSource),
    new EventBus(),
  );

  const floorDb = new Database(path.join(dir, 'floor.sqlite'));
  floorDb.pragma('journal_mode = WAL');
  floorDb.exec(
    'CREATE TABLE readings (id INTEGER PRIMARY KEY AUTOINCREMENT, intake_file_id INTEGER, position TEXT, wavelength_nm REAL, absorbance REAL)',
  );

  const equilight: number[] = [];
  const floor: number[] = [];
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
    const floorElapsed = floorOnce(floorDb, text, i);
    if (i >= WARM_UP) {
      equilight.push(elapsed);
      floor.push(floorElapsed);
    }
  }
  const readings = 384 * WAVELENGTHS.length;
  const e = median(equilight);
  const f = median(floor);
  console.log(
    `P1 parse + store: 384-well plate grid, ${WAVELENGTHS.length} wavelengths (${readings} readings), median of ${REPEATS}`,
  );
  console.log(`  Equilight ingest.process  ${e.toFixed(2)} ms`);
  console.log(`  floor (csv-parse + raw better-sqlite3 transaction)  ${f.toFixed(2)} ms`);
  console.log(`  ratio ${(e / f).toFixed(2)}x (aim <= 1.5x)`);
  floorDb.close();
  await closeWorkers();
  await dataSource.destroy();
  fs.rmSync(dir, { recursive: true, force: true });
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
