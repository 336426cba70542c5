import request from 'supertest';
import type { LiveEvent } from '../../events/event-bus';
import { RedisEventBus } from '../../events/redis-event-bus';
import { createProfile, longTableCsv, readingCount, settled } from '../../ingest/__tests__/ingest-helpers';
import { DEMO_EMAILS, startTestApp, type TestApp } from '../../testing/test-app';
import { describeWithRedis, removeRedisKeys, TEST_REDIS_URL, testRedisConfig } from '../../testing/redis';

jest.setTimeout(60_000);

/**
 * Two apps on one database (SQLite file, or on the PostgreSQL pass one schema) and one Redis prefix, as two
 * server processes would be: one queue, one event channel, one set of sign-in counts.
 */
describeWithRedis('two apps sharing Redis', () => {
  const redis = testRedisConfig('apps');
  let one: TestApp;
  let two: TestApp;

  beforeAll(async () => {
    const env = { QUEUE_URL: TEST_REDIS_URL, QUEUE_PREFIX: redis.prefix, LOGIN_RATE_LIMIT: '3' };
    one = await startTestApp(env);
    two = await startTestApp(env, one.dir);
  });
  afterAll(async () => {
    await two?.shutDown();
    await one?.stop();
    await removeRedisKeys(redis.prefix);
  });

  it('runs on BullMQ and the Redis event bus', () => {
    expect(one.queues.describe()).toContain('BullMQ');
    expect(one.events).toBeInstanceOf(RedisEventBus);
    expect(two.events).toBeInstanceOf(RedisEventBus);
  });

  it('when failed sign-ins are spread over both apps then the one limit still holds', async () => {
    const [a, b] = [await one.agent(), await two.agent()];
    const wrong = { email: DEMO_EMAILS.scientist, password: 'not-the-password' };
    expect((await a.post('/api/auth/login').send(wrong)).status).toBe(401);
    expect((await b.post('/api/auth/login').send(wrong)).status).toBe(401);
    expect((await a.post('/api/auth/login').send(wrong)).status).toBe(401);
    // The fourth, on the app that has seen only one: counted in Redis, it is over the limit of 3.
    const res = await b.post('/api/auth/login').send(wrong);
    expect(res.status).toBe(429);
    expect(res.body.error.code).toBe('too_many_attempts');
    // Another account from the same address is counted apart.
    const other = { email: DEMO_EMAILS.lab_manager, password: 'not-the-password' };
    expect((await b.post('/api/auth/login').send(other)).status).toBe(401);
  });

  it('when reset requests are spread over both apps then their limit holds too', async () => {
    const [a, b] = [await one.agent(), await two.agent()];
    const ask = (agent: typeof a) =>
      agent.post('/api/auth/forgot-password').send({ email: DEMO_EMAILS.admin });
    expect((await ask(a)).status).toBe(202);
    expect((await ask(b)).status).toBe(202);
    expect((await ask(a)).status).toBe(202);
    expect((await ask(b)).status).toBe(429);
  });

  it('when files arrive at both apps then each is stored once and both apps’ live listeners hear of every one', async () => {
    const { profile, token } = await createProfile(await one.agent('admin'));
    const heard = new Map<TestApp, LiveEvent[]>([
      [one, []],
      [two, []],
    ]);
    const local = new Map<TestApp, number[]>([
      [one, []],
      [two, []],
    ]);
    for (const app of [one, two]) {
      app.events.subscribe((e) => {
        if (e.type === 'file.stored') heard.get(app)!.push(e);
      });
      app.events.subscribeLocal((e) => {
        if (e.type === 'file.stored') local.get(app)!.push(e.data.id);
      });
    }
    const ids: number[] = [];
    for (let i = 0; i < 20; i++) {
      const app = i % 2 ? two : one;
      const res = await request(app.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${token}`)
        .attach('file', Buffer.from(longTableCsv(500 + i)), `RUN-${500 + i}.csv`);
      expect(res.status).toBe(202);
      ids.push(res.body.id);
    }
    for (const id of ids) expect((await settled(one, id, 30_000)).status).toBe('unassigned');
    const heardIds = (app: TestApp) => new Set(heard.get(app)!.map((e) => e.data.id));
    const deadline = Date.now() + 10_000;
    while ([one, two].some((app) => heardIds(app).size < ids.length) && Date.now() < deadline)
      await new Promise((r) => setTimeout(r, 20));

    for (const app of [one, two]) expect([...heardIds(app)].sort((a, b) => a - b)).toEqual(ids);
    // Each file was stored by exactly one of the two apps: it told its own listeners once.
    expect([...local.get(one)!, ...local.get(two)!].sort((a, b) => a - b)).toEqual(ids);
    for (const id of ids) expect(await readingCount(one, id)).toBe(96);
    expect(profile.id).toBeGreaterThan(0);
  });
});
