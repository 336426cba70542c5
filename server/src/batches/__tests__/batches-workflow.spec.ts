import fs from 'node:fs';
import path from 'node:path';
import ExcelJS from 'exceljs';
import request from 'supertest';
import { parse } from 'csv-parse/sync';
import { FIXTURES } from '../../parsers/__tests__/load-fixture';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { LONG_TABLE_PROFILE, createProfile, settled } from '../../ingest/__tests__/ingest-helpers';

const MANIFEST_DIR = path.join(FIXTURES, 'manifest');
const SAMPLES_DIR = path.resolve(__dirname, '../../../../samples/analysis');

/** The layout that matches the good-full.csv manifest fixture. */
const PLATE_POSITIONS = [
  { position: 'A1', role: 'blank', replicateGroup: 'blk' },
  { position: 'A2', role: 'blank', replicateGroup: 'blk' },
  { position: 'B1', role: 'standard' },
  { position: 'B2', role: 'standard' },
  { position: 'C1', role: 'unknown' },
  { position: 'C2', role: 'unknown' },
  { position: 'D1', role: 'mixture' },
  { position: 'D2', role: 'mixture' },
  { position: 'E1', role: 'control' },
];

/** The same table as an XLSX workbook (cells as text, as a person would type them). */
async function csvToXlsx(csv: Buffer): Promise<Buffer> {
  const rows = parse(csv.toString('utf8').replace(/^\uFEFF/, ''), {
    relax_column_count: true,
    relax_quotes: true,
    delimiter: [',', ';', '\t'],
  }) as string[][];
  const workbook = new ExcelJS.Workbook();
  const sheet = workbook.addWorksheet('manifest');
  for (const row of rows) sheet.addRow(row);
  return Buffer.from(await workbook.xlsx.writeBuffer());
}

describe('layouts, manifests and batches', () => {
  let t: TestApp;
  let layoutId: number;
  let manifestId: number;
  let profileId: number;
  let token: string;

  beforeAll(async () => {
    t = await startTestApp();
    const manager = await t.agent('lab_manager');
    const layout = await manager
      .post('/api/layouts')
      .send({ name: 'Plate map K-1', format: '96', positions: PLATE_POSITIONS });
    expect(layout.status).toBe(201);
    layoutId = layout.body.id;
    const created = await createProfile(await t.agent('admin'));
    profileId = created.profile.id;
    token = created.token;
  });
  afterAll(() => t.stop());

  describe('layouts', () => {
    it('when a scientist tries to create a layout then 403; reading is allowed', async () => {
      const scientist = await t.agent('scientist');
      expect(
        (await scientist.post('/api/layouts').send({ name: 'x', format: '96', positions: [] })).status,
      ).toBe(403);
      expect((await scientist.get(`/api/layouts/${layoutId}`)).status).toBe(200);
      expect((await (await t.agent()).get('/api/layouts')).status).toBe(401);
    });

    it('editing makes a new version and keeps the old one', async () => {
      const manager = await t.agent('lab_manager');
      const created = await manager
        .post('/api/layouts')
        .send({ name: 'Versioned', format: '96', positions: [{ position: 'A1', role: 'blank' }] });
      const edited = await manager.put(`/api/layouts/${created.body.id}`).send({
        positions: [
          { position: 'A1', role: 'blank' },
          { position: 'A2', role: 'standard' },
        ],
        reason: 'add a standard',
      });
      expect(edited.body).toMatchObject({ version: 2, currentVersion: 2, positionCount: 2 });
      const v1 = await manager.get(`/api/layouts/${created.body.id}/versions/1`);
      expect(v1.body.positions).toEqual([{ position: 'A1', role: 'blank' }]);
      expect(v1.body.versions.map((v: { version: number }) => v.version)).toEqual([1, 2]);
    });

    it.each([
      [
        'a well off a 96-well plate',
        { format: '96', positions: [{ position: 'P24', role: 'blank' }] },
        /P24 is not a position of a 96-well plate/,
      ],
      [
        'the same well twice',
        {
          format: '96',
          positions: [
            { position: 'A1', role: 'blank' },
            { position: 'a1', role: 'unknown' },
          ],
        },
        /A1 is listed twice/,
      ],
      [
        'a cuvette beyond the count',
        { format: 'cuvette', cuvetteCount: 3, positions: [{ position: 'C4', role: 'blank' }] },
        /C4 is beyond the 3 cuvettes/,
      ],
      [
        'an unknown role',
        { format: '96', positions: [{ position: 'A1', role: 'sample' }] },
        /role: must be one of blank/,
      ],
      ['a cuvette sequence without a count', { format: 'cuvette', positions: [] }, /cuvetteCount/],
    ])('refuses %s', async (_label, body, message) => {
      const res = await (
        await t.agent('lab_manager')
      )
        .post('/api/layouts')
        .send({ name: `Bad ${Math.random()}`, ...body });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(message);
    });
  });

  describe('manifests', () => {
    it('checks a good CSV against its layout: no problem, no mismatch', async () => {
      const res = await (
        await t.agent('lab_manager')
      )
        .post('/api/manifests/check')
        .field('layoutId', String(layoutId))
        .attach('file', fs.readFileSync(path.join(MANIFEST_DIR, 'good-full.csv')), 'good-full.csv');
      expect(res.status).toBe(200);
      expect(res.body).toMatchObject({ source: 'csv', problems: [], mismatches: [], layoutVersion: 1 });
      expect(res.body.samples).toHaveLength(9);
    });

    it('reads the same manifest from XLSX to the same samples', async () => {
      const manager = await t.agent('lab_manager');
      const csv = fs.readFileSync(path.join(MANIFEST_DIR, 'good-full.csv'));
      const fromCsv = await manager
        .post('/api/manifests/check')
        .field('layoutId', String(layoutId))
        .attach('file', csv, 'm.csv');
      const fromXlsx = await manager
        .post('/api/manifests/check')
        .field('layoutId', String(layoutId))
        .attach('file', await csvToXlsx(csv), 'm.xlsx');
      expect(fromXlsx.body.source).toBe('xlsx');
      expect(fromXlsx.body.samples).toEqual(fromCsv.body.samples);
    });

    const broken = fs.readdirSync(MANIFEST_DIR).filter((f) => f.startsWith('bad-'));

    it('has a corpus of at least 15 broken manifests', () => {
      expect(broken.length).toBeGreaterThanOrEqual(15);
    });

    // A row with too few cells is only broken in CSV: in a spreadsheet its trailing cells are just empty.
    const brokenInXlsx = broken.filter((f) => f !== 'bad-ragged-row.csv');

    it.each([...broken.map((f) => [f, 'csv'] as const), ...brokenInXlsx.map((f) => [f, 'xlsx'] as const)])(
      '%s as %s: every problem listed with its row and column, nothing saved',
      async (file, kind) => {
        const manager = await t.agent('lab_manager');
        const csv = fs.readFileSync(path.join(MANIFEST_DIR, file));
        const content = kind === 'csv' ? csv : await csvToXlsx(csv);
        const name = file.replace(/\.csv$/, `.${kind}`);
        const check = await manager
          .post('/api/manifests/check')
          .field('layoutId', String(layoutId))
          .attach('file', content, name);
        expect(check.status).toBe(200);
        expect(check.body.problems.length).toBeGreaterThan(0);
        for (const p of check.body.problems) {
          expect(p).toEqual({
            row: expect.any(Number),
            column: expect.any(String),
            message: expect.any(String),
          });
          expect(p.message.length).toBeGreaterThan(10);
        }
        const save = await manager
          .post('/api/manifests')
          .field('layoutId', String(layoutId))
          .field('name', `Broken ${kind} ${file}`)
          .attach('file', content, name);
        expect(save.status).toBe(400);
        expect(save.body.error.code).toBe('invalid_manifest');
        expect(save.body.error.details.problems).toEqual(check.body.problems);
        const list = await manager.get('/api/manifests');
        expect(list.body.map((m: { name: string }) => m.name)).not.toContain(`Broken ${kind} ${file}`);
      },
    );

    it('lists mismatches with the layout before saving, and saves only when they are accepted', async () => {
      const manager = await t.agent('lab_manager');
      const rows = [
        { position: 'A1', sample_id: 'BLK', role: 'blank' },
        { position: 'A2', sample_id: 'BLK', role: 'blank' },
        { position: 'B1', sample_id: 'S1', role: 'unknown' },
        { position: 'H12', sample_id: 'X', role: 'control' },
      ];
      const check = await manager.post('/api/manifests/check').send({ layoutId, rows });
      expect(check.body.problems).toEqual([]);
      const messages = check.body.mismatches.map((m: { message: string }) => m.message).join('\n');
      expect(messages).toMatch(/B1: the layout has a standard here but the manifest says unknown/);
      expect(messages).toMatch(/H12 \(X\) is not a used position of layout "Plate map K-1"/);
      expect(messages).toMatch(/B2: the layout has a standard here but the manifest has no sample for it/);
      const refused = await manager.post('/api/manifests').send({ layoutId, rows, name: 'Mismatched' });
      expect(refused.status).toBe(409);
      expect(refused.body.error.code).toBe('manifest_mismatch');
      const accepted = await manager
        .post('/api/manifests')
        .send({ layoutId, rows, name: 'Mismatched', acceptMismatches: true });
      expect(accepted.status).toBe(201);
    });

    it('saves a manifest, versions an edit, and a scientist cannot edit', async () => {
      const manager = await t.agent('lab_manager');
      const csv = fs.readFileSync(path.join(MANIFEST_DIR, 'good-full.csv'));
      const created = await manager
        .post('/api/manifests')
        .field('layoutId', String(layoutId))
        .field('name', 'Run K-1 samples')
        .attach('file', csv, 'k1.csv');
      expect(created.status).toBe(201);
      manifestId = created.body.id;
      const edited = await manager
        .put(`/api/manifests/${manifestId}`)
        .field('layoutId', String(layoutId))
        .field('reason', 'corrected a standard')
        .attach('file', Buffer.from(csv.toString().replace('2.0e-5', '2.5e-5')), 'k1-fixed.csv');
      expect(edited.body).toMatchObject({ version: 2, currentVersion: 2 });
      expect(edited.body.samples.find((s: { position: string }) => s.position === 'B1').concentrationM).toBe(
        2.5e-5,
      );
      const v1 = await manager.get(`/api/manifests/${manifestId}/versions/1`);
      expect(v1.body.samples.find((s: { position: string }) => s.position === 'B1').concentrationM).toBe(
        2e-5,
      );
      const scientist = await t.agent('scientist');
      expect((await scientist.put(`/api/manifests/${manifestId}`).send({ layoutId, rows: [] })).status).toBe(
        403,
      );
    });

    it('refuses a file type a manifest cannot be', async () => {
      const res = await (
        await t.agent('lab_manager')
      )
        .post('/api/manifests/check')
        .field('layoutId', String(layoutId))
        .attach('file', Buffer.from('x'), 'm.pdf');
      expect(res.status).toBe(415);
    });

    it('refuses an XLSX with formulas, naming the cell', async () => {
      const workbook = new ExcelJS.Workbook();
      const sheet = workbook.addWorksheet('m');
      sheet.addRow(['position', 'sample_id', 'role', 'concentration_M']);
      sheet.addRow(['A1', 'BLK', 'blank', null]);
      sheet.getCell('D2').value = { formula: '1+1' } as ExcelJS.CellFormulaValue;
      const res = await (
        await t.agent('lab_manager')
      )
        .post('/api/manifests/check')
        .field('layoutId', String(layoutId))
        .attach('file', Buffer.from(await workbook.xlsx.writeBuffer()), 'f.xlsx');
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(/cell D2 holds a formula/);
    });
  });

  describe('batches', () => {
    let batchId: number;
    const send = (content: string, name: string) =>
      request(t.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${token}`)
        .attach('file', Buffer.from(content), name);
    const plateCsv = (a: number) =>
      `position,wavelength_nm,absorbance\nA1,450,0.05\nA2,450,0.051\nB1,450,${a}\n`;

    it('a file of a run without a batch waits unassigned, and joins the batch created for that run', async () => {
      const early = await send(plateCsv(0.3), 'RUN-0500_first.csv');
      expect((await settled(t, early.body.id)).status).toBe('unassigned');
      const manager = await t.agent('lab_manager');
      const res = await manager.post('/api/batches').send({
        name: 'K-1 at 25 °C',
        profileId,
        layoutId,
        manifestId,
        runId: 'RUN-0500',
        expectedFiles: 2,
        settings: { wavelengthNm: 450, candidates: ['1:1', '1:2'] },
      });
      expect(res.status).toBe(201);
      batchId = res.body.id;
      expect(res.body).toMatchObject({
        state: 'open',
        layoutVersion: 1,
        manifestVersion: 2,
        fileCount: 1,
        expectedFiles: 2,
      });
      expect(res.body.settings).toMatchObject({
        wavelengthNm: 450,
        candidates: ['1:1', '1:2'],
        pathLengthCm: 1,
      });
      expect((await t.services.ingest.getDto(early.body.id)).batchId).toBe(batchId);
    });

    it('a later file of the run attaches by itself', async () => {
      const later = await send(plateCsv(0.31), 'RUN-0500_second.csv');
      expect(await settled(t, later.body.id)).toMatchObject({ status: 'stored', batchId });
      expect((await (await t.agent('scientist')).get(`/api/batches/${batchId}`)).body.fileCount).toBe(2);
    });

    it('a lab manager assigns an unassigned file by hand', async () => {
      const stray = await send(plateCsv(0.32), 'no-run-id.csv');
      expect((await settled(t, stray.body.id)).status).toBe('unassigned');
      expect(
        (await (await t.agent('scientist')).post(`/api/intake/${stray.body.id}/assign`).send({ batchId }))
          .status,
      ).toBe(403);
      const res = await (
        await t.agent('lab_manager')
      )
        .post(`/api/intake/${stray.body.id}/assign`)
        .send({ batchId });
      expect(res.status).toBe(200);
      expect(res.body).toMatchObject({ status: 'stored', batchId });
    });

    it('refuses a batch whose layout does not fit the instrument', async () => {
      const manager = await t.agent('lab_manager');
      const cuvettes = await manager.post('/api/layouts').send({
        name: 'Cuvettes 3',
        format: 'cuvette',
        cuvetteCount: 3,
        positions: [{ position: 'C1', role: 'blank' }],
      });
      const man = await manager.post('/api/manifests').send({
        name: 'Cuv m',
        layoutId: cuvettes.body.id,
        rows: [{ position: 'C1', sample_id: 'B', role: 'blank' }],
      });
      const res = await manager.post('/api/batches').send({
        name: 'Wrong',
        profileId,
        layoutId: cuvettes.body.id,
        manifestId: man.body.id,
        runId: 'R-9',
      });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(
        /layout is for cuvettes but the instrument reads 96-well plates/,
      );
    });

    it('walks open → reviewed → approved with the right roles, then locks, then reopens with a reason', async () => {
      const scientist = await t.agent('scientist');
      const manager = await t.agent('lab_manager');
      const admin = await t.agent('admin');
      expect((await scientist.post(`/api/batches/${batchId}/approve`).send({ comment: 'fine' })).status).toBe(
        403,
      );
      expect((await manager.post(`/api/batches/${batchId}/approve`).send({ comment: 'fine' })).status).toBe(
        409,
      );
      expect((await scientist.post(`/api/batches/${batchId}/review`)).body.state).toBe('reviewed');
      expect((await admin.post(`/api/batches/${batchId}/approve`).send({ comment: 'fine' })).status).toBe(
        403,
      );
      expect((await manager.post(`/api/batches/${batchId}/approve`).send({})).status).toBe(400);
      const approved = await manager
        .post(`/api/batches/${batchId}/approve`)
        .send({ comment: 'Calibration and K checked.' });
      expect(approved.body).toMatchObject({
        state: 'approved',
        approvalComment: 'Calibration and K checked.',
        approvedBy: expect.any(String),
      });
      const locked = await scientist
        .put(`/api/batches/${batchId}/settings`)
        .send({ settings: { pathLengthCm: 0.5 }, reason: 'try a half' });
      expect(locked.status).toBe(409);
      expect(locked.body.error.message).toMatch(/approved and read-only/);
      expect((await manager.post(`/api/batches/${batchId}/reopen`).send({})).status).toBe(400);
      const reopened = await manager
        .post(`/api/batches/${batchId}/reopen`)
        .send({ reason: 'a standard was mislabelled' });
      expect(reopened.body.state).toBe('open');
    });

    it('an exclusion needs a reason and is audited as such', async () => {
      const scientist = await t.agent('scientist');
      const noReason = await scientist
        .put(`/api/batches/${batchId}/settings`)
        .send({ settings: { exclusions: [{ position: 'B1', reason: '' }] }, reason: 'x' });
      expect(noReason.status).toBe(400);
      const res = await scientist.put(`/api/batches/${batchId}/settings`).send({
        settings: { exclusions: [{ position: 'b1', reason: 'bubble in the well' }] },
        reason: 'bubble seen on the plate',
      });
      expect(res.status).toBe(200);
      expect(res.body.settings.exclusions).toEqual([{ position: 'B1', reason: 'bubble in the well' }]);
    });

    it('writes an audit entry for every change, readable by managers only', async () => {
      const manager = await t.agent('lab_manager');
      const res = await manager.get(`/api/audit?entity=batch&entityId=${batchId}`);
      expect(res.status).toBe(200);
      expect(res.body.items.map((e: { action: string }) => e.action).reverse()).toEqual([
        'create',
        'review',
        'approve',
        'reopen',
        'exclude',
      ]);
      const reopen = res.body.items.find((e: { action: string }) => e.action === 'reopen');
      expect(reopen).toMatchObject({
        reason: 'a standard was mislabelled',
        actorName: 'manager@equilight.test',
        before: { state: 'approved' },
        after: { state: 'open' },
      });
      const layouts = await manager.get('/api/audit?entity=layout');
      expect(layouts.body.items.some((e: { action: string }) => e.action === 'update')).toBe(true);
      const manifests = await manager.get(`/api/audit?entity=manifest&entityId=${manifestId}`);
      expect(manifests.body.items.map((e: { action: string }) => e.action)).toEqual(['update', 'create']);
      const assign = await manager.get('/api/audit?entity=intake_file&action=assign');
      expect(assign.body.total).toBe(1);
      const profiles = await manager.get('/api/audit?entity=instrument_profile');
      expect(profiles.body.items[0]).toMatchObject({ action: 'create', actorName: 'admin@equilight.test' });
      expect((await (await t.agent('scientist')).get('/api/audit')).status).toBe(403);
      expect((await manager.get('/api/audit?from=yesterday')).status).toBe(400);
    });
  });

  describe('analysis of a batch', () => {
    it('computes calibration and stoichiometry from the stored readings with the shared module', async () => {
      const admin = await t.agent('admin');
      const manager = await t.agent('lab_manager');
      const cuvette = await createProfile(admin, {
        ...LONG_TABLE_PROFILE,
        name: 'Cuvette demo',
        kind: 'cuvette_spectrophotometer',
        plateFormat: 'cuvette',
        dropSubfolder: 'cuvette-demo',
        fileNamePattern: '^(?<run>CX-\\d+)',
        pathLengthCm: 1,
      });
      const manifestCsv = fs.readFileSync(path.join(SAMPLES_DIR, 'manifest.csv'));
      const rows = parse(manifestCsv, { columns: true }) as {
        position: string;
        role: string;
        replicate_group: string;
      }[];
      const layout = await manager.post('/api/layouts').send({
        name: 'Cuvette series 30',
        format: 'cuvette',
        cuvetteCount: rows.length,
        positions: rows.map((r) => ({
          position: r.position,
          role: r.role,
          ...(r.replicate_group ? { replicateGroup: r.replicate_group } : {}),
        })),
      });
      const manifest = await manager
        .post('/api/manifests')
        .field('layoutId', String(layout.body.id))
        .field('name', 'Complex series')
        .attach('file', manifestCsv, 'manifest.csv');
      expect(manifest.status).toBe(201);
      const batch = await manager.post('/api/batches').send({
        name: 'Complex series 25 °C',
        profileId: cuvette.profile.id,
        layoutId: layout.body.id,
        manifestId: manifest.body.id,
        runId: 'CX-1',
      });
      expect(batch.status).toBe(201);
      const upload = await request(t.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${cuvette.token}`)
        .attach('file', fs.readFileSync(path.join(SAMPLES_DIR, 'readings.csv')), 'CX-1_readings.csv');
      expect(await settled(t, upload.body.id)).toMatchObject({ status: 'stored', batchId: batch.body.id });
      const analysis = await (await t.agent('scientist')).get(`/api/batches/${batch.body.id}/analysis`);
      expect(analysis.status).toBe(200);
      expect(analysis.body.readings.length).toBe(rows.length);
      expect(analysis.body.result.calibration.slope).toBeGreaterThan(0);
      expect(analysis.body.result.stoichiometry.best).toBe('1:1');
      const listed = (await (await t.agent('scientist')).get('/api/batches')).body.items.find(
        (b: { id: number }) => b.id === batch.body.id,
      );
      const best = analysis.body.result.stoichiometry.candidates.find(
        (c: { model: string }) => c.model === '1:1',
      );
      expect(listed.summary).toEqual({
        qcFlagCount: analysis.body.result.qc.filter((f: { severity: string }) => f.severity !== 'info')
          .length,
        qcErrorCount: 0,
        best: '1:1',
        k: best.fit.k,
        kSe: best.fit.kSe,
        kCi95: best.fit.kCi95,
        kStatus: 'determined',
        kLowerBound95: null,
        kUpperBound95: null,
        kUnit: 'L·mol⁻¹',
        kText: analysis.body.result.headline.text,
      });
    });
  });
});
