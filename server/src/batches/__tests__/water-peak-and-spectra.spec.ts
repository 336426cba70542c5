import fs from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { createProfile, settled } from '../../ingest/__tests__/ingest-helpers';
import { createAnalysedBatch, SAMPLES_DIR } from '../../reports/__tests__/analysed-batch';
import { startTestApp, type TestApp } from '../../testing/test-app';

// A plate batch read near 977/900 nm takes each well's path length from the water peak; a batch read at
// many wavelengths gets the whole-spectrum analysis beside the single-wavelength one.

interface Analysis {
  wellPathLengths: { byPosition: Record<string, number>; kFactorPerCm: number; source: string } | null;
  settings: { pathLengthByPositionCm?: Record<string, number> };
  result: {
    headline: { model: string; k: number } | null;
    unknowns: { sampleId: string; concentrationM: number }[];
    positions: { position: string; pathLengthCm: number }[];
    warnings: string[];
  };
  spectral: {
    speciesCount: number;
    best: string;
    wavelengthsNm: number[];
    candidates: { model: string; k: number; kCi95: [number, number] }[];
  } | null;
  spectralError: string | null;
}

let seq = 0;

/** A batch of its own profile, layout and manifest; `ingest` stores one readings file into its run. */
async function makeBatch(
  t: TestApp,
  o: { plateFormat: '96' | 'cuvette'; manifestCsv: string; wavelengthNm: number },
): Promise<{ id: number; ingest: (csv: string) => Promise<void> }> {
  const n = ++seq;
  const admin = await t.agent('admin');
  const manager = await t.agent('lab_manager');
  const profile = await createProfile(admin, {
    name: `Water-peak bench ${n}`,
    kind: o.plateFormat === 'cuvette' ? 'cuvette_spectrophotometer' : 'plate_reader',
    plateFormat: o.plateFormat,
    fileFormat: 'long_table',
    dropSubfolder: `water-bench-${n}`,
    fileNamePattern: '^(?<run>WP-\\d+)',
    pathLengthCm: 1,
    defaultWavelengthNm: o.wavelengthNm,
  });
  const rows = parse(o.manifestCsv, { columns: true }) as {
    position: string;
    role: string;
    replicate_group: string;
  }[];
  const layout = await manager.post('/api/layouts').send({
    name: `Water-peak layout ${n}`,
    format: o.plateFormat,
    ...(o.plateFormat === 'cuvette' ? { cuvetteCount: rows.length } : {}),
    positions: rows.map((r) => ({
      position: r.position,
      role: r.role,
      ...(r.replicate_group ? { replicateGroup: r.replicate_group } : {}),
    })),
  });
  if (layout.status !== 201) throw new Error(`layout: ${JSON.stringify(layout.body)}`);
  const manifest = await manager
    .post('/api/manifests')
    .field('layoutId', String(layout.body.id))
    .field('name', `Water-peak manifest ${n}`)
    .attach('file', Buffer.from(o.manifestCsv), 'manifest.csv');
  if (manifest.status !== 201) throw new Error(`manifest: ${JSON.stringify(manifest.body)}`);
  const runId = `WP-${n}`;
  const batch = await manager.post('/api/batches').send({
    name: `Water-peak batch ${n}`,
    profileId: profile.profile.id,
    layoutId: layout.body.id,
    manifestId: manifest.body.id,
    runId,
    expectedFiles: 1,
    temperatureC: 25,
  });
  if (batch.status !== 201) throw new Error(`batch: ${JSON.stringify(batch.body)}`);
  return {
    id: batch.body.id,
    async ingest(csv: string) {
      const res = await request(t.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${profile.token}`)
        .attach('file', Buffer.from(csv), `${runId}_readings.csv`);
      const file = await settled(t, res.body.id, 30_000);
      if (file.status !== 'stored') throw new Error(`file ${file.status}: ${file.error}`);
    },
  };
}

/** Cuvette Cn of the demo series → well n of a 96-well plate, row by row (C1 → A1, C13 → B1). */
const wellOf = (cuvette: string): string => {
  const i = Number(cuvette.slice(1)) - 1;
  return `${String.fromCharCode(65 + Math.floor(i / 12))}${(i % 12) + 1}`;
};

describe('batch analysis: water-peak path lengths and the whole-spectrum analysis', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  }, 60_000);
  afterAll(() => t.stop());

  it('derives each well’s path from A977 − A900 and gives the K and concentrations of the same solutions in 1 cm cuvettes', async () => {
    // Reference: the demo series read in 1 cm cuvettes.
    const cuvettes = await createAnalysedBatch(t);
    await cuvettes.ingest();
    const viewer = await t.agent('scientist');
    const ref = (await viewer.get(`/api/batches/${cuvettes.batchId}/analysis`)).body as Analysis;
    expect(ref.wellPathLengths).toBeNull();
    expect(ref.spectral).toBeNull();
    expect(ref.result.headline).not.toBeNull();

    // The same solutions in plate wells of different fill: Beer–Lambert A = εcl, so the sample's own
    // absorbance scales with each well's path l; the plate's background B does not. The water peak
    // gives l = (A977 − A900)/k with k = 0.18 per cm (the default; ../shared/reference/other_facts.json).
    const manifestCsv = fs
      .readFileSync(path.join(SAMPLES_DIR, 'manifest.csv'), 'utf8')
      .replace(/^C(\d+),/gm, (_m, d: string) => `${wellOf(`C${d}`)},`);
    const readings = parse(fs.readFileSync(path.join(SAMPLES_DIR, 'readings.csv')), {
      columns: true,
    }) as { position: string; absorbance: string }[];
    const manifestRows = parse(manifestCsv, { columns: true }) as { position: string; role: string }[];
    const blanks = manifestRows.filter((r) => r.role === 'blank').map((r) => r.position);
    const blankMean =
      readings
        .filter((r) => blanks.includes(wellOf(r.position)))
        .reduce((s, r) => s + Number(r.absorbance), 0) / blanks.length;
    const B = 0.041;
    const paths: Record<string, number> = {};
    const lines = ['position,wavelength_nm,absorbance'];
    readings.forEach((r, i) => {
      const well = wellOf(r.position);
      // Blanks share one fill (their mean stays B); the others range over 0.42–0.60 cm.
      const l = blanks.includes(well) ? 0.5 : 0.42 + 0.02 * (i % 10);
      paths[well] = l;
      lines.push(`${well},640,${B + (Number(r.absorbance) - blankMean) * l}`);
      lines.push(`${well},977,${0.05 + 0.18 * l}`);
      lines.push(`${well},900,0.05`);
    });
    const plate = await makeBatch(t, { plateFormat: '96', manifestCsv, wavelengthNm: 640 });
    await plate.ingest(lines.join('\n') + '\n');
    const out = (await viewer.get(`/api/batches/${plate.id}/analysis`)).body as Analysis;

    expect(out.wellPathLengths).not.toBeNull();
    expect(out.wellPathLengths!.source).toBe('water peak');
    expect(Object.keys(out.wellPathLengths!.byPosition).sort()).toEqual(Object.keys(paths).sort());
    for (const [well, l] of Object.entries(paths)) {
      expect(out.wellPathLengths!.byPosition[well]).toBeCloseTo(l, 10);
      expect(out.result.positions.find((p) => p.position === well)!.pathLengthCm).toBeCloseTo(l, 10);
    }
    expect(out.settings.pathLengthByPositionCm).toEqual(out.wellPathLengths!.byPosition);
    expect(out.result.warnings.join('\n')).toMatch(/path lengths of 30 well\(s\) from the water peak/);
    expect(out.spectral).toBeNull(); // three wavelengths: no whole-spectrum analysis

    // K and concentrations as in 1 cm cuvettes.
    expect(out.result.headline!.model).toBe(ref.result.headline!.model);
    expect(out.result.headline!.k).toBeCloseTo(ref.result.headline!.k, 6);
    expect(out.result.unknowns.map((u) => u.concentrationM)).toEqual(
      ref.result.unknowns.map((u) => expect.closeTo(u.concentrationM, 12)),
    );
  }, 120_000);

  it('adds the whole-spectrum analysis to a batch read at many wavelengths', async () => {
    const manifestCsv = fs.readFileSync(path.join(SAMPLES_DIR, 'spectra-manifest.csv'), 'utf8');
    const batch = await makeBatch(t, { plateFormat: 'cuvette', manifestCsv, wavelengthNm: 496 });
    await batch.ingest(fs.readFileSync(path.join(SAMPLES_DIR, 'spectra-long.csv'), 'utf8'));
    const out = (await (await t.agent('scientist')).get(`/api/batches/${batch.id}/analysis`))
      .body as Analysis;
    expect(out.spectralError).toBeNull();
    expect(out.spectral).not.toBeNull();
    const s = out.spectral!;
    expect(s.wavelengthsNm).toHaveLength(176);
    expect(s.speciesCount).toBe(3);
    expect(s.best).toBe('1:1');
    const fit = s.candidates.find((c) => c.model === '1:1')!;
    // The K the invented sample was generated with (scripts/make-spectral-samples.ts).
    expect(fit.kCi95[0]).toBeLessThan(2000);
    expect(fit.kCi95[1]).toBeGreaterThan(2000);

    // Approved, the batch answers with its record and still shows its whole spectra.
    const scientist = await t.agent('scientist');
    expect((await scientist.post(`/api/batches/${batch.id}/review`)).status).toBe(200);
    const approved = await (
      await t.agent('lab_manager')
    )
      .post(`/api/batches/${batch.id}/approve`)
      .send({ comment: 'Spectra checked.' });
    expect(approved.status).toBe(200);
    const after = (await scientist.get(`/api/batches/${batch.id}/analysis`)).body as Analysis & {
      record: unknown;
    };
    expect(after.record).not.toBeNull();
    expect(after.spectralError).toBeNull();
    expect(after.spectral).toEqual(out.spectral);
  }, 120_000);
});
