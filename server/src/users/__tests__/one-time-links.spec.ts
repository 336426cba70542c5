import { DEMO_EMAILS, startTestApp, type TestApp, testQuery } from '../../testing/test-app';

describe('one-time links and sessions after a new password', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.stop());

  it('when one reset token is used ten times at once then exactly one use succeeds', async () => {
    const issued = await t.services.users.issueResetToken(DEMO_EMAILS.lab_manager);
    const anon = await t.agent();
    const results = await Promise.all(
      Array.from({ length: 10 }, (_, i) =>
        anon.post('/api/auth/set-password').send({ token: issued!.token, password: `concurrent-pass-${i}` }),
      ),
    );
    const statuses = results.map((r) => r.status);
    expect(statuses.filter((s) => s === 200)).toHaveLength(1);
    expect(statuses.filter((s) => s === 400)).toHaveLength(9);
    const winner = results.findIndex((r) => r.status === 200);
    const signIn = await (
      await t.agent()
    )
      .post('/api/auth/login')
      .send({ email: DEMO_EMAILS.lab_manager, password: `concurrent-pass-${winner}` });
    expect(signIn.status).toBe(200);
  });

  it('when an invitation token is used ten times at once then exactly one use succeeds', async () => {
    const created = await t.services.users.create({
      email: 'invited.twice@lab.test',
      displayName: 'Invited',
      role: 'scientist',
    });
    const anon = await t.agent();
    const statuses = (
      await Promise.all(
        Array.from({ length: 10 }, (_, i) =>
          anon
            .post('/api/auth/set-password')
            .send({ token: created.setPasswordToken!, password: `invited-pass-${i}` }),
        ),
      )
    ).map((r) => r.status);
    expect(statuses.filter((s) => s === 200)).toHaveLength(1);
  });

  it('when a password is reset then another signed-in session of that person gets 401', async () => {
    const elsewhere = await t.agent('scientist');
    const bystander = await t.agent('admin');
    expect((await elsewhere.get('/api/auth/me')).status).toBe(200);
    const issued = await t.services.users.issueResetToken(DEMO_EMAILS.scientist);
    const anon = await t.agent();
    expect(
      (await anon.post('/api/auth/set-password').send({ token: issued!.token, password: 'fresh-passphrase' }))
        .status,
    ).toBe(200);
    const after = await elsewhere.get('/api/auth/me');
    expect(after.status).toBe(401);
    expect((await elsewhere.get('/api/batches')).status).toBe(401);
    // Other people's sessions are untouched.
    expect((await bystander.get('/api/auth/me')).status).toBe(200);
  });

  it('when an expired token is used then it is refused and the password is unchanged', async () => {
    const issued = await t.services.users.issueResetToken(DEMO_EMAILS.admin);
    await testQuery(t.dataSource, 'UPDATE users SET set_password_expires_at = ? WHERE email = ?', [
      Date.now() - 1000,
      DEMO_EMAILS.admin,
    ]);
    const anon = await t.agent();
    const res = await anon
      .post('/api/auth/set-password')
      .send({ token: issued!.token, password: 'too-late-pass' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/invalid or has expired/);
  });
});
