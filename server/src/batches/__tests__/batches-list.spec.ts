import fs from 'node:fs';
import path from 'node:path';
import type TestAgent from 'supertest/lib/agent';
import { BetterSqlite3QueryRunner } from 'typeorm/driver/better-sqlite3/BetterSqlite3QueryRunner';
import { PostgresQueryRunner } from 'typeorm/driver/postgres/PostgresQueryRunner';
import type { AnalysisEngine } from '../../analysis-engine/analysis-engine';
import { currentAnalysisEngine } from '../../analysis-engine/analysis-engine';
import type { BatchListItemDto } from '../../contracts/batches';
import { type AnalysedBatch, SAMPLES_DIR, createAnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { summarize } from '../batches.service';

/** The engine of this build, counting how often it analyses. */
function countingEngine(): AnalysisEngine & { calls: number } {
  const real = currentAnalysisEngine();
  const engine = {
    calls: 0,
    version: real.version,
    analyze: (...args: Parameters<AnalysisEngine['analyze']>) => {
      engine.calls++;
      return real.analyze(...args);
    },
    analyzeAsync: (...args: Parameters<AnalysisEngine['analyze']>) => {
      engine.calls++;
      return real.analyzeAsync!(...args);
    },
    spectraAsync: real.spectraAsync,
  };
  return engine;
}

describe('GET /api/batches (paged, stored summaries)', () => {
  let t: TestApp;
  let engine: ReturnType<typeof countingEngine>;
  let scientist: TestAgent;
  let manager: TestAgent;
  /** Two files' worth: analysed, open. */
  let analysed: AnalysedBatch;
  /** Analysed, then marked reviewed. */
  let reviewed: AnalysedBatch;
  /** Its own manifest, with a sample id no other batch has. */
  let distinctId: number;
  /** Made without files, to page through. */
  const emptyIds: number[] = [];

  const page = async (
    query: string,
    agent = scientist,
  ): Promise<{ items: BatchListItemDto[]; total: number }> => {
    const res = await agent.get(`/api/batches${query}`);
    expect(res.status).toBe(200);
    return res.body as { items: BatchListItemDto[]; total: number };
  };

  beforeAll(async () => {
    engine = countingEngine();
    t = await startTestApp({}, { engine });
    scientist = await t.agent('scientist');
    manager = await t.agent('lab_manager');
    analysed = await createAnalysedBatch(t, { name: 'List: analysed' });
    await analysed.ingest();
    reviewed = await createAnalysedBatch(t, { name: 'List: reviewed' });
    await reviewed.ingest();
    await scientist.post(`/api/batches/${reviewed.batchId}/review`).expect(200);
    const base = (await scientist.get(`/api/batches/${analysed.batchId}`)).body as BatchListItemDto;
    // A manifest of the same layout whose first blank has its own sample id.
    const csv = fs.readFileSync(path.join(SAMPLES_DIR, 'manifest.csv'), 'utf8').replace(/BLK-1/g, 'BLK-ZX9');
    const manifest = await manager
      .post('/api/manifests')
      .field('layoutId', String(base.layoutId))
      .field('name', 'List: distinct samples')
      .attach('file', Buffer.from(csv), 'manifest-zx9.csv');
    expect(manifest.status).toBe(201);
    const make = async (name: string, runId: string, manifestId = base.manifestId): Promise<number> => {
      const res = await manager.post('/api/batches').send({
        name,
        profileId: base.profileId,
        layoutId: base.layoutId,
        manifestId,
        runId,
      });
      expect(res.status).toBe(201);
      return res.body.id as number;
    };
    distinctId = await make('List: distinct samples', 'ZX-1', manifest.body.id);
    for (let i = 0; i < 12; i++)
      emptyIds.push(await make(`List: empty ${String(i).padStart(2, '0')}`, `EMPTY-${i}`));
    await t.services.batches.summariesIdle();
  }, 120_000);
  afterAll(() => t.stop());

  it('when signed out then 401; every role that reads batches gets a page', async () => {
    expect((await (await t.agent()).get('/api/batches')).status).toBe(401);
    for (const role of ['admin', 'lab_manager', 'scientist'] as const) {
      const body = await page('?pageSize=2', await t.agent(role));
      expect(body.total).toBe(15);
      expect(body.items).toHaveLength(2);
    }
  });

  it('when the query is wrong then 400 names it', async () => {
    for (const q of ['?pageSize=0', '?pageSize=501', '?sort=colour', '?state=done', '?page=-1', '?other=1']) {
      const res = await scientist.get(`/api/batches${q}`);
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(/Invalid query/);
    }
  });

  it('when paging then pages do not overlap and together hold every batch once', async () => {
    const seen: number[] = [];
    for (let p = 0; p < 4; p++) {
      const body = await page(`?pageSize=4&page=${p}&sort=name&dir=asc`);
      expect(body.total).toBe(15);
      seen.push(...body.items.map((b) => b.id));
    }
    expect(seen).toHaveLength(15);
    expect(new Set(seen).size).toBe(15);
    const names = (await page('?pageSize=100&sort=name&dir=asc')).items.map((b) => b.name);
    expect(names).toEqual([...names].sort((a, b) => a.toLowerCase().localeCompare(b.toLowerCase())));
    const desc = (await page('?pageSize=100&sort=name&dir=desc')).items.map((b) => b.name);
    expect(desc).toEqual([...names].reverse());
  });

  it('when filtered by state then only those; sorted by state then open before reviewed', async () => {
    const only = await page('?state=reviewed');
    expect(only.total).toBe(1);
    expect(only.items.map((b) => b.id)).toEqual([reviewed.batchId]);
    const byState = (await page('?pageSize=100&sort=state&dir=asc')).items.map((b) => b.state);
    expect(byState.at(-1)).toBe('reviewed');
    // The reviewed batch reads from another instrument; every other batch here is open on this one.
    expect((await page(`?unapproved=true&profileId=${analysed.profileId}`)).total).toBe(14);
    expect((await page(`?unapproved=true&profileId=${reviewed.profileId}`)).total).toBe(1);
  });

  it('when sorted by K then batches without one come last either way', async () => {
    for (const dir of ['asc', 'desc']) {
      const items = (await page(`?pageSize=100&sort=k&dir=${dir}`)).items;
      const ks = items.map((b) => b.summary?.k ?? null);
      expect(ks.slice(0, 2).every((k) => k !== null)).toBe(true);
      expect(ks.slice(2).every((k) => k === null)).toBe(true);
    }
  });

  it('when searching then a sample id, run id, file name or batch name finds its batches, case aside', async () => {
    const ids = async (q: string) =>
      (await page(`?pageSize=100&q=${encodeURIComponent(q)}`)).items.map((b) => b.id);
    expect(await ids('blk-zx9')).toEqual([distinctId]);
    expect(await ids('zx-1')).toEqual([distinctId]);
    // The file the instrument sent into the reviewed batch's run (analysed-batch names it <run>_readings_0.csv).
    const runOfReviewed = (await scientist.get(`/api/batches/${reviewed.batchId}`)).body.runId as string;
    expect(await ids(`${runOfReviewed}_READINGS_0`)).toEqual([reviewed.batchId]);
    expect(await ids('List: empty 1')).toEqual(emptyIds.slice(10, 12).reverse());
    // LIKE's own wildcards are plain characters here.
    expect(await ids('%')).toEqual([]);
    expect(await ids('List_')).toEqual([]);
  });

  it('when a page is read then two queries touch the batches, whatever its size, and nothing is analysed', async () => {
    const runner =
      t.dataSource.driver.options.type === 'postgres' ? PostgresQueryRunner : BetterSqlite3QueryRunner;
    const spy = jest.spyOn(runner.prototype, 'query');
    const before = engine.calls;
    const count = async (query: string): Promise<number> => {
      spy.mockClear();
      await page(query);
      return spy.mock.calls.filter(([sql]) => /FROM "batches"/.test(String(sql))).length;
    };
    try {
      expect(await count('?pageSize=2')).toBe(2);
      expect(await count('?pageSize=100')).toBe(2);
      expect(await count('?pageSize=100&q=blk&sort=k&dir=asc')).toBe(2);
    } finally {
      spy.mockRestore();
    }
    expect(engine.calls).toBe(before);
  });

  it('then the stored headline is the analysis of the batch as it stands', async () => {
    const analysis = (await scientist.get(`/api/batches/${analysed.batchId}/analysis`)).body;
    const listed = (await page('?q=List: analysed')).items[0]!;
    expect(listed.summaryState).toBe('current');
    expect(listed.fileCount).toBe(1);
    expect(listed.summary).toEqual(summarize(analysis.result));
    expect(listed.summary!.best).toBe('1:1');
    const empty = (await page('?q=List: empty 00')).items[0]!;
    expect(empty).toMatchObject({ summaryState: 'none', summary: null, fileCount: 0 });
  });

  it('when an exclusion is saved then the stored headline follows, analysed once', async () => {
    const before = (await page('?q=List: analysed')).items[0]!;
    const res = await scientist.put(`/api/batches/${analysed.batchId}/settings`).send({
      settings: { exclusions: [{ position: 'C9', reason: 'bubble in the cuvette' }] },
      reason: 'bubble seen',
    });
    expect(res.status).toBe(200);
    await t.services.batches.summariesIdle();
    const calls = engine.calls;
    const after = (await page('?q=List: analysed')).items[0]!;
    expect(after.summaryState).toBe('current');
    expect(after.summary).not.toEqual(before.summary);
    // The batch page is served the stored result of these very inputs: no second analysis.
    const analysis = (await scientist.get(`/api/batches/${analysed.batchId}/analysis`)).body;
    expect(summarize(analysis.result)).toEqual(after.summary);
    expect(engine.calls).toBe(calls);
  });

  it('when the server starts again on the same file then the list answers from what is stored, analysing nothing', async () => {
    const before = (await page('?pageSize=100')).items;
    await t.shutDown();
    const again = countingEngine();
    t = await startTestApp({}, { engine: again, existingDir: t.dir });
    scientist = await t.agent('scientist');
    await t.services.batches.summariesIdle();
    expect((await page('?pageSize=100')).items).toEqual(before);
    await scientist.get(`/api/batches/${analysed.batchId}/analysis`).expect(200);
    expect(again.calls).toBe(0);
  });

  it('when batches have no stored summary (made before they were stored) then the start fills them in once', async () => {
    const before = (await page('?pageSize=100')).items;
    await t.dataSource.query('DELETE FROM batch_summaries');
    await t.shutDown();
    const again = countingEngine();
    t = await startTestApp({}, { engine: again, existingDir: t.dir });
    scientist = await t.agent('scientist');
    await t.services.batches.summariesIdle();
    const after = (await page('?pageSize=100')).items;
    // Compared by id: the backfill takes the last activity from the batch row (whole seconds in SQLite).
    const shown = (items: BatchListItemDto[]) =>
      items
        .map((b) => [b.id, b.summary, b.fileCount, b.summaryState])
        .sort((x, y) => Number(x[0]) - Number(y[0]));
    expect(shown(after)).toEqual(shown(before));
    expect((await page('?q=BLK-ZX9')).items.map((b) => b.id)).toEqual([distinctId]);
    // Only the two batches with files were analysed, once each.
    expect(again.calls).toBe(2);
  });

  it('when some batches have no stored summary yet then the newest-first pages hold every batch once, those last by id', async () => {
    const full = (await page('?pageSize=100')).items.map((b) => b.id);
    expect(full).toHaveLength(15);
    const missing = [emptyIds[3], emptyIds[7], emptyIds[10]];
    await t.dataSource.query(`DELETE FROM batch_summaries WHERE batch_id IN (${missing.join(', ')})`);
    const expected = [...full.filter((id) => !missing.includes(id)), ...[...missing].sort((a, b) => b - a)];
    for (const size of [2, 4, 5, 11, 13]) {
      const seen: number[] = [];
      for (let p = 0; p * size < 15; p++) {
        const body = await page(`?pageSize=${size}&page=${p}`);
        expect(body.total).toBe(15);
        seen.push(...body.items.map((b) => b.id));
      }
      expect([size, seen]).toEqual([size, expected]);
    }
    const oldestFirst = (await page('?pageSize=4&page=3&dir=asc')).items.map((b) => b.id);
    expect(oldestFirst).toEqual([...missing].sort((a, b) => a - b));
    const pending = (await page('?pageSize=3&page=4')).items;
    expect(pending.map((b) => b.summaryState)).toEqual(['pending', 'pending', 'pending']);
  });
});
