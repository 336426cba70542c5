import { parse } from 'csv-parse/sync';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { extractPdfText } from '../../testing/pdf-text';
import { type AnalysedBatch, createAnalysedBatch } from './analysed-batch';

// Molar mass of iron: the IUPAC (CIAAW) standard atomic weight of Fe, 55.845 g/mol (from memory).
const FE_G_PER_MOL = 55.845;

/** The "Unknowns and controls" table of a results CSV: its header and rows. */
function unknownsTable(csv: string): { header: string[]; rows: string[][] } {
  const rows = parse(csv, { bom: true, relax_column_count: true }) as string[][];
  const start = rows.findIndex((r) => r.length === 1 && r[0] === 'Unknowns and controls');
  const header = rows[start + 1];
  const end = rows.findIndex((r, i) => i > start + 1 && (r.length <= 1 || r[0] === ''));
  return { header, rows: rows.slice(start + 2, end < 0 ? undefined : end) };
}

describe('the batch concentration unit in reports', () => {
  let t: TestApp;
  let batch: AnalysedBatch;

  beforeAll(async () => {
    t = await startTestApp();
    batch = await createAnalysedBatch(t, { name: 'Iron series in units' });
    await batch.ingest();
  }, 30_000);
  afterAll(() => t.stop());

  const resultsCsv = async (): Promise<string> => {
    const res = await (
      await t.agent('scientist')
    ).get(`/api/batches/${batch.batchId}/export.csv?content=results`);
    expect(res.status).toBe(200);
    return res.text;
  };

  it('when a lab switches a batch to mg/L, then the report header and values follow (1 mg/L Fe = 17.9 µmol/L)', async () => {
    const before = unknownsTable(await resultsCsv());
    expect(before.header).toContain('concentration_M');
    const cBefore = before.header.indexOf('concentration_M');
    const molar = Number(before.rows[0][cBefore]);
    expect(molar).toBeGreaterThan(0);

    const scientist = await t.agent('scientist');
    const refused = await scientist
      .put(`/api/batches/${batch.batchId}/settings`)
      .send({ settings: { concentrationUnit: 'mg/L' }, reason: 'report as the water lab does' });
    expect(refused.status).toBe(400);
    expect(refused.body.error.message).toMatch(/molar mass/);

    const saved = await scientist.put(`/api/batches/${batch.batchId}/settings`).send({
      settings: { concentrationUnit: 'mg/L', molarMassGPerMol: FE_G_PER_MOL, recoveryLimitsPct: [95, 105] },
      reason: 'report as the water lab does',
    });
    expect(saved.status).toBe(200);
    expect(saved.body.settings).toMatchObject({
      concentrationUnit: 'mg/L',
      molarMassGPerMol: FE_G_PER_MOL,
      recoveryLimitsPct: [95, 105],
    });

    const csv = await resultsCsv();
    const after = unknownsTable(csv);
    expect(after.header).not.toContain('concentration_M');
    const c = after.header.indexOf('concentration_mg_per_L');
    expect(c).toBeGreaterThan(0);
    expect(after.header).toContain('se_mg_per_L');
    // mg/L = mol/L × g/mol × 1000 mg/g (the CSV rounds to the value's significance).
    expect(Number(after.rows[0][c])).toBeCloseTo(molar * FE_G_PER_MOL * 1000, 2);
    expect(csv).toContain('# concentration_unit,"mg/L"');
    expect(csv).toContain('# recovery_limits_pct,"95-105"');

    const pdf = await scientist
      .get(`/api/batches/${batch.batchId}/report.pdf`)
      .buffer(true)
      .parse((res, callback) => {
        const chunks: Buffer[] = [];
        res.on('data', (chunk: Buffer) => chunks.push(chunk));
        res.on('end', () => callback(null, Buffer.concat(chunks)));
      });
    const text = await extractPdfText(pdf.body as Buffer);
    expect(text).toContain('mg/L (molar mass 55.845 g/mol)');
    expect(text).toContain('95–105 %');
  });
});
