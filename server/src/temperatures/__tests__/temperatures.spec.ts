import fs from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { GAS_CONSTANT_J_PER_MOL_K, mixtureInitialConcentrations, solveOneToOne } from '../../analysis';
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

describe("K across temperatures (van 't Hoff)", () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.stop());

  it('recovers ΔH° and ΔS° of a synthetic system from approved batches at 15, 25 and 35 °C (round trip)', async () => {
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
    const entity = await t.services.instruments.get(profile.id);
    const actor = { id: 2, email: 'manager@equilight.test' };
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
      actor,
    );
    const manifest = await t.services.manifests.create(
      'Series T samples',
      { layoutId: layout.id, file: { buffer: MANIFEST, originalName: 'm.csv' } },
      false,
      actor,
    );
    for (const [i, temperatureC] of [15, 25, 35].entries()) {
      const batch = await t.services.batches.create(
        {
          name: `Series T at ${temperatureC} °C`,
          profileId: profile.id,
          layoutId: layout.id,
          manifestId: manifest.id,
          runId: `T-${i}`,
          expectedFiles: 1,
          systemName: 'Invented complex',
          temperatureC,
          settings: { candidates: ['1:1', '1:2'] },
        },
        actor,
      );
      const receipt = await t.services.ingest.receive({
        content: Buffer.from(readingsCsv(temperatureC)),
        originalName: `T-${i}.csv`,
        profile: entity,
        source: 'upload',
      });
      expect((await settled(t, receipt.id)).status).toBe('stored');
      if (i < 2) {
        await t.services.batches.review(batch.id, actor);
        await t.services.batches.approve(batch.id, 'checked', actor);
      }
    }
    const scientist = await t.agent('scientist');
    const approvedOnly = (await scientist.get('/api/temperatures')).body;
    expect(approvedOnly).toHaveLength(1);
    expect(approvedOnly[0].points.map((p: { excludedBecause: string | null }) => p.excludedBecause)).toEqual([
      null,
      null,
      'not approved yet',
    ]);
    expect(approvedOnly[0].vantHoff.n).toBe(2);

    // The open batch's K is its stored summary, written once its analysis has run in the background.
    await t.services.batches.summariesIdle();
    const all = (await scientist.get('/api/temperatures?includeUnapproved=true')).body[0];
    expect(all.model).toBe('1:1');
    for (const p of all.points) expect(p.k).toBeCloseTo(kAt(p.temperatureC), 3);
    // The data were made from ΔH° and ΔS°; the fit over three temperatures must give them back.
    expect(all.vantHoff.deltaHJPerMol).toBeCloseTo(DELTA_H, 0);
    expect(all.vantHoff.deltaSJPerMolK).toBeCloseTo(DELTA_S, 2);
    expect(all.vantHoff.r2).toBeCloseTo(1, 9);
  });
});
