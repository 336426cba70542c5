/**
 * The batches list with a year of batches: the cold first page (a server just started on the database
 * file, its first GET /api/batches) with 2,000 batches against the same with 100, median of 20 starts
 * each, and the ratio. Every batch has a stored summary, a file and a manifest, as after a year of use;
 * the batches are written in bulk (one real analysed batch lends its set-up and its stored summary).
 * Not a timed test. Run: npm run bench:batches [-- --runs 20 --sizes 100,2000]
 */
import fs from 'node:fs';
import { bulkInsert } from '../../server/src/database/bulk-insert';
import { BatchSummaryRow } from '../../server/src/batches/batch-summary.entity';
import { Batch } from '../../server/src/batches/batch.entity';
import { createAnalysedBatch } from '../../server/src/reports/__tests__/analysed-batch';
import { startTestApp, type TestApp } from '../../server/src/testing/test-app';

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 && process.argv[i + 1] ? process.argv[i + 1]! : fallback;
}

const RUNS = Number(option('runs', '20'));
const SIZES = option('sizes', '100,2000').split(',').map(Number);

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
}

/** A database holding `count` batches with stored summaries and one file each; returns its folder. */
async function seed(count: number): Promise<string> {
  const t = await startTestApp();
  const real = await createAnalysedBatch(t, { name: 'Bench: analysed' });
  await real.ingest();
  await t.services.batches.summariesIdle();
  const template = await t.dataSource.getRepository(Batch).findOneByOrFail({ id: real.batchId });
  const summary = await t.dataSource
    .getRepository(BatchSummaryRow)
    .findOneByOrFail({ batchId: real.batchId });
  const start = Date.parse('2030-01-01T08:00:00Z');
  const iso = (i: number) => new Date(start + i * 4 * 3_600_000).toISOString();
  await t.dataSource.transaction(async (manager) => {
    const batches = Array.from({ length: count - 1 }, (_, i) => [
      `Bench series ${i + 1}`,
      ['open', 'reviewed', 'approved'][i % 3],
      template.profileId,
      template.layoutId,
      template.layoutVersion,
      template.manifestId,
      template.manifestVersion,
      `BX-${i + 1}`,
      1,
      'Bench system',
      15 + (i % 3) * 10,
      template.settingsJson,
      template.createdById,
      iso(i).replace('T', ' ').slice(0, 19),
      iso(i).replace('T', ' ').slice(0, 19),
    ]);
    await bulkInsert(
      manager,
      'batches',
      [
        'name',
        'state',
        'profile_id',
        'layout_id',
        'layout_version',
        'manifest_id',
        'manifest_version',
        'run_id',
        'expected_files',
        'system_name',
        'temperature_c',
        'settings_json',
        'created_by_id',
        'created_at',
        'updated_at',
      ],
      batches,
    );
    const ids = (
      await manager.query<{ id: number }[]>('SELECT id FROM batches WHERE id <> ? ORDER BY id', [
        real.batchId,
      ])
    ).map((r) => Number(r.id));
    await bulkInsert(
      manager,
      'intake_files',
      [
        'profile_id',
        'original_name',
        'sha256',
        'size_bytes',
        'status',
        'run_id',
        'reading_count',
        'source',
        'batch_id',
        'received_at',
        'finished_at',
      ],
      ids.map((id, i) => [
        template.profileId,
        `BX-${i + 1}_readings.csv`,
        `${String(id).padStart(64, '0')}`,
        1000,
        'stored',
        `BX-${i + 1}`,
        12,
        'upload',
        id,
        iso(i),
        iso(i),
      ]),
    );
    await bulkInsert(
      manager,
      'batch_summaries',
      [
        'batch_id',
        'revision',
        'stored_files',
        'last_file_at',
        'last_activity_at',
        'sample_ids',
        'status',
        'source',
        'inputs_hash',
        'engine_version',
        'analysed_at',
        'summary_json',
        'result_json',
        'qc_flag_count',
        'qc_error_count',
        'best_model',
        'k',
      ],
      ids.map((id, i) => [
        id,
        1,
        1,
        iso(i),
        iso(i),
        summary.sampleIds,
        'current',
        'analysis',
        summary.inputsHash,
        summary.engineVersion,
        iso(i),
        summary.summaryJson,
        summary.resultJson,
        summary.qcFlagCount,
        summary.qcErrorCount,
        summary.bestModel,
        (summary.k ?? 800) * (1 + (i % 50) / 100),
      ]),
    );
  });
  await t.shutDown();
  return t.dir;
}

/** Start a server on the file, sign in, time its first GET /api/batches (and one search), stop it. */
async function coldFirstPage(dir: string): Promise<{ firstMs: number; searchMs: number }> {
  const t: TestApp = await startTestApp({}, dir);
  try {
    const agent = await t.agent('scientist');
    const t0 = performance.now();
    const res = await agent.get('/api/batches');
    const firstMs = performance.now() - t0;
    if (res.status !== 200 || res.body.items.length !== 25) throw new Error(`list: ${res.status}`);
    const t1 = performance.now();
    await agent.get('/api/batches?q=BLK').expect(200);
    const searchMs = performance.now() - t1;
    await t.services.batches.summariesIdle();
    return { firstMs, searchMs };
  } finally {
    await t.shutDown();
  }
}

async function main(): Promise<void> {
  const results: { size: number; first: number; search: number }[] = [];
  for (const size of SIZES) {
    const dir = await seed(size);
    const first: number[] = [];
    const search: number[] = [];
    for (let i = 0; i < RUNS; i++) {
      const r = await coldFirstPage(dir);
      first.push(r.firstMs);
      search.push(r.searchMs);
    }
    fs.rmSync(dir, { recursive: true, force: true });
    results.push({ size, first: median(first), search: median(search) });
  }
  console.log(`Batches list, cold first page (new server on the file), median of ${RUNS}:`);
  for (const r of results)
    console.log(
      `  ${String(r.size).padStart(5)} batches: first page ${r.first.toFixed(1)} ms, search "BLK" ${r.search.toFixed(1)} ms`,
    );
  if (results.length >= 2) {
    const [small, big] = [results[0]!, results.at(-1)!];
    console.log(
      `  ratio ${big.size}/${small.size}: first page ${(big.first / small.first).toFixed(2)}×, search ${(big.search / small.search).toFixed(2)}×`,
    );
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
