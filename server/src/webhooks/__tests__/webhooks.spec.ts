import crypto from 'node:crypto';
import request from 'supertest';
import { LONG_TABLE_PROFILE, createProfile, settled } from '../../ingest/__tests__/ingest-helpers';
import { createAnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { startTestApp, type TestApp, testQuery } from '../../testing/test-app';
import { uuidV5 } from '../webhook-crypto';
import type { DeliveryDto, WebhookDto } from '../webhooks.service';
import { Receiver } from './receiver';

const SECRET = 'lims-shared-secret-7f3a9c21e5';

async function waitFor<T>(what: string, probe: () => Promise<T | undefined>, timeoutMs = 15_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value !== undefined) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

async function deliveriesOf(t: TestApp, webhookId: number): Promise<DeliveryDto[]> {
  await t.mail.idle();
  await t.webhooks.idle();
  return (await t.webhooks.service.deliveries({ webhookId, page: 0, pageSize: 200 })).items;
}

/** Wait until the webhook's delivery for `event` is final (delivered or failed). */
function finalDelivery(t: TestApp, webhookId: number, event: string): Promise<DeliveryDto> {
  return waitFor(`a final ${event} delivery`, async () =>
    (await deliveriesOf(t, webhookId)).find((d) => d.event === event && d.status !== 'pending'),
  );
}

describe('outbound webhooks to a real local receiver', () => {
  let t: TestApp;
  const receiver = new Receiver(SECRET);

  beforeAll(async () => {
    await receiver.listen();
    t = await startTestApp({
      WEBHOOK_MAX_ATTEMPTS: '3',
      WEBHOOK_RETRY_BASE_SECONDS: '0.02',
      WEBHOOK_TIMEOUT_SECONDS: '0.5',
    });
  });
  afterAll(async () => {
    await t.stop();
    await receiver.close();
  });

  async function register(path: string, events: string[]): Promise<WebhookDto> {
    const admin = await t.agent('admin');
    const res = await admin.post('/api/webhooks').send({ url: receiver.url(path), secret: SECRET, events });
    expect(res.status).toBe(201);
    return res.body as WebhookDto;
  }

  async function remove(hook: WebhookDto): Promise<void> {
    const admin = await t.agent('admin');
    expect((await admin.delete(`/api/webhooks/${hook.id}`)).status).toBe(204);
  }

  it('when a scientist or lab manager calls /api/webhooks then 403; signed out 401; an admin gets the list', async () => {
    for (const role of ['scientist', 'lab_manager'] as const) {
      const agent = await t.agent(role);
      expect((await agent.get('/api/webhooks')).status).toBe(403);
      expect((await agent.get('/api/webhooks/deliveries')).status).toBe(403);
      const create = await agent
        .post('/api/webhooks')
        .send({ url: receiver.url('/ok'), secret: SECRET, events: ['batch.approved'] });
      expect(create.status).toBe(403);
      expect((await agent.post('/api/webhooks/deliveries/1/resend')).status).toBe(403);
    }
    expect((await request(t.app).get('/api/webhooks')).status).toBe(401);
    const admin = await t.agent('admin');
    const list = await admin.get('/api/webhooks');
    expect(list.status).toBe(200);
    expect(list.body).toEqual([]);
  });

  it('when the URL is plain http to another host then 400; https and http to this machine are accepted', async () => {
    const admin = await t.agent('admin');
    const post = (body: Record<string, unknown>) =>
      admin.post('/api/webhooks').send({ secret: SECRET, events: ['batch.approved'], ...body });
    const refusedHttp = await post({ url: 'http://lims.example.org/hooks' });
    expect(refusedHttp.status).toBe(400);
    expect(refusedHttp.body.error.message).toMatch(/must use https/);
    expect((await post({ url: 'ftp://lims.example.org/hooks' })).status).toBe(400);
    expect((await post({ url: 'https://user:pw@lims.example.org/hooks' })).status).toBe(400);
    expect((await post({ url: 'not a url' })).status).toBe(400);
    expect((await post({ url: 'https://lims.example.org/hooks', events: [] })).status).toBe(400);
    expect((await post({ url: 'https://lims.example.org/hooks', events: ['batch.created'] })).status).toBe(
      400,
    );
    expect((await post({ url: 'https://lims.example.org/hooks', secret: 'short' })).status).toBe(400);
    expect((await post({ url: 'https://lims.example.org/hooks', extra: 1 })).status).toBe(400);

    const https = await post({ url: 'https://lims.example.org/hooks' });
    expect(https.status).toBe(201);
    expect(https.body).toMatchObject({ url: 'https://lims.example.org/hooks', events: ['batch.approved'] });
    for (const url of ['http://localhost:9/x', 'http://127.0.0.1:9/x', 'http://[::1]:9/x']) {
      const local = await post({ url });
      expect([url, local.status]).toEqual([url, 201]);
      await admin.delete(`/api/webhooks/${local.body.id}`);
    }
    await admin.delete(`/api/webhooks/${https.body.id}`);
  });

  it('when a webhook is created then its secret is never sent back, only masked, and is stored encrypted', async () => {
    const admin = await t.agent('admin');
    const created = await admin
      .post('/api/webhooks')
      .send({ url: 'https://eln.example.org/in', secret: SECRET, events: ['file.quarantined'] });
    expect(created.status).toBe(201);
    expect(created.body.secretMasked).toBe(`••••••••${SECRET.slice(-4)}`);
    const answers = [
      created.body,
      (await admin.get('/api/webhooks')).body,
      (await admin.get(`/api/webhooks/${created.body.id}`)).body,
      (await admin.patch(`/api/webhooks/${created.body.id}`).send({ active: false })).body,
    ];
    for (const body of answers) expect(JSON.stringify(body)).not.toContain(SECRET.slice(0, 12));
    const [row] = await testQuery(t.dataSource, 'SELECT * FROM webhooks WHERE id = ?', [created.body.id]);
    expect(JSON.stringify(row)).not.toContain(SECRET.slice(0, 12));
    expect(row.secret_encrypted).toMatch(/^v1\./);
    // Registering and removing are in the audit trail.
    await admin.delete(`/api/webhooks/${created.body.id}`);
    const audit = await admin.get('/api/audit').query({ entity: 'webhook', entityId: created.body.id });
    expect(audit.body.items.map((e: { action: string }) => e.action).sort()).toEqual([
      'create',
      'delete',
      'update',
    ]);
  });

  it('when a file is quarantined then the receiver gets it once, signed with the shared secret', async () => {
    const hook = await register('/ok', ['file.quarantined']);
    const admin = await t.agent('admin');
    const profile = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Webhook reader',
      dropSubfolder: 'webhook-reader',
    });
    const bytes = Buffer.from('sample,signal\nA1,0.5\n');
    const upload = await request(t.app)
      .post('/api/ingest')
      .set('Authorization', `Bearer ${profile.token}`)
      .attach('file', bytes, 'RUN-77-broken.csv');
    const file = await settled(t, upload.body.id);
    expect(file.status).toBe('quarantined');

    const delivery = await finalDelivery(t, hook.id, 'file.quarantined');
    expect(delivery).toMatchObject({ status: 'delivered', attempts: 1, lastResponseCode: 200 });
    const got = receiver.received.filter((r) => r.payload.id === delivery.eventId);
    expect(got).toHaveLength(1);
    const [one] = got;
    expect(one!.signatureValid).toBe(true);
    expect(one!.headers['content-type']).toBe('application/json');
    expect(one!.headers['user-agent']).toMatch(/^Equilight-Webhooks\/\d+\.\d+\.\d+$/);
    // Within a minute of now: the signed time is Unix seconds.
    const signedAt = Number(/t=(\d+)/.exec(String(one!.headers['x-equilight-signature']))![1]);
    expect(Math.abs(signedAt - Date.now() / 1000)).toBeLessThan(60);
    expect(Object.keys(one!.payload).sort()).toEqual(['data', 'event', 'id', 'occurredAt']);
    expect(one!.payload.event).toBe('file.quarantined');
    expect(one!.payload.id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-5[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(one!.payload.data).toMatchObject({
      fileId: file.id,
      name: 'RUN-77-broken.csv',
      // SHA-256 of the bytes sent, computed here with node:crypto.
      sha256: crypto.createHash('sha256').update(bytes).digest('hex'),
      instrument: 'Webhook reader',
      reason: file.error,
    });
    expect(one!.payload.occurredAt).toBe(file.finishedAt);
    // The body received is byte for byte the one logged (and signed).
    expect(JSON.parse(one!.body)).toEqual(delivery.payload);
    await remove(hook);
  }, 30_000);

  it('when the receiver fails twice then succeeds then the event is delivered once, after 3 tries, by event id', async () => {
    const hook = await register('/flaky', ['batch.approved']);
    const batch = await createAnalysedBatch(t, { name: 'Webhook approval batch' });
    await batch.ingest();
    const scientist = await t.agent('scientist');
    const manager = await t.agent('lab_manager');
    expect((await scientist.post(`/api/batches/${batch.batchId}/review`)).status).toBe(200);
    const approved = await manager
      .post(`/api/batches/${batch.batchId}/approve`)
      .send({ comment: 'Calibration and blanks checked.' });
    expect(approved.status).toBe(200);

    const delivery = await finalDelivery(t, hook.id, 'batch.approved');
    expect(delivery).toMatchObject({
      status: 'delivered',
      attempts: 3,
      lastResponseCode: 200,
      lastError: null,
    });
    const tries = receiver.received.filter((r) => r.payload.id === delivery.eventId);
    expect(tries.map((r) => r.answered)).toEqual([500, 500, 200]);
    expect(tries.every((r) => r.signatureValid && r.body === tries[0]!.body)).toBe(true);
    expect(receiver.accepted(delivery.eventId)).toHaveLength(1);
    const headline = (await t.services.batches.analysis(batch.batchId)).result.headline!;
    expect(tries[0]!.payload.data).toMatchObject({
      batchId: batch.batchId,
      name: 'Webhook approval batch',
      state: 'approved',
      runId: expect.stringMatching(/^CX-/),
      bestModel: '1:1',
      kText: headline.text,
      comment: 'Calibration and blanks checked.',
    });

    // The same approval reported again records nothing new and sends nothing.
    t.events.publish('batch.updated', { id: batch.batchId, state: 'approved' });
    await new Promise((r) => setTimeout(r, 200));
    const all = (await deliveriesOf(t, hook.id)).filter((d) => d.event === 'batch.approved');
    expect(all).toHaveLength(1);
    expect(receiver.accepted(delivery.eventId)).toHaveLength(1);
    await remove(hook);
  }, 60_000);

  it('when the receiver keeps failing then the delivery fails after the last try; sent again by hand it is delivered', async () => {
    receiver.down = true;
    const hook = await register('/down', ['batch.qc_failed']);
    // An R² floor no real calibration reaches makes the calibration check a QC error.
    const batch = await createAnalysedBatch(t, { name: 'Webhook QC batch', settings: { r2Min: 0.99999999 } });
    await batch.ingest();
    const failed = await finalDelivery(t, hook.id, 'batch.qc_failed');
    expect(failed).toMatchObject({ status: 'failed', attempts: 3, lastResponseCode: 503 });
    expect(failed.lastError).toMatch(/HTTP 503: try later/);
    const payload = failed.payload as { data: { qcErrors: { code: string; message: string }[] } };
    expect(payload.data.qcErrors.map((e) => e.message).join(' ')).toMatch(/R² .* is below 0\.99999999/);
    expect(receiver.accepted(failed.eventId)).toHaveLength(0);

    const admin = await t.agent('admin');
    const filtered = await admin
      .get('/api/webhooks/deliveries')
      .query({ status: 'failed', webhookId: hook.id });
    expect(filtered.status).toBe(200);
    expect(filtered.body.items.map((d: DeliveryDto) => d.id)).toEqual([failed.id]);
    expect(filtered.body.total).toBe(1);

    receiver.down = false;
    const resend = await admin.post(`/api/webhooks/deliveries/${failed.id}/resend`);
    expect(resend.status).toBe(202);
    const delivered = await waitFor('the re-sent delivery', async () => {
      const d = (await deliveriesOf(t, hook.id)).find((x) => x.id === failed.id)!;
      return d.status === 'delivered' ? d : undefined;
    });
    expect(delivered).toMatchObject({ attempts: 4, lastResponseCode: 200, eventId: failed.eventId });
    expect(receiver.accepted(failed.eventId)).toHaveLength(1);
    const list = (await admin.get('/api/webhooks')).body as WebhookDto[];
    expect(list.find((h) => h.id === hook.id)!.counts).toEqual({ pending: 0, delivered: 1, failed: 0 });
    await remove(hook);
  }, 60_000);

  it('when the receiver does not answer in time then the try counts as failed with a clear message', async () => {
    const hook = await register('/silent', ['file.quarantined']);
    const occurrence = 'file.quarantined:test-timeout';
    await t.webhooks.service.emit('file.quarantined', occurrence, new Date().toISOString(), { fileId: 0 });
    const failed = await finalDelivery(t, hook.id, 'file.quarantined');
    expect(failed).toMatchObject({ status: 'failed', attempts: 3, lastResponseCode: null });
    expect(failed.lastError).toBe('No answer within 0.5 s');
    expect(failed.eventId).toBe(uuidV5(occurrence));
    const admin = await t.agent('admin');
    // A disabled webhook gets nothing and cannot be re-sent to.
    await admin.patch(`/api/webhooks/${hook.id}`).send({ active: false });
    const refused = await admin.post(`/api/webhooks/deliveries/${failed.id}/resend`);
    expect(refused.status).toBe(409);
    expect(await t.webhooks.service.emit('file.quarantined', 'another', new Date().toISOString(), {})).toBe(
      0,
    );
    await remove(hook);
  }, 30_000);
});

describe('webhook deliveries across a restart', () => {
  const receiver = new Receiver(SECRET);
  const env = { WEBHOOK_MAX_ATTEMPTS: '6', WEBHOOK_RETRY_BASE_SECONDS: '0.3' };
  let t: TestApp;

  beforeAll(() => receiver.listen());
  afterAll(async () => {
    await t?.stop();
    await receiver.close();
  });

  it('when the server stops between tries then the next start delivers the rest, each event exactly once', async () => {
    receiver.down = true;
    t = await startTestApp(env);
    const admin = await t.agent('admin');
    const hook = (
      await admin
        .post('/api/webhooks')
        .send({ url: receiver.url('/down'), secret: SECRET, events: ['file.quarantined'] })
    ).body as WebhookDto;
    await t.webhooks.service.emit('file.quarantined', 'restart-check', new Date().toISOString(), {
      fileId: 1,
    });
    const tried = await waitFor('a first failed try', async () =>
      (await deliveriesOf(t, hook.id)).find((d) => d.attempts >= 1),
    );
    expect(tried.status).toBe('pending');
    // A delivery recorded just before a crash, before its job was queued.
    const orphanId = uuidV5('restart-orphan');
    await testQuery(
      t.dataSource,
      `INSERT INTO webhook_deliveries (event_id, event, webhook_id, payload, status, attempts, created_at)
       VALUES (?, 'file.quarantined', ?, ?, 'pending', 0, ?)`,
      [
        orphanId,
        hook.id,
        JSON.stringify({
          id: orphanId,
          event: 'file.quarantined',
          occurredAt: new Date().toISOString(),
          data: {},
        }),
        new Date().toISOString(),
      ],
    );
    await t.shutDown();

    receiver.down = false;
    t = await startTestApp(env, t.dir);
    const delivered = await waitFor('both delivered after the restart', async () => {
      const all = await deliveriesOf(t, hook.id);
      return all.length === 2 && all.every((d) => d.status === 'delivered') ? all : undefined;
    });
    expect(delivered.map((d) => d.eventId).sort()).toEqual([tried.eventId, orphanId].sort());
    for (const d of delivered) expect(receiver.accepted(d.eventId)).toHaveLength(1);
    // Nothing is sent a second time later on.
    await new Promise((r) => setTimeout(r, 700));
    for (const d of delivered) expect(receiver.accepted(d.eventId)).toHaveLength(1);
  }, 60_000);
});

describe('event ids', () => {
  it('are name-based UUIDs (version 5) as RFC 9562 specifies', () => {
    // RFC 9562, Appendix A.4: UUIDv5 of "www.example.com" in the DNS namespace.
    expect(uuidV5('www.example.com', '6ba7b810-9dad-11d1-80b4-00c04fd430c8')).toBe(
      '2ed6657d-e927-568b-95e1-2665a8aea6a2',
    );
    expect(uuidV5('batch.approved:1:2026-01-01T00:00:00.000Z')).toBe(
      uuidV5('batch.approved:1:2026-01-01T00:00:00.000Z'),
    );
    expect(uuidV5('batch.approved:1:a')).not.toBe(uuidV5('batch.approved:1:b'));
  });
});
