import { parse } from 'csv-parse/sync';
import ExcelJS from 'exceljs';
import request from 'supertest';
import type { BatchAnalysisDto } from '../../batches/batches.service';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { extractPdfText } from '../../testing/pdf-text';
import { guidanceFor } from '../../analysis';
import { formatNumber } from '../../analysis/number-format';
import { buildBatchReport } from '../batch-report';
import { renderReportPdf } from '../pdf/render-pdf';
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
      // K to the second significant digit of its standard error (GUM, JCGM 100:2008 §7.2.6), worked out
      // here by hand rather than through the product's number format.
      const k = best.fit!.k!;
      // (the product keeps between 2 and 6 digits)
      const kDigits = Math.min(
        6,
        Math.max(2, Math.floor(Math.log10(k)) - Math.floor(Math.log10(best.fit!.kSe!)) + 2),
      );
      expect(stoichRow[header.indexOf('K')]).toBe(String(Number(k.toPrecision(kDigits))));
      expect(Math.abs(Number(stoichRow[header.indexOf('K')]) - k)).toBeLessThan(best.fit!.kSe! / 2);
      // The same K, unit and text as the page, the PDF and the mails.
      expect(stoichRow[header.indexOf('K_unit')]).toBe('L·mol⁻¹');
      expect(stoichRow[header.indexOf('K_text')]).toBe(analysis.result.headline!.text);
      const positionsHeader = rows.find((r) => r[0] === 'position')!;
      expect(positionsHeader).toEqual(expect.arrayContaining(['absorbance_raw', 'absorbance_corrected']));
    });

    it('when the results are exported then the batch details lead as # key,value lines a comment-aware reader skips', async () => {
      const res = await (
        await t.agent('scientist')
      ).get(`/api/batches/${batch.batchId}/export.csv?content=results`);
      const text = res.text.replace(/^\uFEFF/, '');
      const lines = text.split('\r\n');
      const lead = lines.slice(0, lines.indexOf(''));
      expect(lead[0]).toBe('# Equilight batch results');
      expect(lead.every((l) => l.startsWith('# '))).toBe(true);
      const details = Object.fromEntries(
        (
          parse(
            lead
              .slice(1)
              .map((l) => l.slice(2))
              .join('\n'),
          ) as string[][]
        ).map(([k, v]) => [k, v]),
      );
      expect(details).toMatchObject({
        batch_id: String(batch.batchId),
        run_id: analysis.batch.runId,
        wavelength_nm: String(analysis.result.wavelengthNm),
        temperature_C: '25',
        calibration_model: analysis.batch.settings.calibrationModel,
        engine_version: t.services.batches.engineVersion,
      });
      // A reader told that # starts a comment sees only the tables.
      const tables = parse(res.text, {
        bom: true,
        comment: '#',
        relax_column_count: true,
        skip_empty_lines: true,
      }) as string[][];
      expect(tables[0]).toEqual(['Positions']);
    });

    it('when the results are exported then numbers carry their significance and AIC is named one way', async () => {
      const res = await (
        await t.agent('scientist')
      ).get(`/api/batches/${batch.batchId}/export.csv?content=results`);
      const rows = parse(res.text, { bom: true, comment: '#', relax_column_count: true }) as string[][];
      // No binary noise such as 0.30000000000000004: at most 6 significant digits in any number.
      for (const row of rows)
        for (const cell of row) {
          if (cell === '' || Number.isNaN(Number(cell)) || /^(true|false)$/.test(cell)) continue;
          // Significant digits: no sign, exponent or leading zeros; an integer's trailing zeros only place it.
          let mantissa = cell.replace(/^-/, '').replace(/e.*$/, '');
          if (!mantissa.includes('.')) mantissa = mantissa.replace(/0+$/, '');
          mantissa = mantissa.replace('.', '').replace(/^0+/, '');
          expect(`${cell}: ${mantissa.length}`).toBe(`${cell}: ${Math.min(mantissa.length, 6)}`);
        }
      const header = rows.find((r) => r[0] === 'model' && r.includes('K_unit'))!;
      expect(header).toEqual(expect.arrayContaining(['AIC', 'delta_AIC', 'akaike_weight']));
      expect(header.filter((h) => /aic/i.test(h))).toEqual(['AIC', 'delta_AIC']);
    });

    it("when samples have QC findings then each sample's row and each position's row lists its own", async () => {
      const scientist = await t.agent('scientist');
      const url = `/api/batches/${batch.batchId}/export.csv?content=results`;
      // A replicate CV limit no duplicate meets: every unknown's pair is flagged.
      const strict = await scientist
        .put(`/api/batches/${batch.batchId}/settings`)
        .send({ settings: { replicateCvMax: 0.00001 }, reason: 'test: flag every replicate group' });
      expect(strict.status).toBe(200);
      try {
        const flagged = await t.services.batches.analysis(batch.batchId);
        const rows = parse((await scientist.get(url)).text, {
          bom: true,
          comment: '#',
          relax_column_count: true,
        }) as string[][];
        const unknownsHeader = rows.find((r) => r[0] === 'sample_id' && r.includes('concentration_M'))!;
        const positionsHeader = rows.find((r) => r[0] === 'position' && r.includes('qc'))!;
        const unknownRow = (id: string) =>
          rows.find((r) => r[0] === id && r[1] === 'unknown' && r.length === unknownsHeader.length)!;
        const positionRow = (p: string) =>
          rows.find((r) => r[0] === p && r.length === positionsHeader.length)!;
        const own = flagged.result.qc.filter(
          (f) =>
            f.code === 'replicate-cv-high' && flagged.result.unknowns.some((u) => u.sampleId === f.sampleId),
        );
        expect(own.length).toBe(flagged.result.unknowns.length);
        for (const f of own) {
          expect(unknownRow(f.sampleId!)[unknownsHeader.indexOf('flags')].split(' ')).toContain(f.code);
          for (const p of f.position!.split(' '))
            expect(positionRow(p)[positionsHeader.indexOf('qc')].split(' ')).toContain(f.code);
        }
        // The QC table keeps position and sample id in their own columns.
        const qcHeader = rows.find((r) => r[0] === 'severity' && r.includes('code'))!;
        const qcRows = rows.filter((r) => r.length === qcHeader.length && r[1] === 'replicate-cv-high');
        expect(
          qcRows.map((r) => [r[qcHeader.indexOf('position')], r[qcHeader.indexOf('sample_id')]]),
        ).toEqual(own.map((f) => [f.position, f.sampleId]));
        // A sample without findings keeps an empty cell.
        expect(positionRow('C3')[positionsHeader.indexOf('qc')]).toBe('');
      } finally {
        await scientist
          .put(`/api/batches/${batch.batchId}/settings`)
          .send({ settings: { replicateCvMax: 0.05 }, reason: 'test: back to the default limit' });
      }
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

  describe('XLSX export', () => {
    it('when anyone signed in downloads the workbook then exceljs reads the sheets back with K as a number', async () => {
      const res = await (
        await t.agent('scientist')
      )
        .get(`/api/batches/${batch.batchId}/report.xlsx`)
        .buffer(true)
        .parse(binary);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe(
        'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      );
      expect(res.headers['content-disposition']).toBe(
        `attachment; filename="batch-${batch.batchId}-report.xlsx"`,
      );
      const workbook = new ExcelJS.Workbook();
      await workbook.xlsx.load(res.body as unknown as ArrayBuffer);
      expect(workbook.worksheets.map((ws) => ws.name)).toEqual(
        expect.arrayContaining([
          'Batch',
          'Positions',
          'Calibration',
          'Unknowns and controls',
          'Mixtures',
          'ICE tables',
          'Stoichiometry',
          'QC flags',
          'Files',
        ]),
      );
      const details = workbook.getWorksheet('Batch')!;
      const detail = (key: string) => {
        let value: unknown;
        details.eachRow((row) => {
          if (row.getCell(1).value === key) value = row.getCell(3).value;
        });
        return value;
      };
      expect(detail('run_id')).toBe(analysis.batch.runId);
      expect(detail('wavelength_nm')).toBe(analysis.result.wavelengthNm);
      const sheet = workbook.getWorksheet('Stoichiometry')!;
      const header = (sheet.getRow(1).values as unknown[]).slice(1);
      const kCol = header.indexOf('K') + 1;
      let k: unknown;
      sheet.eachRow((row, n) => {
        if (n > 1 && row.getCell(1).value === '1:1') k = row.getCell(kCol).value;
      });
      const fit = analysis.result.stoichiometry!.candidates.find((c) => c.model === '1:1')!.fit!;
      expect(typeof k).toBe('number');
      // Within half its standard error of the fitted K: rounded, not changed.
      expect(Math.abs((k as number) - fit.k!)).toBeLessThan(fit.kSe! / 2);
      // The same K as the CSV's.
      const csv = await (
        await t.agent('scientist')
      ).get(`/api/batches/${batch.batchId}/export.csv?content=results`);
      const rows = parse(csv.text, { bom: true, comment: '#', relax_column_count: true }) as string[][];
      const csvHeader = rows.find((r) => r[0] === 'model' && r.includes('K_unit'))!;
      expect(
        Number(rows.find((r) => r[0] === '1:1' && r.length === csvHeader.length)![csvHeader.indexOf('K')]),
      ).toBe(k);
    });

    it('when signed out then 401; when the batch does not exist then 404', async () => {
      expect((await request(t.app).get(`/api/batches/${batch.batchId}/report.xlsx`)).status).toBe(401);
      expect((await (await t.agent('scientist')).get('/api/batches/9999/report.xlsx')).status).toBe(404);
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
    }, 30_000);

    it('when the batch is not approved yet then the report says so, and has the ICE tables, the Job plot and QC in words', async () => {
      const report = await t.services.batches.analysis(batch.batchId);
      const text = extractPdfText(
        await renderReportPdf(buildBatchReport({ analysis: report, trail: [] }), { compress: false }),
      ).replace(/\s+/g, ' ');
      expect(text).toContain('Review and approval');
      expect(text).toContain('not yet approved');
      expect(text).toContain('ICE tables');
      // One ICE row per mixture and candidate: the first mixture's 1:1 K as the mixtures table states it.
      const first = report.result.mixtures[0];
      const ice = first.ice.find((r) => r.model === '1:1')!;
      expect(ice.feasible).toBe(true);
      expect(text).toContain(formatNumber(ice.aFreeM));
      expect(text).toContain("Job's method");
      if (report.result.job)
        expect(text).toContain(`maximum at x(B) = ${report.result.job.maxMoleFractionB!.toFixed(3)}`);
      for (const f of report.result.qc) expect(text).toContain(guidanceFor(f.code).title);
      // Codes are said in words, not shown bare.
      for (const f of report.result.qc) expect(text).not.toContain(f.code);
    }, 30_000);

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
      const pdf = await renderReportPdf(buildBatchReport({ analysis: fresh, trail }), { compress: false });
      const raw = pdf.toString('latin1');
      expect(raw).not.toMatch(/FlateDecode/);
      const text = extractPdfText(pdf);
      expect(text).toContain('Review and approval trail');
      expect(text).toContain('Checked against the bench log.');
      expect(text).toContain(`Approved by ${fresh.record!.approvedBy}`);
      expect(text).not.toContain('not yet approved');
      expect(text).toContain('open -> reviewed');
      expect(text).toContain('ε ± SE');
      expect(text).toMatch(/C1 B/); // the layout map labels cuvettes with their role
    }, 30_000);
  });
});
