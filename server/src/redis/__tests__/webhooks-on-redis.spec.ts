import request from 'supertest';
import { LONG_TABLE_PROFILE, createProfile, settled } from '../../ingest/__tests__/ingest-helpers';
import { describeWithRedis, removeRedisKeys, TEST_REDIS_URL, testRedisConfig } from '../../testing/redis';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { Receiver } from '../../webhooks/__tests__/receiver';
import type { DeliveryDto } from '../../webhooks/webhooks.service';

jest.setTimeout(90_000);

const SECRET = 'lims-shared-secret-on-redis-41b7';

/**
 * Webhook deliveries when the queues live on Redis (BullMQ) and two apps share it and one database, as two
 * server processes would: each event reaches the receiver once, through its retries, whichever app saw it.
 */
describeWithRedis('webhooks on the BullMQ queue, two apps', () => {
  const redis = testRedisConfig('webhooks');
  const receiver = new Receiver(SECRET);
  let one: TestApp;
  let two: TestApp;

  beforeAll(async () => {
    await receiver.listen();
    const env = {
      QUEUE_URL: TEST_REDIS_URL,
      QUEUE_PREFIX: redis.prefix,
      WEBHOOK_MAX_ATTEMPTS: '3',
      WEBHOOK_RETRY_BASE_SECONDS: '0.05',
      WEBHOOK_TIMEOUT_SECONDS: '2',
    };
    one = await startTestApp(env);
    two = await startTestApp(env, one.dir);
  });
  afterAll(async () => {
    await two?.shutDown();
    await one?.stop();
    await receiver.close();
    await removeRedisKeys(redis.prefix);
  });

  it('when files are quarantined at both apps and the receiver fails twice each time then every event is delivered once, after 3 tries', async () => {
    expect(one.queues.describe()).toContain('BullMQ');
    const admin = await one.agent('admin');
    const hook = await admin
      .post('/api/webhooks')
      .send({ url: receiver.url('/flaky'), secret: SECRET, events: ['file.quarantined'] });
    expect(hook.status).toBe(201);
    const profile = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Shared-queue reader',
      dropSubfolder: 'shared-queue-reader',
    });
    const fileIds: number[] = [];
    for (let i = 0; i < 6; i++) {
      const app = i % 2 ? two : one;
      const upload = await request(app.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${profile.token}`)
        .attach('file', Buffer.from(`sample,signal\nA${i + 1},0.${i + 1}\n`), `RUN-${90 + i}-broken.csv`);
      expect(upload.status).toBe(202);
      fileIds.push(upload.body.id as number);
    }
    for (const id of fileIds) expect((await settled(one, id)).status).toBe('quarantined');

    const deadline = Date.now() + 60_000;
    let deliveries: DeliveryDto[];
    for (;;) {
      deliveries = (await one.webhooks.service.deliveries({ webhookId: hook.body.id, page: 0, pageSize: 50 }))
        .items;
      if (deliveries.length === 6 && deliveries.every((d) => d.status !== 'pending')) break;
      if (Date.now() > deadline) throw new Error(`deliveries not final: ${JSON.stringify(deliveries)}`);
      await new Promise((r) => setTimeout(r, 50));
    }
    expect(deliveries.map((d) => [d.status, d.attempts])).toEqual(Array(6).fill(['delivered', 3]));
    expect(new Set(deliveries.map((d) => (d.payload as { data: { fileId: number } }).data.fileId))).toEqual(
      new Set(fileIds),
    );
    for (const d of deliveries) {
      const tries = receiver.received.filter((r) => r.payload.id === d.eventId);
      expect([d.eventId, tries.map((r) => r.answered)]).toEqual([d.eventId, [500, 500, 200]]);
      expect(tries.every((r) => r.signatureValid)).toBe(true);
    }
  });
});
