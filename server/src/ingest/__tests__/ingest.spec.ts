import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import type { ParseRulesInput } from '../../parsers';
import { CORPUS } from '../../parsers/__tests__/bad-corpus-table';
import { sha256Hex } from '../archive';
import { FIXTURES } from '../../parsers/__tests__/load-fixture';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { LONG_TABLE_PROFILE, createProfile, longTableCsv, readingCount, settled } from './ingest-helpers';

describe('ingest', () => {
  let t: TestApp;
  let token: string;
  let profileId: number;

  beforeAll(async () => {
    t = await startTestApp({ UPLOAD_MAX_MB: '1' });
    const created = await createProfile(await t.agent('admin'));
    token = created.token;
    profileId = created.profile.id;
  });
  afterAll(() => t.stop());

  const send = (content: string | Buffer, name = 'RUN-0001_plate.csv', bearer = token) =>
    request(t.app)
      .post('/api/ingest')
      .set('Authorization', `Bearer ${bearer}`)
      .attach('file', Buffer.from(content), name);

  it('when an instrument sends a file then 202 at once, and all its readings are stored with the run id', async () => {
    const res = await send(longTableCsv(1));
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ id: expect.any(Number), status: 'queued' });
    const file = await settled(t, res.body.id);
    expect(file).toMatchObject({
      status: 'unassigned',
      readingCount: 96,
      runId: 'RUN-0001',
      source: 'watcher',
      profileId,
    });
    expect(await readingCount(t, res.body.id)).toBe(96);
  });

  it('keeps the raw file unchanged in the archive, addressed by its SHA-256', async () => {
    const content = longTableCsv(2).replace(/\n/g, '\r\n');
    const res = await send(content);
    const file = await settled(t, res.body.id);
    const archived = fs.readFileSync(
      path.join(t.config.dataDir, 'archive', file.sha256.slice(0, 2), file.sha256),
    );
    expect(archived.equals(Buffer.from(content))).toBe(true);
  });

  it('when the same content arrives twice then the second is a duplicate and nothing is stored twice', async () => {
    const first = await send(longTableCsv(3), 'RUN-0003.csv');
    await settled(t, first.body.id);
    const before = await readingCount(t);
    const second = await send(longTableCsv(3), 'RUN-0003-again.csv');
    expect(second.status).toBe(202);
    expect(second.body).toEqual({
      id: expect.any(Number),
      status: 'duplicate',
      duplicateOfId: first.body.id,
    });
    expect(await readingCount(t)).toBe(before);
  });

  it('when the same content arrives many times at once then exactly one original is kept', async () => {
    const content = longTableCsv(4);
    const answers = await Promise.all(Array.from({ length: 6 }, () => send(content, 'RUN-0004.csv')));
    expect(answers.map((a) => a.status)).toEqual(Array(6).fill(202));
    expect(answers.filter((a) => a.body.status === 'queued')).toHaveLength(1);
    const original = answers.find((a) => a.body.status === 'queued')!.body.id;
    await settled(t, original);
    expect(await readingCount(t, original)).toBe(96);
  });

  it.each([
    ['a wrong token', 'eqt_thisIsNotARealTokenAtAll000000000000'],
    ['a malformed token', 'not-a-token'],
  ])('when the token is %s then 401 and nothing is recorded', async (_label, bad) => {
    const before = await t.services.ingest.list({});
    const res = await send(longTableCsv(5), 'RUN-0005.csv', bad);
    expect(res.status).toBe(401);
    expect((await t.services.ingest.list({})).total).toBe(before.total);
  });

  it('when the token was revoked then 401; a rotated token works', async () => {
    const admin = await t.agent('admin');
    const created = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Rotating reader',
      dropSubfolder: 'rotating',
    });
    const rotated = await admin.post(`/api/instruments/${created.profile.id}/token`);
    expect(rotated.status).toBe(200);
    expect((await send(longTableCsv(6), 'a.csv', created.token)).status).toBe(401);
    expect((await send(longTableCsv(6), 'a.csv', rotated.body.token)).status).toBe(202);
    expect((await admin.delete(`/api/instruments/${created.profile.id}/token`)).status).toBe(200);
    expect((await send(longTableCsv(7), 'b.csv', rotated.body.token)).status).toBe(401);
  });

  it('when the profile is deactivated then its token is refused', async () => {
    const admin = await t.agent('admin');
    const created = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Retired reader',
      dropSubfolder: 'retired',
    });
    await admin.patch(`/api/instruments/${created.profile.id}`).send({ active: false });
    expect((await send(longTableCsv(8), 'c.csv', created.token)).status).toBe(401);
  });

  it.each([
    ['GET', '/api/intake'],
    ['GET', '/api/users'],
    ['GET', '/api/instruments'],
    ['POST', '/api/instruments'],
    ['GET', '/api/auth/me'],
  ])('an instrument token cannot call %s %s', async (method, url) => {
    const req = method === 'GET' ? request(t.app).get(url) : request(t.app).post(url).send({});
    const res = await req.set('Authorization', `Bearer ${token}`);
    expect(res.status).toBe(401);
  });

  it('when the file is not a text export then 415 before anything is stored', async () => {
    const res = await send('MZ\u0000\u0001', 'setup.exe');
    expect(res.status).toBe(415);
    expect(res.body.error.message).toMatch(/Only these file types are accepted here: \.csv/);
  });

  it('when the file is over the upload limit then 413', async () => {
    const res = await send(Buffer.alloc(1024 * 1024 + 10, 0x41), 'huge.csv');
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('when no file field is sent then 400', async () => {
    const res = await request(t.app)
      .post('/api/ingest')
      .set('Authorization', `Bearer ${token}`)
      .field('x', 'y');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/field named "file"/);
  });

  it('when the file name tries to leave the folder then only its last segment is kept, and nothing is written outside the archive', async () => {
    const res = await send(longTableCsv(9), '../../x.csv');
    const file = await settled(t, res.body.id);
    expect(file.originalName).toBe('x.csv');
    expect(fs.existsSync(path.join(t.config.dataDir, '..', 'x.csv'))).toBe(false);
    expect(fs.existsSync(path.join(t.config.dataDir, 'x.csv'))).toBe(false);
  });

  it('when a signed-in scientist uploads with a profile id then it is stored as an upload', async () => {
    const scientist = await t.agent('scientist');
    const res = await scientist
      .post('/api/ingest')
      .field('profileId', String(profileId))
      .attach('file', Buffer.from(longTableCsv(10)), 'RUN-0010.csv');
    expect(res.status).toBe(202);
    expect(await settled(t, res.body.id)).toMatchObject({ status: 'unassigned', source: 'upload' });
  });

  it('when a signed-in upload names no profile then 400', async () => {
    const manager = await t.agent('lab_manager');
    const res = await manager.post('/api/ingest').attach('file', Buffer.from(longTableCsv(11)), 'x.csv');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/Instrument profile id/);
  });

  it('when nobody is signed in and no token is sent then 401', async () => {
    const anon = await t.agent();
    const res = await anon.post('/api/ingest').attach('file', Buffer.from(longTableCsv(12)), 'x.csv');
    expect(res.status).toBe(401);
  });
});

describe('bad files are quarantined with their own message', () => {
  let t: TestApp;
  /** One instrument profile per rule set of the corpus, keyed by the rules' JSON. */
  const tokens = new Map<string, string>();

  beforeAll(async () => {
    t = await startTestApp();
    const admin = await t.agent('admin');
    const ruleSets = [...new Set(CORPUS.map(([, rules]) => JSON.stringify(rules)))];
    for (const [i, json] of ruleSets.entries()) {
      const rules = JSON.parse(json) as ParseRulesInput;
      const { format, plateFormat, defaultWavelengthNm, ...parsing } = rules;
      const res = await admin.post('/api/instruments').send({
        name: `Corpus profile ${i}`,
        kind: plateFormat === 'cuvette' ? 'cuvette_spectrophotometer' : 'plate_reader',
        plateFormat: String(plateFormat ?? 96),
        fileFormat: format ?? 'long_table',
        defaultWavelengthNm: defaultWavelengthNm ?? null,
        dropSubfolder: `corpus-${i}`,
        rules: parsing,
      });
      // a rule set no profile may have (refused with its reason) is a corpus case of the parser alone
      if (res.status === 201) tokens.set(json, res.body.token);
    }
  });
  afterAll(() => t.stop());

  const ingestible = () => CORPUS.filter(([, rules]) => tokens.has(JSON.stringify(rules)));

  it('covers at least 40 files of the bad-input corpus', () => {
    expect(ingestible().length).toBeGreaterThanOrEqual(40);
  });

  it('quarantines each with its own message, stores no reading of it, and records each once', async () => {
    const seen = new Map<string, number>();
    for (const [name, rules, message] of ingestible()) {
      const content = fs.readFileSync(path.join(FIXTURES, 'bad', name));
      const res = await request(t.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${tokens.get(JSON.stringify(rules))}`)
        .attach('file', content, name);
      expect([name, res.status]).toEqual([name, 202]);
      if (res.body.status === 'duplicate') {
        // byte-identical to an earlier corpus file: recorded against that one
        expect(seen.has(sha256Hex(content))).toBe(true);
        continue;
      }
      seen.set(sha256Hex(content), res.body.id);
      const file = await settled(t, res.body.id);
      expect([name, file.status]).toEqual([name, 'quarantined']);
      expect(file.error).toMatch(message);
      expect(await readingCount(t, res.body.id)).toBe(0);
    }
    expect(await readingCount(t)).toBe(0);
    // Not a speed check: ~70 files through the queue on a shared machine.
  }, 60_000);

  it('keeps serving after the whole corpus', async () => {
    expect((await request(t.app).get('/api/health')).status).toBe(200);
  });

  it('re-queues a quarantined file after its profile is fixed', async () => {
    const admin = await t.agent('admin');
    const semicolons = 'position;wavelength_nm;absorbance\nA1;450;0,512\nA2;450;0,498\n';
    const created = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Comma reader',
      dropSubfolder: 'comma-reader',
      rules: { delimiter: ';' },
    });
    const res = await request(t.app)
      .post('/api/ingest')
      .set('Authorization', `Bearer ${created.token}`)
      .attach('file', Buffer.from(semicolons), 'decimal-comma.csv');
    const quarantined = await settled(t, res.body.id);
    expect(quarantined.status).toBe('quarantined');
    expect(quarantined.error).toMatch(/decimal-comma\.csv line 2, column "absorbance"/);

    const manager = await t.agent('lab_manager');
    // re-queued unchanged: the same message comes back
    expect((await manager.post(`/api/intake/${res.body.id}/requeue`)).status).toBe(202);
    expect((await settled(t, res.body.id)).error).toBe(quarantined.error);
    await admin.patch(`/api/instruments/${created.profile.id}`).send({ rules: { decimalMark: ',' } });
    const again = await manager.post(`/api/intake/${res.body.id}/requeue`);
    expect(again.status).toBe(202);
    const stored = await settled(t, res.body.id);
    expect(stored).toMatchObject({ status: 'unassigned', readingCount: 2, error: null });
    const storedAgain = await manager.post(`/api/intake/${res.body.id}/requeue`);
    expect(storedAgain.status).toBe(409);
    expect(storedAgain.body.error.message).toMatch(/Only quarantined files can be re-queued/);
  });
});
