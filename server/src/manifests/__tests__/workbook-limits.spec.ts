import http from 'node:http';
import type { AddressInfo } from 'node:net';
import ExcelJS from 'exceljs';
import { startTestApp, type TestApp } from '../../testing/test-app';
import {
  MANIFEST_MAX_SHEET_CELLS,
  MANIFEST_MAX_SHEET_COLUMNS,
  MANIFEST_MAX_SHEET_ROWS,
  MANIFEST_MAX_UNCOMPRESSED_BYTES,
  MANIFEST_MAX_ZIP_ENTRIES,
} from '../xlsx-limits';
import { part, repeatedPart, SHEET_HEAD, SHEET_TAIL, workbookSkeleton, zipOf } from './workbook-builder';

const HEADER = ['position', 'sample_id', 'role', 'concentration_M'];
const POSITIONS = [
  { position: 'A1', role: 'blank' },
  { position: 'A2', role: 'standard' },
];

/** A small, valid manifest workbook; `extra` adds cells far away from the samples. */
async function manifestWorkbook(
  extra: (sheet: ExcelJS.Worksheet) => void = () => undefined,
): Promise<Buffer> {
  const workbook = new ExcelJS.Workbook();
  const sheet = workbook.addWorksheet('manifest');
  sheet.addRow(HEADER);
  sheet.addRow(['A1', 'B-01', 'blank', '']);
  sheet.addRow(['A2', 'S-01', 'standard', '0.00001']);
  extra(sheet);
  return Buffer.from(await workbook.xlsx.writeBuffer());
}

/** A 400 MB worksheet of white space deflated to a few hundred kB; `declaredSize` may be a lie. */
async function zipBomb(declaredSize?: number): Promise<Buffer> {
  const sheet = await repeatedPart(
    'xl/worksheets/sheet1.xml',
    SHEET_HEAD,
    ' '.repeat(4096),
    97_657,
    SHEET_TAIL,
  );
  if (declaredSize !== undefined) sheet.declaredSize = declaredSize;
  return zipOf([...workbookSkeleton(), sheet]);
}

/**
 * A stall, not a speed: the workbooks below held the server for tens of seconds (or ran it out of memory)
 * before the limits; a loaded CI machine may stretch a healthy answer to a second or two.
 */
const STALL_MS = 3000;

/** Probe /api/health on a real listening server every 20 ms until stopped; the slowest answer in ms. */
function healthProbe(base: string): {
  stop(): Promise<{ slowestMs: number; probes: number; failures: number }>;
} {
  let running = true;
  let slowestMs = 0;
  let probes = 0;
  let failures = 0;
  const loop = (async () => {
    while (running) {
      const started = performance.now();
      const res = await fetch(`${base}/api/health`).catch(() => undefined);
      await res?.arrayBuffer();
      if (!res || res.status !== 200) failures++;
      slowestMs = Math.max(slowestMs, performance.now() - started);
      probes++;
      await new Promise((resolve) => setTimeout(resolve, 20));
    }
  })();
  return {
    async stop() {
      running = false;
      await loop;
      return { slowestMs, probes, failures };
    },
  };
}

describe('manifest workbooks are bounded by what a manifest can hold', () => {
  let t: TestApp;
  let server: http.Server;
  let base: string;
  let layoutId: number;

  beforeAll(async () => {
    t = await startTestApp();
    server = http.createServer(t.app);
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const manager = await t.agent('lab_manager');
    const layout = await manager
      .post('/api/layouts')
      .send({ name: 'Workbook limits', format: '96', positions: POSITIONS });
    expect(layout.status).toBe(201);
    layoutId = layout.body.id;
  });
  afterAll(async () => {
    await new Promise<void>((resolve) => server.close(() => resolve()));
    await t.stop();
  });

  /** Upload a workbook to the manifest check while the health probe runs alongside. */
  async function checkWithProbe(workbook: Buffer) {
    const manager = await t.agent('lab_manager');
    const probe = healthProbe(base);
    await new Promise((resolve) => setTimeout(resolve, 60));
    const started = performance.now();
    const res = await manager
      .post('/api/manifests/check')
      .field('layoutId', String(layoutId))
      .attach('file', workbook, 'plate.xlsx');
    const uploadMs = performance.now() - started;
    await new Promise((resolve) => setTimeout(resolve, 60));
    const health = await probe.stop();
    return { res, uploadMs, health };
  }

  it('when a sheet has a value in the last column (XFD1) and the last row (A1048576) then 400 naming the column limit, and health stays quick', async () => {
    const workbook = await manifestWorkbook((sheet) => {
      sheet.getCell('XFD1').value = 'far right';
      sheet.getCell('A1048576').value = 'far down';
    });
    expect(workbook.length).toBeLessThan(20_000);
    const { res, health, uploadMs } = await checkWithProbe(workbook);
    console.log(
      `sparse workbook (${workbook.length} B): refused in ${uploadMs.toFixed(0)} ms, health slowest ${health.slowestMs.toFixed(0)} ms over ${health.probes} probes`,
    );
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_manifest');
    expect(res.body.error.message).toMatch(
      new RegExp(`cell XFD1 is past column BL \\(${MANIFEST_MAX_SHEET_COLUMNS}\\)`),
    );
    expect(health.failures).toBe(0);
    expect(health.probes).toBeGreaterThan(1);
    expect(health.slowestMs).toBeLessThan(STALL_MS);
  });

  it('when a sheet has a value only in the last row then 400 naming the row limit', async () => {
    const workbook = await manifestWorkbook((sheet) => {
      sheet.getCell('A1048576').value = 'far down';
    });
    const { res } = await checkWithProbe(workbook);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(
      new RegExp(`cell A1048576 is past row ${MANIFEST_MAX_SHEET_ROWS}, the last row a manifest may use`),
    );
  });

  it('when far cells carry only formatting then the used range is read and the manifest passes', async () => {
    const workbook = await manifestWorkbook((sheet) => {
      sheet.getCell('XFD1').style = { font: { bold: true } };
      sheet.getCell('A1048576').style = { font: { italic: true } };
    });
    const { res, uploadMs } = await checkWithProbe(workbook);
    expect(res.status).toBe(200);
    expect(res.body.source).toBe('xlsx');
    expect(res.body.samples.map((s: { position: string }) => s.position)).toEqual(['A1', 'A2']);
    expect(uploadMs).toBeLessThan(4 * STALL_MS);
  });

  it('when a 400 kB workbook expands to 400 MB then 413 naming the size limit, and health stays quick', async () => {
    const bomb = await zipBomb();
    expect(bomb.length).toBeLessThan(600_000);
    const { res, health, uploadMs } = await checkWithProbe(bomb);
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('manifest_too_large');
    expect(res.body.error.message).toMatch(/declare 381 MB uncompressed/);
    expect(res.body.error.message).toMatch(
      new RegExp(`may expand to at most ${MANIFEST_MAX_UNCOMPRESSED_BYTES / 1024 / 1024} MB`),
    );
    expect(health.failures).toBe(0);
    expect(health.slowestMs).toBeLessThan(STALL_MS);
    console.log(
      `workbook bomb (${bomb.length} B, declared size): refused in ${uploadMs.toFixed(0)} ms, health slowest ${health.slowestMs.toFixed(0)} ms over ${health.probes} probes`,
    );
  });

  it('when the bomb declares a small size but expands to 400 MB then inflation stops at the limit with 413', async () => {
    const { res, health, uploadMs } = await checkWithProbe(await zipBomb(1000));
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/the part xl\/worksheets\/sheet1.xml expands beyond the limit/);
    expect(health.failures).toBe(0);
    expect(health.slowestMs).toBeLessThan(STALL_MS);
    console.log(
      `workbook bomb (lying size): refused in ${uploadMs.toFixed(0)} ms, health slowest ${health.slowestMs.toFixed(0)} ms over ${health.probes} probes`,
    );
  });

  it('when a sheet holds more cell elements than a manifest can then 400 naming the cell limit', async () => {
    const cells = await repeatedPart(
      'xl/worksheets/sheet1.xml',
      SHEET_HEAD + '<row r="1">',
      '<c r="A1" s="0"/>',
      MANIFEST_MAX_SHEET_CELLS + 10,
      '</row>' + SHEET_TAIL,
    );
    const { res, health } = await checkWithProbe(zipOf([...workbookSkeleton(), cells]));
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(new RegExp(`more than ${MANIFEST_MAX_SHEET_CELLS} cells`));
    expect(health.slowestMs).toBeLessThan(STALL_MS);
  });

  it('when a workbook has more parts than any workbook needs then 413 naming the count', async () => {
    const parts = Array.from({ length: MANIFEST_MAX_ZIP_ENTRIES + 1 }, (_, i) =>
      part(`xl/extra/${i}.xml`, '<x/>'),
    );
    const { res } = await checkWithProbe(zipOf([...workbookSkeleton(), ...parts]));
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(
      new RegExp(`has ${MANIFEST_MAX_ZIP_ENTRIES + 5} parts, more than ${MANIFEST_MAX_ZIP_ENTRIES}`),
    );
  });

  it('when the file is not a ZIP at all then 400 saying it is not a readable workbook', async () => {
    const { res } = await checkWithProbe(Buffer.from('position,sample_id\nA1,x\n'));
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/not a readable XLSX workbook/);
    // A hand-built workbook within every limit still reads (the builder itself is sound).
    const plain = zipOf([
      ...workbookSkeleton(),
      part(
        'xl/worksheets/sheet1.xml',
        `${SHEET_HEAD}<row r="1"><c r="A1" t="inlineStr"><is><t>position</t></is></c><c r="B1" t="inlineStr"><is><t>sample_id</t></is></c><c r="C1" t="inlineStr"><is><t>role</t></is></c></row>` +
          `<row r="2"><c r="A2" t="inlineStr"><is><t>A1</t></is></c><c r="B2" t="inlineStr"><is><t>B-01</t></is></c><c r="C2" t="inlineStr"><is><t>blank</t></is></c></row>${SHEET_TAIL}`,
      ),
    ]);
    const ok = await checkWithProbe(plain);
    expect(ok.res.status).toBe(200);
    expect(ok.res.body.samples[0].position).toBe('A1');
  });
});
