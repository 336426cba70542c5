import fs from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import * as ss from 'simple-statistics';
import request from 'supertest';
import {
  GAS_CONSTANT_J_PER_MOL_K,
  formatK,
  kUnitOf,
  mixtureInitialConcentrations,
  solveOneToOne,
  vantHoff,
} from '../../analysis';
import { Batch, type BatchState } from '../../batches/batch.entity';
import { BatchSummaryStore } from '../../batches/batch-summary-store';
import { TemperatureSystemRow } from '../temperature-system.entity';
import {
  ANSWERS_FORMAT,
  type SystemAnswers,
  TemperatureSystemStore,
  answersFormat,
} from '../temperature-systems';
import type { BatchResultSummary } from '../../contracts/batches';
import type {
  SystemTemperatures,
  TemperaturePoint,
  TemperaturePointsPage,
} from '../../contracts/temperatures';
import { LONG_TABLE_PROFILE, createProfile, settled } from '../../ingest/__tests__/ingest-helpers';
import { startTestApp, type TestApp } from '../../testing/test-app';

const MANIFEST = fs.readFileSync(path.resolve(__dirname, '../../../../samples/analysis/manifest.csv'));
type Row = Record<string, string>;
const ROWS = parse(MANIFEST, { columns: true }) as Row[];

// Invented system for the round trip: ΔH° = −20 kJ/mol, ΔS° = −10 J/(mol·K), ε = 1250 L/(mol·cm), 1 cm.
const DELTA_H = -20_000;
const DELTA_S = -10;
const EPSILON = 1250;
const BACKGROUND = 0.04;
const kAt = (temperatureC: number) =>
  Math.exp(
    -DELTA_H / (GAS_CONSTANT_J_PER_MOL_K * (temperatureC + 273.15)) + DELTA_S / GAS_CONSTANT_J_PER_MOL_K,
  );

/** Noise-free readings of the sample manifest at one temperature. */
function readingsCsv(temperatureC: number): string {
  const n = (v: string) => (v === '' ? 0 : Number(v));
  const lines = ['position,wavelength_nm,absorbance'];
  for (const r of ROWS) {
    let absorbance = BACKGROUND;
    if (r['role'] === 'standard') absorbance += EPSILON * n(r['concentration_M']);
    if (r['role'] === 'unknown') absorbance += 0.3;
    if (r['role'] === 'mixture') {
      const { a0M, b0M } = mixtureInitialConcentrations({
        stockAM: n(r['stock_a_M']),
        volumeAMl: n(r['volume_a_mL']),
        stockBM: n(r['stock_b_M']),
        volumeBMl: n(r['volume_b_mL']),
        totalVolumeMl: n(r['total_volume_mL']),
      });
      absorbance += EPSILON * solveOneToOne(kAt(temperatureC), a0M, b0M);
    }
    lines.push(`${r['position']},640,${absorbance.toFixed(9)}`);
  }
  return `${lines.join('\n')}\n`;
}

const ACTOR = { id: 2, email: 'manager@equilight.test' };

/** A batch of a system whose stored headline is written directly (no files, no analysis). */
interface PlannedBatch {
  name: string;
  temperatureC: number;
  state: BatchState;
  /** Best stoichiometry and K of its headline; no `model`: no headline at all. */
  model?: string;
  k?: number | null;
  /** For a batch without a K value: what is known of K. */
  lowerBound?: number;
}

/** The headline the analysis would store for a planned batch (K ± 4 %, its interval ± 8 %). */
function headlineOf(p: PlannedBatch): BatchResultSummary {
  const k = p.k ?? null;
  const statement = {
    model: p.model!,
    status: k === null ? ('lower-bound' as const) : ('determined' as const),
    k,
    kCi95:
      k === null ? ([p.lowerBound!, null] as [number, null]) : ([k * 0.92, k * 1.08] as [number, number]),
    kLowerBound95: k === null ? p.lowerBound! : null,
    kUpperBound95: null,
  };
  return {
    qcFlagCount: 0,
    qcErrorCount: 0,
    best: p.model!,
    k,
    kSe: k === null ? null : k * 0.04,
    kCi95: statement.kCi95,
    kStatus: statement.status,
    kLowerBound95: statement.kLowerBound95,
    kUpperBound95: null,
    kUnit: kUnitOf(p.model!),
    kText: formatK(statement),
  };
}

describe("K across temperatures (van 't Hoff)", () => {
  let t: TestApp;
  let setUp: { profileId: number; layoutId: number; manifestId: number };
  let runs = 0;

  /** A batch's state changed as a review, approval or reopening changes it (its summary row touched). */
  async function setState(id: number, state: BatchState): Promise<void> {
    await t.dataSource.transaction(async (manager) => {
      await manager.update(Batch, { id }, { state });
      await new BatchSummaryStore(t.dataSource).touch(manager, id, { inputsChanged: false });
    });
  }

  /** Batches of a system with their stored headlines and states, written as the app writes them. */
  async function plantSystem(systemName: string, planned: readonly PlannedBatch[]): Promise<number[]> {
    const ids: number[] = [];
    for (const p of planned) {
      const batch = await t.services.batches.create(
        {
          name: p.name,
          profileId: setUp.profileId,
          layoutId: setUp.layoutId,
          manifestId: setUp.manifestId,
          runId: `P-${++runs}`,
          expectedFiles: 1,
          systemName,
          temperatureC: p.temperatureC,
          settings: { candidates: ['1:1', '1:2'] },
        },
        ACTOR,
      );
      ids.push(batch.id);
    }
    // Each new batch's own (empty) headline first, then the planted ones over them.
    await t.services.batches.summariesIdle();
    for (const [i, p] of planned.entries()) {
      await setState(ids[i]!, p.state);
      if (p.model) await storeHeadline(ids[i]!, p);
    }
    return ids;
  }

  /** A planned batch's headline stored as an approval stores one (its system moves on a generation). */
  function storeHeadline(id: number, p: PlannedBatch): Promise<void> {
    return new BatchSummaryStore(t.dataSource).writeNow(t.dataSource.manager, id, {
      status: 'current',
      source: 'analysis',
      inputsHash: null,
      engineVersion: t.services.batches.engineVersion,
      error: null,
      summary: headlineOf(p),
      result: null,
    });
  }

  beforeAll(async () => {
    t = await startTestApp();
    const admin = await t.agent('admin');
    const { profile } = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Cuvette T',
      kind: 'cuvette_spectrophotometer',
      plateFormat: 'cuvette',
      dropSubfolder: 'cuvette-t',
      fileNamePattern: '^(?<run>T-\\d+)',
      pathLengthCm: 1,
    });
    const layout = await t.services.layouts.create(
      {
        name: 'Series T',
        format: 'cuvette',
        cuvetteCount: ROWS.length,
        positions: ROWS.map((r) => ({
          position: r['position'],
          role: r['role'] as 'blank',
          ...(r['replicate_group'] ? { replicateGroup: r['replicate_group'] } : {}),
        })),
      },
      ACTOR,
    );
    const manifest = await t.services.manifests.create(
      'Series T samples',
      { layoutId: layout.id, file: { buffer: MANIFEST, originalName: 'm.csv' } },
      false,
      ACTOR,
    );
    setUp = { profileId: profile.id, layoutId: layout.id, manifestId: manifest.id };
  });
  afterAll(() => t.stop());

  it('recovers ΔH° and ΔS° of a synthetic system from approved batches at 15, 25 and 35 °C (round trip)', async () => {
    const entity = await t.services.instruments.get(setUp.profileId);
    for (const [i, temperatureC] of [15, 25, 35].entries()) {
      const batch = await t.services.batches.create(
        {
          name: `Series T at ${temperatureC} °C`,
          profileId: setUp.profileId,
          layoutId: setUp.layoutId,
          manifestId: setUp.manifestId,
          runId: `T-${i}`,
          expectedFiles: 1,
          systemName: 'Invented complex',
          temperatureC,
          settings: { candidates: ['1:1', '1:2'] },
        },
        ACTOR,
      );
      const receipt = await t.services.ingest.receive({
        content: Buffer.from(readingsCsv(temperatureC)),
        originalName: `T-${i}.csv`,
        profile: entity,
        source: 'upload',
      });
      expect((await settled(t, receipt.id)).status).toBe('stored');
      if (i < 2) {
        await t.services.batches.review(batch.id, ACTOR);
        await t.services.batches.approve(batch.id, 'checked', ACTOR);
      }
    }
    const scientist = await t.agent('scientist');
    const approvedOnly = (await scientist.get('/api/temperatures').expect(200)).body as SystemTemperatures[];
    const system = approvedOnly.find((s) => s.systemName === 'Invented complex')!;
    expect(system.vantHoff!.n).toBe(2);
    expect(system.counts).toEqual({ batches: 3, used: 2 });
    expect(system.groups.map((g) => [g.temperatureC, g.batches, g.used])).toEqual([
      [15, 1, 1],
      [25, 1, 1],
      [35, 1, 0],
    ]);
    const points = (
      await scientist.get('/api/temperatures/points').query({ system: 'Invented complex' }).expect(200)
    ).body as TemperaturePointsPage;
    expect(points.items.map((p) => p.excludedBecause)).toEqual([null, null, 'not approved yet']);

    // The open batch's K is its stored summary, written once its analysis has run in the background.
    await t.services.batches.summariesIdle();
    const all = (
      (await scientist.get('/api/temperatures?includeUnapproved=true').expect(200))
        .body as SystemTemperatures[]
    ).find((s) => s.systemName === 'Invented complex')!;
    expect(all.model).toBe('1:1');
    for (const g of all.groups) expect(g.kGeometricMean).toBeCloseTo(kAt(g.temperatureC), 3);
    const allPoints = (
      await scientist
        .get('/api/temperatures/points')
        .query({ system: 'Invented complex', includeUnapproved: 'true' })
        .expect(200)
    ).body as TemperaturePointsPage;
    for (const p of allPoints.items) {
      expect(p.k).toBeCloseTo(kAt(p.temperatureC), 3);
      expect(p.kText).toMatch(/L·mol⁻¹/);
      expect(p.kCi95![0]!).toBeLessThan(p.k!);
    }
    // The data were made from ΔH° and ΔS°; the fit over three temperatures must give them back.
    expect(all.vantHoff!.deltaHJPerMol).toBeCloseTo(DELTA_H, 0);
    expect(all.vantHoff!.deltaSJPerMolK).toBeCloseTo(DELTA_S, 2);
    expect(all.vantHoff!.r2).toBeCloseTo(1, 9);
  });

  describe('a system with many batches: groups for the chart, the batches a page at a time', () => {
    const SYSTEM = 'Invented pair P';
    // Invented: K of a 1:1 pair at three temperatures, with batches the fit leaves out for each reason.
    const PLANNED: PlannedBatch[] = [
      { name: 'P 15 a', temperatureC: 15, state: 'approved', model: '1:1', k: 1210 },
      { name: 'P 15 b', temperatureC: 15, state: 'approved', model: '1:1', k: 1130 },
      { name: 'P 15 c', temperatureC: 15, state: 'approved', model: '1:1', k: 1295 },
      { name: 'P 15 d', temperatureC: 15, state: 'open', model: '1:1', k: 5000 },
      { name: 'P 25 a', temperatureC: 25, state: 'approved', model: '1:1', k: 905 },
      { name: 'P 25 b', temperatureC: 25, state: 'approved', model: '1:1', k: 862 },
      { name: 'P 25 c', temperatureC: 25, state: 'approved', model: '1:2', k: 4.2e6 },
      { name: 'P 25 d', temperatureC: 25, state: 'approved', model: '1:1', k: null, lowerBound: 2.4e5 },
      { name: 'P 25 e', temperatureC: 25, state: 'reviewed' },
      { name: 'P 35 a', temperatureC: 35, state: 'approved', model: '1:1', k: 700 },
      { name: 'P 35 b', temperatureC: 35, state: 'approved', model: '1:1', k: 655 },
      { name: 'P 35 c', temperatureC: 35, state: 'reviewed', model: '1:1', k: 612 },
      { name: 'P 35 d', temperatureC: 35, state: 'approved', model: '1:1', k: 731 },
    ];
    const inFit = (p: PlannedBatch, includeUnapproved: boolean) =>
      (includeUnapproved || p.state === 'approved') && p.model === '1:1' && typeof p.k === 'number';
    let ids: number[];

    const systems = async (query = '', role: 'scientist' | 'lab_manager' | 'admin' = 'scientist') => {
      const res = await (await t.agent(role)).get(`/api/temperatures${query}`).expect(200);
      return res.body as SystemTemperatures[];
    };
    const page = async (query: Record<string, string | number>) => {
      const res = await (await t.agent('scientist')).get('/api/temperatures/points').query(query);
      expect(res.status).toBe(200);
      return res.body as TemperaturePointsPage;
    };

    beforeAll(async () => {
      // Planted in shuffled order: the answers sort them.
      const order = [7, 2, 11, 0, 9, 4, 12, 1, 5, 10, 3, 8, 6];
      const made = await plantSystem(
        SYSTEM,
        order.map((i) => PLANNED[i]!),
      );
      ids = PLANNED.map((_, i) => made[order.indexOf(i)]!);
    });

    it('gives per temperature the batches, those in the fit, and the geometric mean, least and greatest K of those', async () => {
      const system = (await systems()).find((s) => s.systemName === SYSTEM)!;
      expect(system.model).toBe('1:1');
      expect(system.counts).toEqual({ batches: 13, used: 8 });
      expect(system).not.toHaveProperty('points');
      for (const g of system.groups) {
        const at = PLANNED.filter((p) => p.temperatureC === g.temperatureC);
        const used = at.filter((p) => inFit(p, false)).map((p) => p.k as number);
        expect(g.batches).toBe(at.length);
        expect(g.used).toBe(used.length);
        // Source: simple-statistics geometricMean, min and max.
        expect(g.kGeometricMean!).toBeCloseTo(ss.geometricMean(used), 9);
        expect(g.kMin).toBe(ss.min(used));
        expect(g.kMax).toBe(ss.max(used));
      }
      expect(system.groups.map((g) => g.temperatureC)).toEqual([15, 25, 35]);
      // By hand: the geometric mean of 1210, 1130 and 1295 is (1210 · 1130 · 1295)^(1/3) ≈ 1209.8.
      expect(system.groups[0]!.kGeometricMean!).toBeCloseTo(1209.8, 1);
    });

    it('fits every usable batch, not a page of them: the same fit as over all its points', async () => {
      for (const includeUnapproved of [false, true]) {
        const system = (await systems(`?includeUnapproved=${includeUnapproved}`)).find(
          (s) => s.systemName === SYSTEM,
        )!;
        const used = PLANNED.filter((p) => inFit(p, includeUnapproved));
        expect(system.counts.used).toBe(used.length);
        expect(system.vantHoff!.n).toBe(used.length);
        // Source: simple-statistics linearRegression of ln K on 1/T (K), ΔH° = −R·slope, ΔS° = R·intercept.
        const line = ss.linearRegression(used.map((p) => [1 / (p.temperatureC + 273.15), Math.log(p.k!)]));
        expect(system.vantHoff!.slope).toBeCloseTo(line.m, 6);
        expect(system.vantHoff!.intercept).toBeCloseTo(line.b, 9);
        expect(system.vantHoff!.deltaHJPerMol).toBeCloseTo(-GAS_CONSTANT_J_PER_MOL_K * line.m, 4);
        // And the analysis module's fit over those points, as the page of points lists them.
        expect(system.vantHoff!.deltaSJPerMolK).toBeCloseTo(
          vantHoff(used.map((p) => ({ temperatureC: p.temperatureC, k: p.k! }))).deltaSJPerMolK,
          9,
        );
        expect(system.note).toBe(`van 't Hoff fit over ${used.length} batches at 3 temperatures (1:1).`);
      }
    });

    it("gives ΔH° of water's ionisation from the handbook's ion product at 15, 25 and 35 °C", async () => {
      // Source (from memory): CRC Handbook of Chemistry and Physics, ion product of water, pKw 14.346
      // (15 °C), 13.995 (25 °C), 13.680 (35 °C); ΔH° = +55.8 kJ/mol and ΔS° = −80.7 J/(mol·K) at 25 °C.
      // The fit over 15–35 °C sits a little off those (ΔH° of water varies with temperature).
      const pKw = [
        [15, 14.346],
        [25, 13.995],
        [35, 13.68],
      ] as const;
      await plantSystem(
        'Water, ion product (handbook)',
        pKw.map(([temperatureC, p]) => ({
          name: `Kw ${temperatureC} °C`,
          temperatureC,
          state: 'approved',
          model: '1:1',
          k: 10 ** -p,
        })),
      );
      const water = (await systems()).find((s) => s.systemName === 'Water, ion product (handbook)')!;
      expect(Math.abs(water.vantHoff!.deltaHJPerMol / 1000 - 55.8)).toBeLessThan(1.5);
      expect(Math.abs(water.vantHoff!.deltaSJPerMolK - -80.7)).toBeLessThan(4);
      // By hand, the two ends: ΔH° = −R·ln(Kw35/Kw15)/(1/308.15 − 1/288.15) = 8.3145 · 1.5333 / 2.2524e-4.
      const twoEnds = vantHoff([
        { temperatureC: 15, k: 10 ** -14.346 },
        { temperatureC: 35, k: 10 ** -13.68 },
      ]);
      expect(twoEnds.deltaHJPerMol / 1000).toBeCloseTo((8.3145 * 1.5333) / 2.2524e-4 / 1000, 1);
    });

    it('lists the batches a page at a time, by temperature then id, each saying why it is left out', async () => {
      const sorted = PLANNED.map((p, i) => ({ ...p, id: ids[i]! })).sort(
        (a, b) => a.temperatureC - b.temperatureC || a.id - b.id,
      );
      const seen: TemperaturePoint[] = [];
      for (let n = 0; n < 4; n++) {
        const got = await page({ system: SYSTEM, page: n, pageSize: 4 });
        expect(got).toMatchObject({ total: 13, page: n, pageSize: 4 });
        expect(got.items).toHaveLength(n < 3 ? 4 : 1);
        seen.push(...got.items);
      }
      expect(seen.map((p) => p.batchId)).toEqual(sorted.map((p) => p.id));
      const byName = new Map(seen.map((p) => [p.batchName, p]));
      expect(byName.get('P 15 a')).toEqual({
        batchId: ids[0],
        batchName: 'P 15 a',
        state: 'approved',
        temperatureC: 15,
        model: '1:1',
        k: 1210,
        kSe: 1210 * 0.04,
        kCi95: [1210 * 0.92, 1210 * 1.08],
        kText: headlineOf(PLANNED[0]!).kText,
        excludedBecause: null,
      });
      expect(byName.get('P 15 d')!.excludedBecause).toBe('not approved yet');
      expect(byName.get('P 25 c')!.excludedBecause).toBe('its best stoichiometry is 1:2, not 1:1');
      expect(byName.get('P 25 d')!.excludedBecause).toBe(`K ${headlineOf(PLANNED[7]!).kText}`);
      expect(byName.get('P 25 d')!.kCi95).toEqual([2.4e5, null]);
      expect(byName.get('P 25 e')).toMatchObject({ model: null, k: null, kCi95: null, kText: null });

      const withOpen = await page({ system: SYSTEM, includeUnapproved: 'true', pageSize: 200 });
      const reasons = new Map(withOpen.items.map((p) => [p.batchName, p.excludedBecause]));
      expect(reasons.get('P 15 d')).toBeNull();
      expect(reasons.get('P 35 c')).toBeNull();
      expect(reasons.get('P 25 e')).toBe('no K from this batch');
      // The default page: the first 25.
      expect(await page({ system: SYSTEM })).toMatchObject({ page: 0, pageSize: 25, total: 13 });
      // Past the end: no items, the same total.
      expect(await page({ system: SYSTEM, page: 9, pageSize: 4 })).toMatchObject({ items: [], total: 13 });
    });

    it('answers 404 for a system no batch names, 400 for a bad page, size or query', async () => {
      const scientist = await t.agent('scientist');
      const unknown = await scientist.get('/api/temperatures/points').query({ system: 'No such pair' });
      expect(unknown.status).toBe(404);
      expect(unknown.body.error.message).toBe(
        'No batch with a temperature names the chemical system "No such pair".',
      );
      for (const [query, says] of [
        [{}, /system/],
        [{ system: '  ' }, /system/],
        [{ system: SYSTEM, page: -1 }, /page/],
        [{ system: SYSTEM, page: 'two' }, /page/],
        [{ system: SYSTEM, pageSize: 0 }, /pageSize/],
        [{ system: SYSTEM, pageSize: 201 }, /pageSize/],
        [{ system: SYSTEM, pageSize: 2.5 }, /pageSize/],
        [{ system: SYSTEM, includeUnapproved: 'yes' }, /includeUnapproved/],
        [{ system: SYSTEM, sort: 'k' }, /sort/],
      ] as const) {
        const res = await scientist.get('/api/temperatures/points').query(query);
        expect(res.status).toBe(400);
        expect(res.body.error.message).toMatch(/^Invalid query: /);
        expect(res.body.error.message).toMatch(says);
      }
      expect((await page({ system: SYSTEM, pageSize: 200 })).items).toHaveLength(13);
      expect((await scientist.get('/api/temperatures?includeUnapproved=maybe')).status).toBe(400);
    });

    it('lets every signed-in role read both, and nobody signed out', async () => {
      for (const role of ['admin', 'lab_manager', 'scientist'] as const) {
        expect((await systems('', role)).some((s) => s.systemName === SYSTEM)).toBe(true);
        const res = await (
          await t.agent(role)
        )
          .get('/api/temperatures/points')
          .query({ system: SYSTEM, pageSize: 1 });
        expect(res.status).toBe(200);
      }
      expect((await request(t.app).get('/api/temperatures')).status).toBe(401);
      expect((await request(t.app).get('/api/temperatures/points').query({ system: SYSTEM })).status).toBe(
        401,
      );
    });

    it('when the migration makes the K columns again from the stored headlines, then the points read the same', async () => {
      const before = await page({ system: SYSTEM, pageSize: 200, includeUnapproved: 'true' });
      await t.dataSource.undoLastMigration(); // the systems' stored answers
      await t.dataSource.undoLastMigration(); // the K columns
      await t.dataSource.runMigrations();
      expect(await page({ system: SYSTEM, pageSize: 200, includeUnapproved: 'true' })).toEqual(before);
    });
  });

  describe("each system's answers stored until one of its batches changes", () => {
    const S1 = 'Invented pair S1';
    const S2 = 'Invented pair S2';
    // Invented: three approved batches of a 1:1 pair each.
    const plan = (prefix: string, k: readonly number[]): PlannedBatch[] =>
      [15, 25, 35].map((temperatureC, i) => ({
        name: `${prefix} ${temperatureC}`,
        temperatureC,
        state: 'approved',
        model: '1:1',
        k: k[i]!,
      }));
    let s1: number[];

    const rowOf = async (systemName: string) =>
      t.dataSource.manager.findOneByOrFail(TemperatureSystemRow, { systemName });
    const systemOf = async (systemName: string, includeUnapproved = false) =>
      (
        (
          await (
            await t.agent('scientist')
          )
            .get(`/api/temperatures?includeUnapproved=${includeUnapproved}`)
            .expect(200)
        ).body as SystemTemperatures[]
      ).find((s) => s.systemName === systemName)!;
    /** Put a note of our own in a system's stored answers: a read that returns it did not work them out. */
    const markStored = async (systemName: string) => {
      const row = await rowOf(systemName);
      const answers = JSON.parse(row.answersJson!) as SystemAnswers;
      answers.approved.note = 'stored';
      answers.all.note = 'stored';
      await t.dataSource.manager.update(
        TemperatureSystemRow,
        { systemName },
        { answersJson: JSON.stringify(answers) },
      );
    };
    beforeAll(async () => {
      s1 = await plantSystem(S1, plan('S1', [1500, 1100, 820]));
      await plantSystem(S2, plan('S2', [300, 250, 210]));
    });

    it('stores both answers at the generation they are of, and serves them while nothing changed', async () => {
      const answer = await systemOf(S1);
      expect(answer.counts).toEqual({ batches: 3, used: 3 });
      const row = await rowOf(S1);
      expect(row.answersGeneration).toBe(row.generation);
      expect(row.answersFormat).toBe(answersFormat(t.services.batches.engineVersion));
      const stored = JSON.parse(row.answersJson!) as SystemAnswers;
      expect(stored.approved).toEqual(answer);
      expect(stored.all).toEqual(await systemOf(S1, true));
      await markStored(S1);
      expect((await systemOf(S1)).note).toBe('stored');
      expect((await systemOf(S1, true)).note).toBe('stored');
    });

    it('works a system out again after a headline of one of its batches is stored, and only that system', async () => {
      await systemOf(S2);
      await markStored(S1);
      await markStored(S2);
      const s2Before = await rowOf(S2);
      await storeHeadline(s1[2]!, { ...plan('S1', [0, 0, 700])[2]!, k: 700 });
      const s1After = await systemOf(S1);
      expect(s1After.note).toBe("van 't Hoff fit over 3 batches at 3 temperatures (1:1).");
      expect(s1After.groups.find((g) => g.temperatureC === 35)!.kGeometricMean).toBeCloseTo(700, 9);
      // Source: simple-statistics linearRegression of ln K on 1/T (K), ΔH° = −R·slope.
      const line = ss.linearRegression(
        [
          [15, 1500],
          [25, 1100],
          [35, 700],
        ].map(([c, k]) => [1 / (c! + 273.15), Math.log(k!)]),
      );
      expect(s1After.vantHoff!.deltaHJPerMol).toBeCloseTo(-GAS_CONSTANT_J_PER_MOL_K * line.m, 4);
      // The other system's batches did not change: its stored answer is still served.
      expect(await rowOf(S2)).toEqual(s2Before);
      expect((await systemOf(S2)).note).toBe('stored');
    });

    it('works it out again after a state change takes a batch out of the fit or puts it back', async () => {
      await systemOf(S1);
      await markStored(S1);
      await setState(s1[0]!, 'open'); // reopened
      const reopened = await systemOf(S1);
      expect(reopened.counts).toEqual({ batches: 3, used: 2 });
      expect((await systemOf(S1, true)).counts).toEqual({ batches: 3, used: 3 });
      await setState(s1[0]!, 'approved');
      expect((await systemOf(S1)).counts).toEqual({ batches: 3, used: 3 });
    });

    it('counts a new batch of the system at once, and a new system gets its row', async () => {
      await systemOf(S1);
      const [id] = await plantSystem(S1, [{ name: 'S1 40', temperatureC: 40, state: 'open' }]);
      expect((await systemOf(S1)).counts).toEqual({ batches: 4, used: 3 });
      const page = (
        await (await t.agent('scientist')).get('/api/temperatures/points').query({ system: S1, pageSize: 10 })
      ).body as TemperaturePointsPage;
      expect(page.total).toBe(4);
      expect(page.items.at(-1)).toMatchObject({ batchId: id, excludedBecause: 'not approved yet' });
      await plantSystem('Invented pair S3', plan('S3', [10, 20, 30]).slice(0, 1));
      expect((await rowOf('Invented pair S3')).generation).toBeGreaterThanOrEqual(1);
      expect((await systemOf('Invented pair S3')).counts).toEqual({ batches: 1, used: 1 });
    });

    it('works the answers out again after a release that stores them in another format, or another analysis engine', async () => {
      await systemOf(S2);
      await markStored(S2);
      await t.dataSource.manager.update(
        TemperatureSystemRow,
        { systemName: S2 },
        { answersFormat: 'older/0' },
      );
      expect((await systemOf(S2)).note).toBe("van 't Hoff fit over 3 batches at 3 temperatures (1:1).");
      expect((await rowOf(S2)).answersFormat).toBe(answersFormat(t.services.batches.engineVersion));
      // The same shape worked out by another analysis engine (the fit is the analysis module's).
      await markStored(S2);
      await t.dataSource.manager.update(
        TemperatureSystemRow,
        { systemName: S2 },
        { answersFormat: `${ANSWERS_FORMAT}@0.0.0+000000000000` },
      );
      expect((await systemOf(S2)).note).toBe("van 't Hoff fit over 3 batches at 3 temperatures (1:1).");
    });

    it('does not store answers worked out before a change that came in meanwhile', async () => {
      const row = await rowOf(S2);
      const answers = JSON.parse(row.answersJson!) as SystemAnswers;
      await storeHeadline(
        (await t.dataSource.manager.findOneByOrFail(Batch, { systemName: S2, temperatureC: 15 })).id,
        { ...plan('S2', [310, 0, 0])[0]! },
      );
      // Answers of the generation before the change: not stored, the row stays stale.
      await new TemperatureSystemStore(t.dataSource).save(S2, row.generation, row.answersFormat!, {
        ...answers,
        approved: { ...answers.approved, note: 'too old' },
      });
      const after = await rowOf(S2);
      expect(after.generation).toBe(row.generation + 1);
      expect(after.answersGeneration).toBe(row.generation);
      expect((await systemOf(S2)).groups[0]!.kGeometricMean).toBeCloseTo(310, 9);
    });

    it('after a batch change, works the stale answers out in the background before anyone reads them', async () => {
      await systemOf(S1);
      await storeHeadline(s1[1]!, { ...plan('S1', [0, 1050, 0])[1]! });
      t.events.publish('batch.updated', { id: s1[1]! });
      const deadline = Date.now() + 10_000;
      let row = await rowOf(S1);
      while (row.answersGeneration !== row.generation && Date.now() < deadline) {
        await new Promise((resolve) => setTimeout(resolve, 50));
        row = await rowOf(S1);
      }
      expect(row.answersGeneration).toBe(row.generation);
      const stored = JSON.parse(row.answersJson!) as SystemAnswers;
      expect(stored.approved.groups.find((g) => g.temperatureC === 25)!.kGeometricMean).toBeCloseTo(1050, 9);
    });

    it('when the migration makes the rows again, every system is there and answers the same', async () => {
      const before = [await systemOf(S1), await systemOf(S2, true)];
      await t.dataSource.undoLastMigration();
      await t.dataSource.runMigrations();
      const row = await rowOf(S1);
      expect(row).toMatchObject({ generation: 1, answersGeneration: null, answersJson: null });
      expect([await systemOf(S1), await systemOf(S2, true)]).toEqual(before);
    });
  });
});
