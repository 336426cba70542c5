/**
 * The batches list with a year of batches: the cold first page (a server just started on the database
 * file, its first GET /api/batches) with 2,000 batches against the same with 100, median of 20 starts
 * each, and the ratio. Every batch has a stored summary, a file and a manifest, as after a year of use;
 * the batches are written in bulk (one real analysed batch lends its set-up and its stored summary).
 * Not a timed test. Run: npm run bench:batches [-- --runs 20 --sizes 100,2000]
 */
import fs from 'node:fs';
import { BatchAnalysisRow } from '../../server/src/batches/batch-analysis.entity';
import { BatchSummaryRow } from '../../server/src/batches/batch-summary.entity';
import { Batch } from '../../server/src/batches/batch.entity';
import { IntakeFile } from '../../server/src/ingest/intake-file.entity';
import { createAnalysedBatch } from '../../server/src/reports/__tests__/analysed-batch';
import { startTestApp, type TestApp } from '../../server/src/testing/test-app';
import { median, option } from './bench-kit';
import { writeSyntheticBatches } from './synthetic-batches';

const RUNS = Number(option('runs', '20'));
const SIZES = option('sizes', '100,2000').split(',').map(Number);

/** A database holding `count` batches with stored summaries and one file each; returns its folder. */
async function seed(count: number): Promise<string> {
  const t = await startTestApp();
  const real = await createAnalysedBatch(t, { name: 'Bench: analysed' });
  await real.ingest();
  await t.services.batches.summariesIdle();
  const batchId = real.batchId;
  const template = {
    batch: await t.dataSource.getRepository(Batch).findOneByOrFail({ id: batchId }),
    summary: await t.dataSource.getRepository(BatchSummaryRow).findOneByOrFail({ batchId }),
    analysis: await t.dataSource.getRepository(BatchAnalysisRow).findOneByOrFail({ batchId }),
    file: await t.dataSource.getRepository(IntakeFile).findOneByOrFail({ batchId }),
  };
  const start = Date.parse('2030-01-01T08:00:00Z');
  await writeSyntheticBatches(
    t.dataSource,
    template,
    Array.from({ length: count - 1 }, (_, i) => ({
      name: `Bench series ${i + 1}`,
      state: (['open', 'reviewed', 'approved'] as const)[i % 3]!,
      profileId: template.batch.profileId,
      runId: `BX-${i + 1}`,
      systemName: 'Bench system',
      temperatureC: 15 + (i % 3) * 10,
      createdAt: new Date(start + i * 4 * 3_600_000).toISOString(),
      k: (template.summary.k ?? 800) * (1 + (i % 50) / 100),
    })),
  );
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
