import request from 'supertest';
import { DEMO_EMAILS, DEMO_PASSWORD, startTestApp, type TestApp, testQuery } from '../../testing/test-app';

describe('sign-in', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.stop());

  it('when the password is right then it answers the user without secrets', async () => {
    const a = await t.agent();
    const res = await a
      .post('/api/auth/login')
      .send({ email: 'Scientist@Equilight.test', password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({
      id: expect.any(Number),
      email: DEMO_EMAILS.scientist,
      displayName: expect.any(String),
      role: 'scientist',
      active: true,
      invited: false,
    });
    expect(JSON.stringify(res.body)).not.toMatch(/hash/i);
    const me = await a.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.role).toBe('scientist');
  });

  it('when the password is wrong then 401 with a clear message', async () => {
    const a = await t.agent();
    const res = await a
      .post('/api/auth/login')
      .send({ email: DEMO_EMAILS.admin, password: 'not-the-password' });
    expect(res.status).toBe(401);
    expect(res.body.error).toEqual({ code: 'unauthorized', message: 'E-mail or password is not correct.' });
  });

  it('when the e-mail is unknown then the same 401 message', async () => {
    const a = await t.agent();
    const res = await a
      .post('/api/auth/login')
      .send({ email: 'nobody@equilight.test', password: DEMO_PASSWORD });
    expect(res.status).toBe(401);
    expect(res.body.error.message).toBe('E-mail or password is not correct.');
  });

  it('when the body is malformed JSON then 400 without a stack trace', async () => {
    const a = await t.agent();
    const res = await a.post('/api/auth/login').set('Content-Type', 'application/json').send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('The request body is not valid JSON.');
    expect(res.text).not.toMatch(/at .*\.js:\d+/);
  });

  it.each([
    ['empty', {}, /email/],
    ['without password', { email: DEMO_EMAILS.admin }, /password/],
    ['an over-long e-mail', { email: 'x'.repeat(300), password: 'p' }, /email: must be at most 254/],
    [
      'an over-long password',
      { email: DEMO_EMAILS.admin, password: 'p'.repeat(500) },
      /password: must be at most 200/,
    ],
    ['an unknown field', { email: DEMO_EMAILS.admin, password: DEMO_PASSWORD, extra: 1 }, /extra/],
  ])('when the body is %s then 400 naming the field', async (_label, body, message) => {
    const a = await t.agent();
    const res = await a.post('/api/auth/login').send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_request');
    expect(res.body.error.message).toMatch(message);
  });

  it('when signed out then /me is 401', async () => {
    const a = await t.agent('admin');
    expect((await a.post('/api/auth/logout')).status).toBe(204);
    expect((await a.get('/api/auth/me')).status).toBe(401);
  });

  it('when a mutating request lacks the XSRF header then 403', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .send({ email: DEMO_EMAILS.admin, password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });

  it('when the XSRF header is forged then 403', async () => {
    const a = await t.agent();
    const res = await a
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', 'forged.token')
      .send({ email: DEMO_EMAILS.admin, password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
  });

  it('when health is asked without sign-in then 200', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('ok');
  });

  it('when an unknown API route is asked then 404 JSON', async () => {
    const res = await request(t.app).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('sets security headers', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
  });

  it('keeps the session in the database, not in memory', async () => {
    await t.agent('lab_manager');
    const rows = await testQuery(t.dataSource, 'SELECT COUNT(*) AS n FROM sessions');
    expect(Number(rows[0].n)).toBeGreaterThan(0);
  });
});

describe('sign-in rate limit', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ LOGIN_RATE_LIMIT: '3' });
  });
  afterAll(() => t.stop());

  it('when attempts exceed the limit then 429', async () => {
    const a = await t.agent();
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) {
      statuses.push(
        (await a.post('/api/auth/login').send({ email: DEMO_EMAILS.admin, password: 'wrong-one' })).status,
      );
    }
    expect(statuses).toEqual([401, 401, 401, 429, 429]);
  });
});
