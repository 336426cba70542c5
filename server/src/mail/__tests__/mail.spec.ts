import net from 'node:net';
import request from 'supertest';
import { createAnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { DEMO_EMAILS, DEMO_PASSWORD, startTestApp, type TestApp } from '../../testing/test-app';
import type { OutboxMessageDto } from '../outbox.service';
import { SmtpStandIn } from '../smtp-stand-in';

/** Every message the stand-in has received, oldest first, once all triggered mail has gone out. */
async function delivered(t: TestApp): Promise<OutboxMessageDto[]> {
  await t.mail.idle();
  return (await t.mail.outbox.list(0, 200)).items.reverse();
}

/** Wait for mail that is triggered in the background after the answer (password reset). */
async function waitForMail(t: TestApp, match: (m: OutboxMessageDto) => boolean, timeoutMs = 5_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = (await delivered(t)).filter(match);
    if (found.length) return found;
    if (Date.now() > deadline) throw new Error('no such mail arrived');
    await new Promise((r) => setTimeout(r, 25));
  }
}

function linkIn(text: string | null): string {
  const link = /https?:\/\/\S+\/set-password\?token=[\w%-]+/.exec(text ?? '')?.[0];
  if (!link) throw new Error(`no set-password link in:\n${text}`);
  return link;
}

describe('e-mail through the local SMTP stand-in', () => {
  let t: TestApp;

  beforeAll(async () => {
    t = await startTestApp();
    expect(t.mail.standIn.running).toBe(true);
    expect(t.mail.standIn.port).toBeGreaterThan(0);
  });
  afterAll(() => t.stop());

  it('when a batch receives all its expected files then scientists and lab managers get "batch complete" with K', async () => {
    const batch = await createAnalysedBatch(t, { name: 'Completion check batch', expectedFiles: 2 });
    await batch.ingest(0);
    expect((await delivered(t)).filter((m) => m.subject.includes('Completion check batch'))).toEqual([]);
    await batch.ingest(1);
    const mails = (await delivered(t)).filter((m) => m.subject === 'Batch complete: Completion check batch');
    expect(mails.map((m) => m.to).sort()).toEqual([DEMO_EMAILS.lab_manager, DEMO_EMAILS.scientist]);
    const headline = (await t.services.batches.analysis(batch.batchId)).result.headline!;
    expect(mails[0].text).toContain('Best stoichiometry: 1:1');
    // The same K text as the batch page and the PDF, with its unit from the model.
    expect(mails[0].text).toContain(`K = ${headline.text}`);
    expect(headline.text).toMatch(/ L·mol⁻¹ \(95 % CI /);
    expect(mails[0].html).toContain('<li>Best stoichiometry: 1:1</li>');
    expect(mails[0].from).toContain('equilight@localhost');
    // A further event for the same batch sends nothing twice.
    t.events.publish('batch.updated', { id: batch.batchId });
    expect(
      (await delivered(t)).filter((m) => m.subject === 'Batch complete: Completion check batch'),
    ).toHaveLength(2);
  }, 30_000);

  it('when a completed batch has QC errors then the QC mail names them', async () => {
    // An R² floor no real calibration reaches makes the calibration check an error.
    const batch = await createAnalysedBatch(t, { name: 'QC check batch', settings: { r2Min: 0.99999999 } });
    await batch.ingest(0);
    const mails = (await delivered(t)).filter((m) => m.subject === 'QC errors in batch QC check batch');
    expect(mails.map((m) => m.to).sort()).toEqual([DEMO_EMAILS.lab_manager, DEMO_EMAILS.scientist]);
    expect(mails[0].text).toMatch(/calibration R² .* is below 0\.99999999/);
  }, 30_000);

  it('when a batch is approved then the approval mail with comment and approver reaches those who want it', async () => {
    const scientist = await t.agent('scientist');
    const manager = await t.agent('lab_manager');
    // The scientist wants no approval mails.
    const off = await scientist.put('/api/me/notifications').send({ batchApproved: false });
    expect(off.status).toBe(200);
    expect(off.body).toEqual({ batchComplete: true, qcFailure: true, batchApproved: false });
    expect((await scientist.get('/api/me/notifications')).body.batchApproved).toBe(false);

    const batch = await createAnalysedBatch(t, { name: 'Approval check batch' });
    await batch.ingest();
    expect((await scientist.post(`/api/batches/${batch.batchId}/review`)).status).toBe(200);
    const approve = await manager
      .post(`/api/batches/${batch.batchId}/approve`)
      .send({ comment: 'Standards and blanks look right.' });
    expect(approve.status).toBe(200);
    const mails = (await delivered(t)).filter((m) => m.subject === 'Batch approved: Approval check batch');
    expect(mails.map((m) => m.to)).toEqual([DEMO_EMAILS.lab_manager]);
    expect(mails[0].text).toContain('Mika Manager (demo) approved batch "Approval check batch"');
    expect(mails[0].text).toContain('Comment: Standards and blanks look right.');
    expect(mails[0].text).toContain(`${t.config.publicUrl}/batches/${batch.batchId}`);
    // The approved K, from the approval record, and which record and engine it is.
    const record = (await manager.get(`/api/batches/${batch.batchId}/results`)).body[0];
    expect(mails[0].text).toContain(`Approval record ${record.id}, analysis engine ${record.engine.version}`);
    expect(mails[0].text).toContain(`Best stoichiometry: ${record.summary.best}`);
    // The scientist still gets the other kinds.
    const complete = (await delivered(t)).filter((m) => m.subject === 'Batch complete: Approval check batch');
    expect(complete.map((m) => m.to).sort()).toEqual([DEMO_EMAILS.lab_manager, DEMO_EMAILS.scientist]);
    await scientist.put('/api/me/notifications').send({ batchApproved: true });
  }, 30_000);

  it('when notification settings are sent wrong then 400; signed out then 401', async () => {
    const scientist = await t.agent('scientist');
    expect((await scientist.put('/api/me/notifications').send({ batchApproved: 'yes' })).status).toBe(400);
    expect((await scientist.put('/api/me/notifications').send({ everything: true })).status).toBe(400);
    expect((await request(t.app).get('/api/me/notifications')).status).toBe(401);
    expect((await (await t.agent('admin')).get('/api/me/notifications')).body).toEqual({
      batchComplete: true,
      qcFailure: true,
      batchApproved: true,
    });
  });

  it('when an admin invites a person then the invitation mail carries the same one-time link as the API', async () => {
    const admin = await t.agent('admin');
    const res = await admin
      .post('/api/users')
      .send({ email: 'new.analyst@equilight.test', displayName: 'Noor Analyst', role: 'scientist' });
    expect(res.status).toBe(201);
    const [mail] = (await delivered(t)).filter((m) => m.to === 'new.analyst@equilight.test');
    expect(mail.subject).toBe('You have been invited to Equilight');
    expect(mail.text).toContain('Hello Noor Analyst,');
    const link = linkIn(mail.text);
    expect(link).toBe(res.body.setPasswordUrl);
    const token = decodeURIComponent(new URL(link).searchParams.get('token')!);
    const anon = await t.agent();
    expect(
      (await anon.post('/api/auth/set-password').send({ token, password: 'a-long-new-password' })).status,
    ).toBe(200);
    expect(
      (
        await anon
          .post('/api/auth/login')
          .send({ email: 'new.analyst@equilight.test', password: 'a-long-new-password' })
      ).status,
    ).toBe(200);
    // A person created with a password gets no invitation.
    await admin.post('/api/users').send({
      email: 'direct@equilight.test',
      displayName: 'Direct',
      role: 'scientist',
      password: 'another-password-1',
    });
    expect((await delivered(t)).filter((m) => m.to === 'direct@equilight.test')).toEqual([]);
  });

  it('when someone asks for a password reset then the answer is 202 either way and only a real account gets a link', async () => {
    const anon = await t.agent();
    const known = await anon.post('/api/auth/forgot-password').send({ email: 'Scientist@Equilight.test' });
    const unknown = await anon.post('/api/auth/forgot-password').send({ email: 'nobody@equilight.test' });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(known.body);
    const [mail] = await waitForMail(t, (m) => m.subject === 'Reset your Equilight password');
    expect(mail.to).toBe(DEMO_EMAILS.scientist);
    expect((await delivered(t)).filter((m) => m.to === 'nobody@equilight.test')).toEqual([]);
    const token = decodeURIComponent(new URL(linkIn(mail.text)).searchParams.get('token')!);
    expect(
      (await anon.post('/api/auth/set-password').send({ token, password: 'reset-password-123' })).status,
    ).toBe(200);
    // One time only.
    expect(
      (await anon.post('/api/auth/set-password').send({ token, password: 'reset-password-456' })).status,
    ).toBe(400);
    const signIn = await (
      await t.agent()
    )
      .post('/api/auth/login')
      .send({ email: DEMO_EMAILS.scientist, password: 'reset-password-123' });
    expect(signIn.status).toBe(200);
    // Put the demo password back for the other tests.
    const again = await t.services.users.issueResetToken(DEMO_EMAILS.scientist);
    await t.services.users.setPasswordWithToken(again!.token, DEMO_PASSWORD);
  });

  it('when reset requests for one account keep coming then they are refused with 429', async () => {
    const anon = await t.agent();
    const statuses: number[] = [];
    for (let i = 0; i < 7; i++)
      statuses.push(
        (await anon.post('/api/auth/forgot-password').send({ email: 'hammered@equilight.test' })).status,
      );
    expect(statuses.slice(0, 5)).toEqual([202, 202, 202, 202, 202]);
    expect(statuses.at(-1)).toBe(429);
    expect((await anon.post('/api/auth/forgot-password').send({ email: 'not an address' })).status).toBe(400);
  });

  describe('outbox API', () => {
    it('when an admin reads the outbox then messages come newest first, paged, with text and HTML', async () => {
      const admin = await t.agent('admin');
      const all = await admin.get('/api/outbox?pageSize=200');
      expect(all.status).toBe(200);
      expect(all.body.total).toBeGreaterThan(3);
      const page = await admin.get('/api/outbox?page=1&pageSize=2');
      expect(page.body.items).toHaveLength(2);
      expect(page.body.items[0].id).toBe(all.body.items[2].id);
      expect(all.body.items[0].id).toBeGreaterThan(all.body.items[1].id);
      expect(Object.keys(all.body.items[0]).sort()).toEqual(
        ['from', 'html', 'id', 'rawSize', 'receivedAt', 'subject', 'text', 'to'].sort(),
      );
      const one = await admin.get(`/api/outbox/${all.body.items[0].id}`);
      expect(one.body).toEqual(all.body.items[0]);
      expect((await admin.get('/api/outbox?pageSize=0')).status).toBe(400);
      expect((await admin.get('/api/outbox/99999')).status).toBe(404);
    });

    it('when anyone but an admin asks for the outbox then 403 (signed out 401); the status is open to all signed in', async () => {
      expect((await (await t.agent('lab_manager')).get('/api/outbox')).status).toBe(403);
      expect((await (await t.agent('scientist')).get('/api/outbox')).status).toBe(403);
      expect((await request(t.app).get('/api/outbox')).status).toBe(401);
      expect((await request(t.app).get('/api/outbox/status')).status).toBe(401);
      expect((await (await t.agent('scientist')).get('/api/outbox/status')).body).toEqual({ standIn: true });
    });
  });
});

describe('without the stand-in', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ SMTP_STANDIN: 'false' });
  });
  afterAll(() => t.stop());

  it('when the stand-in is off then the outbox is 404 and its status says so; people are still created', async () => {
    const admin = await t.agent('admin');
    const res = await admin.get('/api/outbox');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
    expect((await admin.get('/api/outbox/status')).body).toEqual({ standIn: false });
    const created = await admin
      .post('/api/users')
      .send({ email: 'offline@equilight.test', displayName: 'Offline', role: 'scientist' });
    expect(created.status).toBe(201);
    expect(created.body.setPasswordUrl).toContain('/set-password?token=');
  });
});

describe('when the SMTP server is down', () => {
  it('then the request still succeeds, the mail is retried, and it arrives once the server is back', async () => {
    const port = await new Promise<number>((resolve) => {
      const probe = net.createServer().listen(0, '127.0.0.1', () => {
        const p = (probe.address() as net.AddressInfo).port;
        probe.close(() => resolve(p));
      });
    });
    const logged: string[] = [];
    const t = await startTestApp({ SMTP_URL: `smtp://127.0.0.1:${port}`, SMTP_STANDIN: 'false' });
    try {
      // Log failures somewhere we can see them.
      (t.mail.mail as unknown as { log: (m: string) => void }).log = (m: string) => logged.push(m);
      const admin = await t.agent('admin');
      const res = await admin
        .post('/api/users')
        .send({ email: 'later@equilight.test', displayName: 'Later', role: 'lab_manager' });
      expect(res.status).toBe(201);
      // The server comes up while the sender waits to retry.
      await new Promise((r) => setTimeout(r, 20));
      const late = new SmtpStandIn(t.dataSource, () => undefined);
      await late.start(port);
      try {
        await t.mail.idle();
        await late.idle();
        const items = (await t.mail.outbox.list(0, 10)).items;
        expect(items.map((m) => m.to)).toEqual(['later@equilight.test']);
        expect(logged).toEqual([]);
      } finally {
        await late.stop();
      }
    } finally {
      await t.stop();
    }
  }, 20_000);
});
