import { parse } from 'csv-parse/sync';
import request from 'supertest';
import type { BatchAnalysisDto } from '../../batches/batches.service';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { extractPdfText } from '../pdf-text';
import { renderBatchReport } from '../pdf-report';
import { formatNumber } from '../report-format';
import { type AnalysedBatch, createAnalysedBatch } from './analysed-batch';

/** supertest: collect a binary body as a Buffer. */
function binary(res: request.Response, callback: (err: Error | null, body: Buffer) => void): void {
  const chunks: Buffer[] = [];
  res.on('data', (chunk: Buffer) => chunks.push(chunk));
  res.on('end', () => callback(null, Buffer.concat(chunks)));
}

describe('batch reports', () => {
  let t: TestApp;
  let batch: AnalysedBatch;
  let analysis: BatchAnalysisDto;

  beforeAll(async () => {
    t = await startTestApp();
    batch = await createAnalysedBatch(t, { name: 'Iron(III) complex series, 25 °C' });
    await batch.ingest();
    analysis = await t.services.batches.analysis(batch.batchId);
    expect(analysis.result.stoichiometry?.best).toBe('1:1');
  }, 30_000);
  afterAll(() => t.stop());

  describe('CSV export', () => {
    it('when a scientist exports the readings then every reading comes with its file, hash, sample and role', async () => {
      const scientist = await t.agent('scientist');
      const res = await scientist.get(`/api/batches/${batch.batchId}/export.csv?content=readings`);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
      expect(res.headers['content-disposition']).toBe(
        `attachment; filename="batch-${batch.batchId}-readings.csv"`,
      );
      const rows = parse(res.text, { bom: true, columns: true }) as Record<string, string>[];
      expect(rows).toHaveLength(analysis.readings.length);
      const file = analysis.files[0];
      expect(rows[0]).toMatchObject({
        file: file.originalName,
        sha256: file.sha256,
        position: 'C1',
        wavelength_nm: '640',
        absorbance: '0.0388',
        sample_id: 'BLK-1',
        role: 'blank',
      });
    });

    it('when the results are exported then positions, unknowns, mixtures with K per candidate and the stoichiometry table are there', async () => {
      const res = await (
        await t.agent('lab_manager')
      ).get(`/api/batches/${batch.batchId}/export.csv?content=results`);
      expect(res.status).toBe(200);
      expect(res.headers['content-disposition']).toBe(
        `attachment; filename="batch-${batch.batchId}-results.csv"`,
      );
      const rows = parse(res.text, { bom: true, relax_column_count: true }) as string[][];
      const titles = rows.filter((r) => r.length === 1 && r[0] !== '').map((r) => r[0]);
      expect(titles).toEqual(
        expect.arrayContaining([
          'Positions',
          'Calibration',
          'Unknowns and controls',
          'Mixtures',
          'Stoichiometry',
          'QC flags',
        ]),
      );
      const mixturesHeader = rows.find((r) => r[0] === 'sample_id' && r.includes('mole_fraction_b'))!;
      expect(mixturesHeader).toEqual(expect.arrayContaining(['K_1:1', 'K_1:2', 'K_2:1']));
      const best = analysis.result.stoichiometry!.candidates.find((c) => c.model === '1:1')!;
      const stoichRow = rows.find((r) => r[0] === '1:1' && r.length > 10)!;
      const header = rows.find((r) => r[0] === 'model' && r.includes('K_unit'))!;
      expect(Number(stoichRow[header.indexOf('K')])).toBeCloseTo(best.fit!.k!, 6);
      // The same K, unit and text as the page, the PDF and the mails.
      expect(stoichRow[header.indexOf('K_unit')]).toBe('L·mol⁻¹');
      expect(stoichRow[header.indexOf('K_text')]).toBe(analysis.result.headline!.text);
      const positionsHeader = rows.find((r) => r[0] === 'position')!;
      expect(positionsHeader).toEqual(expect.arrayContaining(['absorbance_raw', 'absorbance_corrected']));
    });

    it('when a person typed a formula into an exclusion reason then the exported cell is defused', async () => {
      const scientist = await t.agent('scientist');
      const put = await scientist.put(`/api/batches/${batch.batchId}/settings`).send({
        settings: { exclusions: [{ position: 'C2', reason: '=HYPERLINK("http://x")' }] },
        reason: '@SUM(A1) looked off',
      });
      expect(put.status).toBe(200);
      const res = await scientist.get(`/api/batches/${batch.batchId}/export.csv?content=results`);
      expect(res.text).toContain(`"'=HYPERLINK(""http://x"")"`);
      const rows = parse(res.text, { bom: true, relax_column_count: true }) as string[][];
      const c2 = rows.find((r) => r[0] === 'C2')!;
      expect(c2).toContain(`'=HYPERLINK("http://x")`);
      for (const row of rows)
        for (const cell of row)
          if (cell !== '' && Number.isNaN(Number(cell))) expect(cell).not.toMatch(/^[=+\-@\t\r]/);
      // put it back for the other tests
      await scientist
        .put(`/api/batches/${batch.batchId}/settings`)
        .send({ settings: { exclusions: [] }, reason: 'undo the test exclusion' });
    });

    it('when the content is unknown then 400; when signed out then 401; when the batch does not exist then 404', async () => {
      const scientist = await t.agent('scientist');
      expect((await scientist.get(`/api/batches/${batch.batchId}/export.csv?content=secrets`)).status).toBe(
        400,
      );
      expect((await request(t.app).get(`/api/batches/${batch.batchId}/export.csv`)).status).toBe(401);
      const missing = await scientist.get('/api/batches/9999/export.csv');
      expect(missing.status).toBe(404);
      expect(missing.body.error.code).toBe('not_found');
    });
  });

  describe('PDF report', () => {
    it('when anyone signed in downloads the report then it is a PDF whose text has the batch name and K', async () => {
      const k = analysis.result.stoichiometry!.candidates.find((c) => c.model === '1:1')!.fit!.k!;
      for (const role of ['scientist', 'lab_manager', 'admin'] as const) {
        const res = await (
          await t.agent(role)
        )
          .get(`/api/batches/${batch.batchId}/report.pdf`)
          .buffer(true)
          .parse(binary);
        expect(res.status).toBe(200);
        expect(res.headers['content-type']).toBe('application/pdf');
        expect(res.headers['content-disposition']).toBe(
          `attachment; filename="batch-${batch.batchId}-report.pdf"`,
        );
        const pdf = res.body as Buffer;
        expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
        const text = extractPdfText(pdf);
        expect(text).toContain('Iron(III) complex series, 25 °C');
        expect(text).toContain(formatNumber(k));
        expect(text).toContain(analysis.result.stoichiometry!.verdict.split(';')[0]);
        expect(text).toContain(analysis.files[0].sha256);
        // The fonts travel inside the file.
        expect(pdf.toString('latin1')).toMatch(/\/FontFile2/);
        expect(pdf.toString('latin1')).toMatch(/NotoSans/);
      }
      expect((await request(t.app).get(`/api/batches/${batch.batchId}/report.pdf`)).status).toBe(401);
    });

    it('when the batch has been reviewed and approved then the trail and the approval are in the report', async () => {
      const scientist = await t.agent('scientist');
      const manager = await t.agent('lab_manager');
      expect((await scientist.post(`/api/batches/${batch.batchId}/review`)).status).toBe(200);
      expect(
        (
          await manager
            .post(`/api/batches/${batch.batchId}/approve`)
            .send({ comment: 'Checked against the bench log.' })
        ).status,
      ).toBe(200);
      const fresh = await t.services.batches.analysis(batch.batchId);
      const trail = (
        await t.services.audit.list({ entity: 'batch', entityId: batch.batchId })
      ).items.reverse();
      const pdf = await renderBatchReport({ analysis: fresh, trail }, { compress: false });
      const raw = pdf.toString('latin1');
      expect(raw).not.toMatch(/FlateDecode/);
      const text = extractPdfText(pdf);
      expect(text).toContain('Review and approval trail');
      expect(text).toContain('Checked against the bench log.');
      expect(text).toContain('open -> reviewed');
      expect(text).toContain('ε ± SE');
      expect(text).toMatch(/C1 B/); // the layout map labels cuvettes with their role
    });
  });
});
