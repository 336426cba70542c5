import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { startTestApp, type TestApp, testQuery } from '../../testing/test-app';
import { createProfile, readingCount, settled } from './ingest-helpers';

// JCAMP-DX files through the real ingest path: archive, queue, parser worker, readings table.

const SAMPLES = path.resolve(__dirname, '../../../../samples/analysis');

describe('ingest of JCAMP-DX spectra', () => {
  let t: TestApp;
  let cuvetteToken: string;
  let plateToken: string;

  beforeAll(async () => {
    t = await startTestApp();
    const admin = await t.agent('admin');
    cuvetteToken = (
      await createProfile(admin, {
        name: 'Scanning spectrophotometer (JCAMP-DX)',
        kind: 'cuvette_spectrophotometer',
        plateFormat: 'cuvette',
        fileFormat: 'jcamp_dx',
        dropSubfolder: 'scanner-jdx',
      })
    ).token;
    plateToken = (
      await createProfile(admin, {
        name: 'Plate reader (JCAMP-DX, sample description)',
        kind: 'plate_reader',
        plateFormat: '96',
        fileFormat: 'jcamp_dx',
        dropSubfolder: 'plate-jdx',
        rules: { jcampPositionFrom: 'sample_description' },
      })
    ).token;
  });
  afterAll(() => t.stop());

  const send = (content: Buffer, name: string, token: string) =>
    request(t.app).post('/api/ingest').set('Authorization', `Bearer ${token}`).attach('file', content, name);

  it('stores a reading at every wavelength of every linked block under the position of its title', async () => {
    const res = await send(fs.readFileSync(path.join(SAMPLES, 'spectra.jdx')), 'RUN-77.jdx', cuvetteToken);
    expect(res.status).toBe(202);
    const file = await settled(t, res.body.id, 30_000);
    expect(file.status).not.toBe('quarantined');
    // 19 cuvettes × 176 wavelengths (350–700 nm every 2 nm), as the generator wrote them.
    expect(await readingCount(t, res.body.id)).toBe(19 * 176);
    const perPosition: { position: string; n: number; lo: number; hi: number }[] = await testQuery(
      t.dataSource,
      `SELECT position, COUNT(*) AS n, MIN(wavelength_nm) AS lo, MAX(wavelength_nm) AS hi
         FROM readings WHERE intake_file_id = ? GROUP BY position`,
      [res.body.id],
    );
    expect(perPosition).toHaveLength(19);
    for (const p of perPosition) expect([Number(p.n), Number(p.lo), Number(p.hi)]).toEqual([176, 350, 700]);
    // The same value as the spectrum CSV holds for C3 at 500 nm.
    const csv = fs.readFileSync(path.join(SAMPLES, 'spectra.csv'), 'utf8').trim().split('\n');
    const header = csv[0].split(',');
    const row = csv.find((l) => l.startsWith('500,'))!.split(',');
    const [stored] = await testQuery(
      t.dataSource,
      'SELECT absorbance FROM readings WHERE intake_file_id = ? AND position = ? AND wavelength_nm = 500',
      [res.body.id, 'C3'],
    );
    expect(stored.absorbance).toBeCloseTo(Number(row[header.indexOf('C3')]), 10);
  });

  it('reads a single block with the position from its sample description', async () => {
    const content = Buffer.from(
      [
        '##TITLE= titration point 4',
        '##JCAMP-DX= 4.24',
        '##DATA TYPE= UV/VIS SPECTRUM',
        '##SAMPLE DESCRIPTION= well D7',
        '##XUNITS= NANOMETERS',
        '##YUNITS= ABSORBANCE',
        '##XFACTOR= 1',
        '##YFACTOR= 0.001',
        '##FIRSTX= 450',
        '##LASTX= 460',
        '##NPOINTS= 3',
        '##XYDATA= (X++(Y..Y))',
        '450 210 250 230',
        '##END=',
        '',
      ].join('\n'),
    );
    const res = await send(content, 'point-4.dx', plateToken);
    expect(res.status).toBe(202);
    await settled(t, res.body.id);
    const rows = await testQuery(
      t.dataSource,
      'SELECT position, wavelength_nm AS nm, absorbance FROM readings WHERE intake_file_id = ? ORDER BY nm',
      [res.body.id],
    );
    expect(
      rows.map((r: { position: string; nm: number; absorbance: number }) => [r.position, r.nm, r.absorbance]),
    ).toEqual([
      ['D7', 450, 0.21],
      ['D7', 455, 0.25],
      ['D7', 460, 0.23],
    ]);
  });

  it('quarantines a bad JCAMP-DX file with a clear message and stores none of it', async () => {
    const cut = fs
      .readFileSync(path.join(SAMPLES, 'spectra-jcamp', 'C3.jdx'), 'utf8')
      .split('\n')
      .filter((l) => !l.startsWith('370 '))
      .join('\n');
    const res = await send(Buffer.from(cut), 'C3-cut.jdx', cuvetteToken);
    const file = await settled(t, res.body.id);
    expect(file.status).toBe('quarantined');
    expect(file.error).toMatch(
      /^C3-cut\.jdx line 1, column "block C3 BLK": ##NPOINTS= 176 but the block holds 166 points \(a damaged or cut file\)/,
    );
    expect(await readingCount(t, res.body.id)).toBe(0);
  });

  it('takes .jcamp as a name and judges the file by its content', async () => {
    // .jcamp is accepted as a name; the content decides.
    const res = await send(Buffer.from('not a spectrum\n'), 'x.jcamp', cuvetteToken);
    expect(res.status).toBe(202);
    const file = await settled(t, res.body.id);
    expect(file.status).toBe('quarantined');
    expect(file.error).toMatch(/^x\.jcamp: expected a JCAMP-DX file/);
  });
});
