import crypto from 'node:crypto';
import request from 'supertest';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { createProfile, longTableCsv } from './ingest-helpers';

jest.setTimeout(60_000);

describe('GET /api/intake/raw/:sha256', () => {
  let t: TestApp;
  let token: string;
  beforeAll(async () => {
    t = await startTestApp();
    token = (await createProfile(await t.agent('admin'))).token;
  });
  afterAll(() => t.stop());

  it('streams the archived bytes with their SHA-256 and a cleaned download name; managers only', async () => {
    const content = Buffer.from(longTableCsv(11));
    // A name with a bidirectional override, quotes and a path: none of it reaches the header as such.
    const sent = await request(t.app)
      .post('/api/ingest')
      .set({ Authorization: `Bearer ${token}` })
      .attach('file', content, 'RUN-11\u202e"vsc.csv');
    expect(sent.status).toBe(202);
    const sha256 = crypto.createHash('sha256').update(content).digest('hex');
    const manager = await t.agent('lab_manager');
    const res = await manager
      .get(`/api/intake/raw/${sha256}`)
      .buffer(true)
      .parse((r, done) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => done(null, Buffer.concat(chunks)));
      });
    expect(res.status).toBe(200);
    expect(
      crypto
        .createHash('sha256')
        .update(res.body as Buffer)
        .digest('hex'),
    ).toBe(sha256);
    expect(res.headers['x-content-sha256']).toBe(sha256);
    const disposition = String(res.headers['content-disposition']);
    expect(disposition).toMatch(/^attachment; filename="?RUN-11_vsc\.csv"?$/);
    expect(disposition).not.toContain('\u202e');
    expect((await (await t.agent('scientist')).get(`/api/intake/raw/${sha256}`)).status).toBe(403);
    expect((await request(t.app).get(`/api/intake/raw/${sha256}`)).status).toBe(401);
    expect((await manager.get('/api/intake/raw/..%2F..%2Fetc%2Fpasswd')).status).toBe(400);
    expect((await manager.get(`/api/intake/raw/${'0'.repeat(64)}`)).status).toBe(404);
  });
});
