import { loadConfig } from '../../config';
import { DEMO_EMAILS, DEMO_PASSWORD, startTestApp, type TestApp } from '../../testing/test-app';
import { normaliseEmail } from '../../contracts/email-address';

const WRONG = 'not-the-password';

describe('sign-in limit keys on the normalised address', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ LOGIN_RATE_LIMIT: '3' });
  });
  afterAll(() => t.stop());

  it('when an address is spelled with spaces, capitals or full-width letters then it shares the one limit', async () => {
    const a = await t.agent();
    for (let i = 0; i < 3; i++)
      expect(
        (await a.post('/api/auth/login').send({ email: DEMO_EMAILS.admin, password: WRONG })).status,
      ).toBe(401);
    // U+FF21 FULLWIDTH LATIN CAPITAL LETTER A: NFKC folds it to "A".
    for (const spelling of [
      ` ${DEMO_EMAILS.admin}`,
      `${DEMO_EMAILS.admin}\t`,
      DEMO_EMAILS.admin.toUpperCase(),
      `\uFF21dmin@equilight.test`,
    ]) {
      const res = await a.post('/api/auth/login').send({ email: spelling, password: DEMO_PASSWORD });
      expect(res.status).toBe(429);
      expect(res.body.error.code).toBe('too_many_attempts');
    }
  });

  it('when X-Forwarded-For changes and no proxy is trusted then the limit still holds', async () => {
    const a = await t.agent();
    for (let i = 0; i < 3; i++)
      await a.post('/api/auth/login').set('X-Forwarded-For', `203.0.113.${i}`).send({
        email: DEMO_EMAILS.lab_manager,
        password: WRONG,
      });
    const res = await a
      .post('/api/auth/login')
      .set('X-Forwarded-For', '203.0.113.99')
      .send({ email: DEMO_EMAILS.lab_manager, password: WRONG });
    expect(res.status).toBe(429);
  });
});

describe('sign-in limit behind a named proxy', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ LOGIN_RATE_LIMIT: '2', TRUST_PROXY: 'loopback' });
  });
  afterAll(() => t.stop());

  it('when TRUST_PROXY names the proxy then each forwarded client has its own count', async () => {
    const a = await t.agent();
    const attempt = (client: string) =>
      a
        .post('/api/auth/login')
        .set('X-Forwarded-For', client)
        .send({ email: DEMO_EMAILS.scientist, password: WRONG });
    expect((await attempt('198.51.100.7')).status).toBe(401);
    expect((await attempt('198.51.100.7')).status).toBe(401);
    expect((await attempt('198.51.100.7')).status).toBe(429);
    expect((await attempt('198.51.100.8')).status).toBe(401);
  });
});

describe('one e-mail normalisation everywhere', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.stop());

  it('when TRUST_PROXY is true or not an address then the configuration is refused', () => {
    expect(() => loadConfig({ TRUST_PROXY: 'true' })).toThrow(/TRUST_PROXY: name the proxy/);
    expect(() => loadConfig({ TRUST_PROXY: 'proxy.example' })).toThrow(/TRUST_PROXY/);
    expect(loadConfig({}).trustProxy).toBe(false);
    expect(loadConfig({ TRUST_PROXY: '10.0.0.5, 10.1.0.0/16' }).trustProxy).toBe('10.0.0.5,10.1.0.0/16');
    expect(loadConfig({ TRUST_PROXY: '1' }).trustProxy).toBe(1);
  });

  it('when a person is invited with an unusual spelling then the stored address is the normal one', async () => {
    const admin = await t.agent('admin');
    const created = await admin
      .post('/api/users')
      .send({ email: '  \uFF2Eew.Person@Lab.TEST ', displayName: 'New Person', role: 'scientist' });
    expect(created.status).toBe(201);
    expect(created.body.user.email).toBe('new.person@lab.test');
    const again = await admin
      .post('/api/users')
      .send({ email: 'NEW.person@lab.test', displayName: 'Twin', role: 'scientist' });
    expect(again.status).toBe(409);
    expect(normaliseEmail(' \uFF2Eew.Person@Lab.TEST\n')).toBe('new.person@lab.test');
  });

  it('when a reset is asked for with spaces and capitals then the token is issued for the account', async () => {
    const issued = await t.services.users.issueResetToken(`  ${DEMO_EMAILS.scientist.toUpperCase()} `);
    expect(issued?.user.email).toBe(DEMO_EMAILS.scientist);
  });
});
