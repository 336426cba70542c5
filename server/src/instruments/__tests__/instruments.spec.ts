import fs from 'node:fs';
import path from 'node:path';
import { FIXTURES } from '../../parsers/__tests__/load-fixture';
import { startTestApp, type TestApp, testQuery } from '../../testing/test-app';
import { LONG_TABLE_PROFILE, createProfile } from '../../ingest/__tests__/ingest-helpers';

type Who = 'signed out' | 'admin' | 'lab_manager' | 'scientist';

describe('instrument profiles API', () => {
  let t: TestApp;
  let profileId: number;
  beforeAll(async () => {
    t = await startTestApp();
    profileId = (await createProfile(await t.agent('admin'))).profile.id;
  });
  afterAll(() => t.stop());

  const as = (who: Who) => t.agent(who === 'signed out' ? undefined : who);
  let n = 0;
  const calls: [
    string,
    (a: Awaited<ReturnType<typeof as>>) => ReturnType<Awaited<ReturnType<typeof as>>['get']>,
  ][] = [
    ['GET /api/instruments', (a) => a.get('/api/instruments')],
    [
      'POST /api/instruments',
      (a) =>
        a.post('/api/instruments').send({ ...LONG_TABLE_PROFILE, name: `P${++n}`, dropSubfolder: `p-${n}` }),
    ],
    [
      'PATCH /api/instruments/:id',
      (a) => a.patch(`/api/instruments/${profileId}`).send({ defaultWavelengthNm: 450 }),
    ],
    ['POST /api/instruments/:id/token', (a) => a.post(`/api/instruments/${profileId}/token`)],
    ['DELETE /api/instruments/:id/token', (a) => a.delete(`/api/instruments/${profileId}/token`)],
    [
      'POST /api/instruments/try',
      (a) =>
        a
          .post('/api/instruments/try')
          .attach('file', fs.readFileSync(path.join(FIXTURES, 'good', 'long-basic.csv')), 'x.csv'),
    ],
  ];

  describe.each(calls)('%s', (route, call) => {
    it.each(['signed out', 'lab_manager', 'scientist', 'admin'] as Who[])('as %s', async (who) => {
      const res = await call(await as(who));
      // Lab managers read the full profiles (formats, file-name pattern) but change nothing.
      const reads = who === 'lab_manager' && route === 'GET /api/instruments';
      if (who === 'signed out') expect(res.status).toBe(401);
      else if (who === 'admin' || reads) expect([200, 201]).toContain(res.status);
      else expect(res.status).toBe(403);
    });
  });

  it('shows the token once: the list has only its prefix', async () => {
    const admin = await as('admin');
    const created = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Once',
      dropSubfolder: 'once',
    });
    expect(created.token).toMatch(/^eqt_[A-Za-z0-9_-]{40,}$/);
    const list = await admin.get('/api/instruments');
    const text = JSON.stringify(list.body);
    expect(text).not.toContain(created.token);
    const row = list.body.find((p: { id: number }) => p.id === created.profile.id);
    expect(row).toMatchObject({ hasToken: true, tokenPrefix: created.token.slice(0, 10) });
    const stored = await testQuery(t.dataSource, 'SELECT token_hash FROM instrument_profiles WHERE id = ?', [
      created.profile.id,
    ]);
    expect(stored[0].token_hash).toMatch(/^[0-9a-f]{64}$/);
    expect(stored[0].token_hash).not.toContain(created.token);
  });

  it('fills rule defaults and keeps partial rule edits', async () => {
    const admin = await as('admin');
    const created = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Defaults',
      dropSubfolder: 'defaults',
    });
    const p = (await admin.get('/api/instruments')).body.find(
      (x: { id: number }) => x.id === created.profile.id,
    );
    expect(p.rules).toEqual({
      delimiter: 'auto',
      decimalMark: '.',
      encoding: 'utf-8',
      skipLines: 0,
      columns: {
        position: 'position',
        wavelength: 'wavelength_nm',
        absorbance: 'absorbance',
        readTime: 'read_time',
        temperature: 'temperature_c',
        replicate: 'replicate',
      },
      spectrumWavelengthColumn: 'wavelength_nm',
      jcampPositionFrom: 'title',
    });
    const patched = await admin
      .patch(`/api/instruments/${created.profile.id}`)
      .send({ rules: { delimiter: ';', columns: { absorbance: 'OD' } } });
    expect(patched.body.rules.delimiter).toBe(';');
    expect(patched.body.rules.columns).toMatchObject({ absorbance: 'OD', position: 'position' });
  });

  it.each([
    ['a drop folder that climbs out', { dropSubfolder: '../etc' }, /dropSubfolder: must be letters/],
    ['a drop folder with a slash', { dropSubfolder: 'a/b' }, /dropSubfolder/],
    [
      'an invalid pattern',
      { fileNamePattern: '(unclosed' },
      /fileNamePattern: is not a valid regular expression/,
    ],
    [
      'a cuvette instrument on a plate',
      { kind: 'cuvette_spectrophotometer', plateFormat: '96' },
      /cuvette sequence/,
    ],
    [
      'a decimal comma with comma delimiter',
      { rules: { delimiter: ',', decimalMark: ',' } },
      /decimal comma/,
    ],
    ['an unknown format', { fileFormat: 'xlsx' }, /fileFormat/],
    ['a negative path length', { pathLengthCm: -1 }, /pathLengthCm/],
    ['an unknown field', { colour: 'red' }, /colour/],
  ])('refuses %s with a clear message', async (_label, change, message) => {
    const res = await (
      await as('admin')
    )
      .post('/api/instruments')
      .send({ ...LONG_TABLE_PROFILE, name: 'Bad', dropSubfolder: 'bad', ...change });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(message);
  });

  it('refuses a second profile with the same name or drop folder', async () => {
    const admin = await as('admin');
    const res = await admin.post('/api/instruments').send(LONG_TABLE_PROFILE);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/already uses the name/);
  });

  it('tries a file with the rules in the form and shows the first readings', async () => {
    const res = await (
      await as('admin')
    )
      .post('/api/instruments/try')
      .field('rules', JSON.stringify({ format: 'plate_grid', plateFormat: '96' }))
      .attach('file', fs.readFileSync(path.join(FIXTURES, 'good', 'grid-96-multi.csv')), 'grid.csv');
    expect(res.status).toBe(200);
    expect(res.body.readingCount).toBeGreaterThan(96);
    expect(res.body.readings).toHaveLength(50);
    expect(res.body.metadata.wavelengthsNm.length).toBeGreaterThan(1);
  });

  it('tries a file and gives the exact error with line and column', async () => {
    const res = await (
      await as('admin')
    )
      .post('/api/instruments/try')
      .field('rules', JSON.stringify({ format: 'long_table' }))
      .attach(
        'file',
        fs.readFileSync(path.join(FIXTURES, 'bad', 'letters-in-absorbance.csv')),
        'letters.csv',
      );
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('parse_error');
    expect(res.body.error.message).toMatch(/letters\.csv line \d+, column "absorbance"/);
    expect(res.body.error.details).toEqual({ line: expect.any(Number), column: 'absorbance' });
  });

  it('refuses try rules that are not JSON', async () => {
    const res = await (
      await as('admin')
    )
      .post('/api/instruments/try')
      .field('rules', '{nope')
      .attach('file', Buffer.from('position,wavelength_nm,absorbance\nA1,450,0.1\n'), 'x.csv');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/must be JSON/);
  });
});
