import bcrypt from 'bcryptjs';
import { loadConfig } from '../../config';
import { seedDemoPeople } from '../../seed/demo-people';
import { DEMO_EMAILS, DEMO_PASSWORD, startTestApp, type TestApp, testQuery } from '../../testing/test-app';

type Who = 'signed out' | 'admin' | 'lab_manager' | 'scientist';
const EVERYONE: Who[] = ['signed out', 'admin', 'lab_manager', 'scientist'];

describe('people API', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.stop());

  const as = (who: Who) => t.agent(who === 'signed out' ? undefined : who);

  describe.each([
    ['GET /api/users', (a: Awaited<ReturnType<typeof as>>) => a.get('/api/users')],
    [
      'POST /api/users',
      (a: Awaited<ReturnType<typeof as>>) =>
        a
          .post('/api/users')
          .send({ email: `new-${Math.random()}@lab.test`, displayName: 'New', role: 'scientist' }),
    ],
    [
      'PATCH /api/users/:id',
      (a: Awaited<ReturnType<typeof as>>) => a.patch('/api/users/3').send({ displayName: 'Sam S.' }),
    ],
  ])('%s', (_route, call) => {
    it.each(EVERYONE)('as %s', async (who) => {
      const res = await call(await as(who));
      const expected = who === 'signed out' ? 401 : who === 'admin' ? [200, 201] : 403;
      if (Array.isArray(expected)) expect(expected).toContain(res.status);
      else expect(res.status).toBe(expected);
    });
  });

  it('when an admin creates a person with a password then they can sign in', async () => {
    const admin = await as('admin');
    const res = await admin.post('/api/users').send({
      email: 'Lena.Lab@Example.test',
      displayName: 'Lena Lab',
      role: 'lab_manager',
      password: 'a-long-passphrase',
    });
    expect(res.status).toBe(201);
    expect(res.body.user).toMatchObject({
      email: 'lena.lab@example.test',
      role: 'lab_manager',
      active: true,
      invited: false,
    });
    expect(res.body.setPasswordUrl).toBeUndefined();
    const lena = await t.agent();
    const login = await lena
      .post('/api/auth/login')
      .send({ email: 'lena.lab@example.test', password: 'a-long-passphrase' });
    expect(login.status).toBe(200);
  });

  it('when an admin invites a person then the one-time link sets the password once', async () => {
    const admin = await as('admin');
    const res = await admin
      .post('/api/users')
      .send({ email: 'invitee@lab.test', displayName: 'Invitee', role: 'scientist' });
    expect(res.status).toBe(201);
    // invited, not yet able to sign in: the list says so until the password is set
    expect(res.body.user).toMatchObject({ active: true, invited: true });
    const invitedRow = (await admin.get('/api/users')).body.find(
      (u: { email: string }) => u.email === 'invitee@lab.test',
    );
    expect(invitedRow.invited).toBe(true);
    const token = new URL(res.body.setPasswordUrl).searchParams.get('token');
    expect(token).toBeTruthy();
    const anon = await t.agent();
    expect(
      (await anon.post('/api/auth/login').send({ email: 'invitee@lab.test', password: 'anything-at-all' }))
        .status,
    ).toBe(401);
    expect(
      (await anon.post('/api/auth/set-password').send({ token, password: 'invited-passphrase' })).status,
    ).toBe(200);
    expect(
      (await anon.post('/api/auth/set-password').send({ token, password: 'second-passphrase' })).status,
    ).toBe(400);
    expect(
      (await anon.post('/api/auth/login').send({ email: 'invitee@lab.test', password: 'invited-passphrase' }))
        .status,
    ).toBe(200);
    const afterRow = (await admin.get('/api/users')).body.find(
      (u: { email: string }) => u.email === 'invitee@lab.test',
    );
    expect(afterRow.invited).toBe(false);
  });

  it.each([
    [
      'a duplicate e-mail',
      { email: DEMO_EMAILS.admin, displayName: 'X', role: 'admin', password: 'long-enough-1' },
      409,
      /already exists/,
    ],
    [
      'an unknown role',
      { email: 'r@lab.test', displayName: 'R', role: 'wizard' },
      400,
      /role: must be one of/,
    ],
    [
      'a short password',
      { email: 's@lab.test', displayName: 'S', role: 'scientist', password: 'short' },
      400,
      /password: must be at least 10/,
    ],
    [
      'a bad e-mail',
      { email: 'not-an-email', displayName: 'S', role: 'scientist' },
      400,
      /email: must be an e-mail/,
    ],
    [
      'an over-long name',
      { email: 'n@lab.test', displayName: 'n'.repeat(200), role: 'scientist' },
      400,
      /displayName: must be at most 120/,
    ],
  ])('when the new person has %s then a clear error', async (_label, body, status, message) => {
    const res = await (await as('admin')).post('/api/users').send(body);
    expect(res.status).toBe(status);
    expect(res.body.error.message).toMatch(message);
  });

  it('when a role changes then it takes effect on the next request', async () => {
    const admin = await as('admin');
    const created = await admin.post('/api/users').send({
      email: 'mover@lab.test',
      displayName: 'Mover',
      role: 'scientist',
      password: 'mover-passphrase',
    });
    const mover = await t.agent();
    await mover.post('/api/auth/login').send({ email: 'mover@lab.test', password: 'mover-passphrase' });
    expect((await mover.get('/api/users')).status).toBe(403);
    expect((await admin.patch(`/api/users/${created.body.user.id}`).send({ role: 'admin' })).status).toBe(
      200,
    );
    expect((await mover.get('/api/users')).status).toBe(200);
  });

  it('when a person is deactivated then their session ends and they cannot sign in', async () => {
    const admin = await as('admin');
    const created = await admin.post('/api/users').send({
      email: 'leaver@lab.test',
      displayName: 'Leaver',
      role: 'scientist',
      password: 'leaver-passphrase',
    });
    const leaver = await t.agent();
    await leaver.post('/api/auth/login').send({ email: 'leaver@lab.test', password: 'leaver-passphrase' });
    expect((await leaver.get('/api/auth/me')).status).toBe(200);
    expect((await admin.patch(`/api/users/${created.body.user.id}`).send({ active: false })).status).toBe(
      200,
    );
    expect((await leaver.get('/api/auth/me')).status).toBe(401);
    const again = await (
      await t.agent()
    )
      .post('/api/auth/login')
      .send({ email: 'leaver@lab.test', password: 'leaver-passphrase' });
    expect(again.status).toBe(401);
    expect(again.body.error.message).toMatch(/deactivated/);
  });

  it('adding, inviting, changing the role of and deactivating a person write audit entries', async () => {
    const admin = await as('admin');
    const stamp = Date.now();
    const added = await admin.post('/api/users').send({
      email: `audited-${stamp}@lab.test`,
      displayName: 'Audited Added',
      role: 'scientist',
      password: 'a-long-enough-password',
    });
    expect(added.status).toBe(201);
    const invited = await admin
      .post('/api/users')
      .send({ email: `invited-${stamp}@lab.test`, displayName: 'Audited Invited', role: 'lab_manager' });
    expect(invited.status).toBe(201);
    const id = added.body.user.id as number;
    expect((await admin.patch(`/api/users/${id}`).send({ role: 'lab_manager' })).status).toBe(200);
    expect((await admin.patch(`/api/users/${id}`).send({ active: false })).status).toBe(200);
    expect((await admin.patch(`/api/users/${id}`).send({ active: false })).status).toBe(200); // no change

    const trail = await admin.get('/api/audit').query({ entity: 'user', pageSize: 100 });
    expect(trail.status).toBe(200);
    const mine = (
      trail.body.items as { action: string; entityId: number; summary: string; actorName: string }[]
    )
      .filter((e) => e.summary.includes(String(stamp)))
      .map((e) => [e.action, e.entityId, e.actorName]);
    expect(mine).toEqual(
      expect.arrayContaining([
        ['create', id, DEMO_EMAILS.admin],
        ['invite', invited.body.user.id, DEMO_EMAILS.admin],
        ['change_role', id, DEMO_EMAILS.admin],
        ['deactivate', id, DEMO_EMAILS.admin],
      ]),
    );
    expect(mine).toHaveLength(4);
    const roleChange = (trail.body.items as { action: string; before: unknown; after: unknown }[]).find(
      (e) => e.action === 'change_role',
    );
    expect(roleChange).toMatchObject({ before: { role: 'scientist' }, after: { role: 'lab_manager' } });
  });

  it('when the last admin would be demoted then 409', async () => {
    const fresh = await startTestApp();
    try {
      const admin = await fresh.agent('admin');
      const list = await admin.get('/api/users');
      const adminId = list.body.find((u: { role: string }) => u.role === 'admin').id;
      const res = await admin.patch(`/api/users/${adminId}`).send({ role: 'scientist' });
      expect(res.status).toBe(409);
      expect(res.body.error.message).toMatch(/last active administrator/);
    } finally {
      await fresh.stop();
    }
  });

  it('when the patch is empty then 400', async () => {
    const res = await (await as('admin')).patch('/api/users/2').send({});
    expect(res.status).toBe(400);
  });

  it('never lists password hashes', async () => {
    const res = await (await as('admin')).get('/api/users');
    expect(res.body.length).toBeGreaterThanOrEqual(3);
    expect(JSON.stringify(res.body)).not.toMatch(/hash|\$2[aby]\$/i);
    expect(DEMO_PASSWORD).toBeTruthy();
  });
});

describe('demo seeding', () => {
  it('when the database already has people then seeding leaves it alone', async () => {
    const t = await startTestApp();
    try {
      expect(await seedDemoPeople(t.services.users, 'another-password')).toBe(false);
      expect(await t.services.users.count()).toBe(3);
    } finally {
      await t.stop();
    }
  });
});

describe('stored passwords', () => {
  it('when the app runs with its own settings then a new password is a bcrypt hash of cost 10', async () => {
    // Cost 10 (2¹⁰ rounds) for interactive sign-in: common practice. Tests run at cost 4 for speed only.
    const t = await startTestApp({ PASSWORD_HASH_ROUNDS_FOR_TESTS: '' });
    try {
      expect(t.config.passwordHashRounds).toBe(10);
      const admin = await t.agent('admin');
      const created = await admin.post('/api/users').send({
        email: 'cost@equilight.test',
        displayName: 'Cost Check',
        role: 'scientist',
        password: 'a-long-password-1',
      });
      expect(created.status).toBe(201);
      const [row] = await testQuery<{ passwordHash: string }[]>(
        t.dataSource,
        'SELECT password_hash AS "passwordHash" FROM users WHERE email = ?',
        ['cost@equilight.test'],
      );
      expect(bcrypt.getRounds(row!.passwordHash)).toBe(10);
      expect(await bcrypt.compare('a-long-password-1', row!.passwordHash)).toBe(true);
    } finally {
      await t.stop();
    }
  });

  it('when the test-only cost is set outside NODE_ENV=test then the server refuses to start', () => {
    expect(() =>
      loadConfig({
        NODE_ENV: 'production',
        SESSION_SECRET: 'x'.repeat(32),
        PASSWORD_HASH_ROUNDS_FOR_TESTS: '4',
      }),
    ).toThrow(/PASSWORD_HASH_ROUNDS_FOR_TESTS: only with NODE_ENV=test/);
  });
});
