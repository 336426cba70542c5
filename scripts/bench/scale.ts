/**
 * Years of batches: 10,000 batches of 96-well plates read at ~11 wavelengths (~10 million readings),
 * written in bulk after one real batch the app ingested, analysed and approved; then, on a server just
 * started on that database (a new app and DataSource each time, so no in-memory cache helps), the first
 * GET of each page the web opens: the batches list, one batch's analysis, Intake, Temperatures (its systems)
 * and the first page of one system's points; and Temperatures again just after every system's stored
 * answers went stale (as a change to one of its batches makes them: worked out from all its batches; held
 * to 50 ms, its ratio reported). Median of 20 starts each, beside the same with 100 batches (the floor),
 * and the ratio; on SQLite and PostgreSQL.
 * Aim: every median ≤ 50 ms and ≤ 1.5× the floor. Not a timed test.
 * Run: npm run bench:scale [-- --db sqlite|postgres|both --batches 10000 --floor 100
 *      --readings-per-batch 1000 --runs 20 --warm 20 --keep]
 */
import fs from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { DataSource } from 'typeorm';
import { Batch } from '../../server/src/batches/batch.entity';
import { BatchResultRecord } from '../../server/src/batches/batch-result.entity';
import { BatchAnalysisRow } from '../../server/src/batches/batch-analysis.entity';
import { BatchSummaryRow } from '../../server/src/batches/batch-summary.entity';
import { IntakeFile } from '../../server/src/ingest/intake-file.entity';
import { LONG_TABLE_PROFILE, createProfile, settled } from '../../server/src/ingest/__tests__/ingest-helpers';
import { DEMO_SAMPLES_DIR } from '../../server/src/seed/demo-scenario';
import { startTestApp, type TestApp } from '../../server/src/testing/test-app';
import { median, option, since, timedGet } from './bench-kit';
import { type BatchPlan, type BatchTemplate, writeSyntheticBatches } from './synthetic-batches';

const DB = option('db', 'both');
const BATCHES = Number(option('batches', '10000'));
const FLOOR = Number(option('floor', '100'));
const READINGS_PER_BATCH = Number(option('readings-per-batch', '1000'));
const RUNS = Number(option('runs', '20'));
const WARM = Number(option('warm', '20'));
const POSTGRES_URL = option('postgres-url', 'postgres://postgres@127.0.0.1:5432/test');
/** Keep the databases (SQLite folder, PostgreSQL schema) to look into them; printed at the end. */
const KEEP = process.argv.includes('--keep');
const AIM_MS = 50;
const AIM_RATIO = 1.5;

const WELLS = [...'ABCDEFGH'].flatMap((row) => Array.from({ length: 12 }, (_, c) => `${row}${c + 1}`));
/** Wavelengths read per well: enough for the readings asked per batch, 10 nm apart around 640 nm. */
const WAVELENGTH_COUNT = Math.max(1, Math.ceil(READINGS_PER_BATCH / WELLS.length));
const WAVELENGTHS = Array.from(
  { length: WAVELENGTH_COUNT },
  (_, i) => 640 + (i - Math.floor(WAVELENGTH_COUNT / 2)) * 10,
);

/** Invented chemical systems of the Temperatures page: K at 25 °C and ΔH (van 't Hoff). */
const SYSTEMS = [
  { name: 'Metal–ligand complex A (bench)', k25: 1100, dHkJ: -18 },
  { name: 'Metal–ligand complex B (bench)', k25: 640, dHkJ: -25 },
  { name: 'Dye–receptor pair C (bench)', k25: 2100, dHkJ: -12 },
  { name: 'Host–guest pair D (bench)', k25: 380, dHkJ: -30 },
  { name: 'Metal–ligand complex E (bench)', k25: 1500, dHkJ: -8 },
  { name: 'Dye–receptor pair F (bench)', k25: 900, dHkJ: -21 },
];
const TEMPERATURES_C = [15, 20, 25, 30, 35, 40];
const PROFILES = 4;

/**
 * A 96-well plate of the demo complex series (blanks, standards, unknowns, a Job's series and a
 * ligand-excess series from samples/demo/complex, twice, and the blanks, standards and unknowns a third
 * time) and its readings: the demo absorbances at 640 nm on a band ±60 nm wide, at every wavelength.
 */
function plateFiles(): { manifestCsv: string; readingsCsv: string } {
  const manifest = parse(fs.readFileSync(path.join(DEMO_SAMPLES_DIR, 'complex/manifest.csv')), {
    columns: true,
  }) as Record<string, string>[];
  const reads = parse(fs.readFileSync(path.join(DEMO_SAMPLES_DIR, 'complex/CX-15.csv')), {
    columns: true,
  }) as Record<string, string>[];
  const absorbance = new Map(reads.map((r) => [r['position'], Number(r['absorbance'])]));
  const header = Object.keys(manifest[0]!);
  const manifestLines = [header.join(',')];
  const readingLines = ['position,wavelength_nm,absorbance,read_time,temperature_c'];
  WELLS.forEach((well, i) => {
    const src = manifest[i < 60 ? i % 30 : (i - 60) % 15]!;
    const copy = Math.floor(i / 30);
    const own = src['role'] !== 'blank' && src['role'] !== 'unknown' && copy > 0;
    manifestLines.push(
      header
        .map((h) => (h === 'position' ? well : h === 'sample_id' && own ? `${src[h]}-${copy}` : src[h]))
        .join(','),
    );
    const a = absorbance.get(src['position']!)! * (1 + (((i * 37) % 11) - 5) * 0.002);
    const readTime = new Date(Date.parse('2026-11-30T10:00:00Z') + i * 2_000).toISOString();
    for (const nm of WAVELENGTHS)
      readingLines.push(
        `${well},${nm},${(a * Math.exp(-(((nm - 640) / 60) ** 2))).toFixed(4)},${readTime},25.0`,
      );
  });
  return { manifestCsv: `${manifestLines.join('\n')}\n`, readingsCsv: `${readingLines.join('\n')}\n` };
}

/** One real plate batch through the API: profiles, layout, manifest, batch, file, analysis, approval. */
async function realBatch(
  t: TestApp,
): Promise<{ template: BatchTemplate; profileIds: number[]; managerId: number }> {
  const admin = await t.agent('admin');
  const manager = await t.agent('lab_manager');
  const scientist = await t.agent('scientist');
  const profiles = [];
  for (let p = 1; p <= PROFILES; p++)
    profiles.push(
      await createProfile(admin, {
        ...LONG_TABLE_PROFILE,
        name: `Plate reader ${p} (bench)`,
        dropSubfolder: `plate-reader-bench-${p}`,
      }),
    );
  const { manifestCsv, readingsCsv } = plateFiles();
  const rows = parse(manifestCsv, { columns: true }) as Record<string, string>[];
  const layout = await manager.post('/api/layouts').send({
    name: 'Complex series plate (bench)',
    format: '96',
    positions: rows.map((r) => ({
      position: r['position'],
      role: r['role'],
      ...(r['replicate_group'] ? { replicateGroup: r['replicate_group'] } : {}),
    })),
  });
  if (layout.status !== 201) throw new Error(`layout: ${layout.status} ${JSON.stringify(layout.body)}`);
  const manifest = await manager
    .post('/api/manifests')
    .field('layoutId', String(layout.body.id))
    .field('name', 'Complex series plate samples (bench)')
    .attach('file', Buffer.from(manifestCsv), 'manifest.csv');
  if (manifest.status !== 201)
    throw new Error(`manifest: ${manifest.status} ${JSON.stringify(manifest.body)}`);
  const batch = await manager.post('/api/batches').send({
    name: `${SYSTEMS[0]!.name} at 25 °C, run RUN-1`,
    profileId: profiles[0]!.profile.id,
    layoutId: layout.body.id,
    manifestId: manifest.body.id,
    runId: 'RUN-1',
    expectedFiles: 1,
    systemName: SYSTEMS[0]!.name,
    temperatureC: 25,
    settings: { wavelengthNm: 640, pathLengthCm: 1, candidates: ['1:1', '1:2', '2:1'] },
  });
  if (batch.status !== 201) throw new Error(`batch: ${batch.status} ${JSON.stringify(batch.body)}`);
  const upload = await request(t.app)
    .post('/api/ingest')
    .set('Authorization', `Bearer ${profiles[0]!.token}`)
    .attach('file', Buffer.from(readingsCsv), 'RUN-1_readings.csv');
  if (upload.status !== 201 && upload.status !== 202) throw new Error(`ingest: ${upload.status}`);
  const file = await settled(t, upload.body.id, 60_000);
  if (file.status !== 'stored') throw new Error(`file ${file.status}: ${file.error}`);
  const batchId = batch.body.id as number;
  // The file reads as stored as soon as its transaction commits; the summary's refresh starts just after.
  let summary = await t.dataSource.getRepository(BatchSummaryRow).findOneByOrFail({ batchId });
  for (const deadline = Date.now() + 60_000; summary.status === 'pending' && Date.now() < deadline;) {
    await t.services.batches.summariesIdle();
    await new Promise((resolve) => setTimeout(resolve, 50));
    summary = await t.dataSource.getRepository(BatchSummaryRow).findOneByOrFail({ batchId });
  }
  const analysis = await t.dataSource.getRepository(BatchAnalysisRow).findOneByOrFail({ batchId });
  if (summary.status !== 'current' || summary.k === null)
    throw new Error(`the plate's analysis gives no K: ${summary.status} ${summary.error}`);
  await scientist.post(`/api/batches/${batchId}/review`).expect(200);
  await manager
    .post(`/api/batches/${batchId}/approve`)
    .send({ comment: 'Calibration and K checked.' })
    .expect(200);
  const managerId = (await manager.get('/api/auth/me').expect(200)).body.id as number;
  return {
    template: {
      batch: await t.dataSource.getRepository(Batch).findOneByOrFail({ id: batchId }),
      summary,
      analysis,
      file: await t.dataSource.getRepository(IntakeFile).findOneByOrFail({ id: file.id }),
      record: await t.dataSource.getRepository(BatchResultRecord).findOneByOrFail({ batchId }),
    },
    profileIds: profiles.map((p) => p.profile.id),
    managerId,
  };
}

/**
 * The other batches, oldest first over three years: most approved, the last few reviewed or open; one in
 * five of a chemical system at one of six temperatures with its K from van 't Hoff (±2 %), the rest
 * routine plates with the template's headline.
 */
function plans(count: number, profileIds: readonly number[]): BatchPlan[] {
  const end = Date.parse('2026-12-01T08:00:00Z');
  const step = (3 * 365 * 24 * 3_600_000) / Math.max(count, 1);
  const open = Math.max(1, Math.round(count * 0.02));
  const reviewed = Math.max(1, Math.round(count * 0.03));
  return Array.from({ length: count }, (_, i) => {
    const system = i % 5 === 0 ? SYSTEMS[(i / 5) % SYSTEMS.length]! : null;
    const temperatureC = system ? TEMPERATURES_C[Math.floor(i / 30) % TEMPERATURES_C.length]! : null;
    const k =
      system && temperatureC !== null
        ? system.k25 *
          Math.exp(((-system.dHkJ * 1000) / 8.314462618) * (1 / (temperatureC + 273.15) - 1 / 298.15)) *
          (1 + (((i * 17) % 9) - 4) * 0.005)
        : undefined;
    const run = `RUN-${i + 2}`;
    return {
      name: `${system ? `${system.name} at ${temperatureC} °C` : 'Routine plate'}, run ${run}`,
      state: i >= count - open ? 'open' : i >= count - open - reviewed ? 'reviewed' : 'approved',
      profileId: profileIds[i % profileIds.length]!,
      runId: run,
      systemName: system?.name ?? null,
      temperatureC,
      createdAt: new Date(end - (count - i) * step).toISOString(),
      ...(k === undefined ? {} : { k }),
    };
  });
}

interface Dataset {
  dir: string;
  env: Record<string, string>;
  batches: number;
  readings: number;
  generateS: number;
  /** The batch whose analysis is measured: the newest open one (its analysis is the stored one). */
  analysisBatchId: number;
  sizeMb: number;
}

async function generate(db: 'sqlite' | 'postgres', batches: number): Promise<Dataset> {
  const env: Record<string, string> =
    db === 'postgres' ? { DATABASE_URL: POSTGRES_URL, DATABASE_SCHEMA: `bench_scale_${batches}` } : {};
  if (db === 'postgres') await dropSchema(env['DATABASE_SCHEMA']!);
  const t0 = performance.now();
  const t = await startTestApp(env);
  try {
    const { template, profileIds, managerId } = await realBatch(t);
    const planned = plans(batches - 1, profileIds);
    let shown = 0;
    const ids = await writeSyntheticBatches(t.dataSource, template, planned, {
      readings: true,
      managerId,
      extraFilesEvery: 25,
      progress: (done, total) => {
        if (done - shown >= total / 10 || done === total) {
          shown = done;
          process.stdout.write(
            `  ${db} ${batches}: readings of ${done}/${total} files, ${(since(t0) / 1000).toFixed(1)} s\n`,
          );
        }
      },
    });
    // PostgreSQL's autovacuum would have analysed tables this size long ago.
    if (db === 'postgres') await t.dataSource.query('ANALYZE');
    const [{ n }] = (await t.dataSource.query('SELECT COUNT(*) AS n FROM readings')) as { n: string }[];
    const openIds = ids.filter((_, i) => planned[i]!.state === 'open');
    const sizeMb =
      db === 'postgres'
        ? Number(
            (
              (await t.dataSource.query(
                'SELECT SUM(pg_total_relation_size(c.oid)) AS b FROM pg_class c JOIN pg_namespace s ON s.oid = c.relnamespace WHERE s.nspname = current_schema() AND c.relkind = $1',
                ['r'],
              )) as { b: string }[]
            )[0]!.b,
          ) / 1e6
        : 0;
    await t.shutDown();
    return {
      dir: t.dir,
      env,
      batches,
      readings: Number(n),
      generateS: since(t0) / 1000,
      analysisBatchId: openIds.at(-1) ?? template.batch.id,
      sizeMb: db === 'sqlite' ? sqliteSizeMb(t.dir) : sizeMb,
    };
  } catch (err) {
    await t.stop();
    throw err;
  }
}

function sqliteSizeMb(dir: string): number {
  let bytes = 0;
  for (const f of fs.readdirSync(dir, { recursive: true }) as string[]) {
    const full = path.join(dir, f);
    if (/\.(db|sqlite)(-wal)?$/.test(f) && fs.statSync(full).isFile()) bytes += fs.statSync(full).size;
  }
  return bytes / 1e6;
}

async function dropSchema(schema: string): Promise<void> {
  const admin = new DataSource({ type: 'postgres', url: POSTGRES_URL });
  await admin.initialize();
  try {
    await admin.query(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
  } finally {
    await admin.destroy();
  }
}

const PAGES = [
  'batches page',
  'batch analysis',
  'Intake page',
  'Temperatures',
  'Temperature points',
  'Temperatures, changed',
] as const;
type Page = (typeof PAGES)[number];

function urls(d: Dataset): Record<Page, string> {
  return {
    'batches page': '/api/batches',
    'batch analysis': `/api/batches/${d.analysisBatchId}/analysis`,
    'Intake page': '/api/intake',
    Temperatures: '/api/temperatures?includeUnapproved=false',
    // The first page of the system the real batch belongs to (the page opens it beside the fit).
    'Temperature points': `/api/temperatures/points?system=${encodeURIComponent(SYSTEMS[0]!.name)}&page=0`,
    // Every system's stored answers stale (as after a change to one of its batches): worked out on read.
    'Temperatures, changed': '/api/temperatures?includeUnapproved=false',
  };
}

/** Reported beside the aims, not held to the ratio: the answers worked out again from every batch. */
const CHANGED: Page = 'Temperatures, changed';

/** Every system moved on a generation, as a change to one of its batches moves it. */
async function staleAnswers(t: TestApp): Promise<void> {
  await t.dataSource.query('UPDATE temperature_systems SET generation = generation + 1');
}

interface Figures {
  cold: Record<Page, number[]>;
  warm: Record<Page, number[]>;
  bytes: Record<Page, number>;
}

/**
 * RUNS times (after one start not counted): a new server on the database (new app, new DataSource),
 * signed in, its start-up work done; then the first GET of each page, timed. After the last start, WARM
 * more GETs of each page.
 */
async function measure(d: Dataset): Promise<Figures> {
  const empty = () => Object.fromEntries(PAGES.map((p) => [p, [] as number[]])) as Record<Page, number[]>;
  const figures: Figures = { cold: empty(), warm: empty(), bytes: {} as Record<Page, number> };
  const url = urls(d);
  // Start -1 is not counted: it compiles this process's code paths (JIT) for both sizes alike.
  for (let run = -1; run < RUNS; run++) {
    const t = await startTestApp(d.env, d.dir);
    try {
      await t.services.batches.summariesIdle();
      const agent = await t.agent('lab_manager');
      /** One GET of a page; for the `changed` line, just after every system's answers went stale. */
      const get = async (page: Page) => {
        if (page === CHANGED) await staleAnswers(t);
        return timedGet(agent, url[page]);
      };
      for (const page of PAGES) {
        const { ms, bytes } = await get(page);
        if (run >= 0) figures.cold[page].push(ms);
        figures.bytes[page] = bytes;
      }
      if (run === RUNS - 1)
        for (let i = 0; i < WARM; i++)
          for (const page of PAGES) figures.warm[page].push((await get(page)).ms);
    } finally {
      await t.shutDown();
    }
  }
  return figures;
}

async function remove(d: Dataset): Promise<void> {
  if (KEEP) {
    console.log(`  kept: ${d.env['DATABASE_SCHEMA'] ? `schema ${d.env['DATABASE_SCHEMA']}` : d.dir}`);
    return;
  }
  if (d.env['DATABASE_SCHEMA']) await dropSchema(d.env['DATABASE_SCHEMA']);
  fs.rmSync(d.dir, { recursive: true, force: true });
}

const ms = (v: number) => v.toFixed(1).padStart(8);

function report(db: string, floor: Dataset, big: Dataset, f: Figures, g: Figures): void {
  const describe = (d: Dataset) =>
    `${d.batches.toLocaleString('en')} batches, ${d.readings.toLocaleString('en')} readings, ${d.sizeMb.toFixed(0)} MB, generated in ${d.generateS.toFixed(1)} s`;
  console.log(`\n${db}: ${describe(big)}; floor ${describe(floor)}`);
  console.log(
    `Cold = first GET on a server just started on the database, median of ${RUNS} starts (max in brackets); warm = median of ${WARM} more GETs.`,
  );
  const n = big.batches.toLocaleString('en');
  console.log(
    `${'page'.padEnd(24)}${`cold @${n}`.padStart(14)}${`cold @${floor.batches}`.padStart(16)}${'ratio'.padStart(8)}${`warm @${n}`.padStart(14)}${`warm @${floor.batches}`.padStart(12)}${'kB'.padStart(8)}  aim (≤${AIM_MS} ms, ≤${AIM_RATIO}×) met`,
  );
  for (const page of PAGES) {
    const cb = median(g.cold[page]);
    const cf = median(f.cold[page]);
    const ratio = cb / cf;
    const met = cb <= AIM_MS && (ratio <= AIM_RATIO || page === CHANGED);
    console.log(
      `${page.padEnd(24)}${ms(cb)} (${Math.max(...g.cold[page])
        .toFixed(0)
        .padStart(3)})${ms(cf)} (${Math.max(...f.cold[page])
        .toFixed(0)
        .padStart(
          3,
        )})${`${ratio.toFixed(2)}×`.padStart(8)}${ms(median(g.warm[page])).padStart(14)}${ms(median(f.warm[page])).padStart(12)}${(g.bytes[page] / 1000).toFixed(0).padStart(8)}  ${met ? 'yes' : `no${cb > AIM_MS ? ` (>${AIM_MS} ms)` : ''}${ratio > AIM_RATIO ? ` (>${AIM_RATIO}×)` : ''}`}${page === CHANGED ? ' (≤50 ms only; ratio reported)' : ''}`,
    );
  }
}

async function main(): Promise<void> {
  const dbs: ('sqlite' | 'postgres')[] =
    DB === 'both' ? ['sqlite', 'postgres'] : [DB as 'sqlite' | 'postgres'];
  console.log(
    `bench:scale — ${BATCHES} batches vs ${FLOOR}, ${WELLS.length} wells × ${WAVELENGTHS.length} wavelengths per batch, ${RUNS} starts; databases: ${dbs.join(', ')}`,
  );
  const out: (() => void)[] = [];
  for (const db of dbs) {
    const floor = await generate(db, FLOOR);
    let f: Figures;
    try {
      f = await measure(floor);
    } finally {
      await remove(floor);
    }
    const big = await generate(db, BATCHES);
    let g: Figures;
    try {
      g = await measure(big);
    } finally {
      await remove(big);
    }
    out.push(() => report(db === 'sqlite' ? 'SQLite' : 'PostgreSQL', floor, big, f, g));
  }
  for (const print of out) print();
}

main().then(
  () => process.exit(0),
  (err: unknown) => {
    console.error(err);
    process.exit(1);
  },
);
