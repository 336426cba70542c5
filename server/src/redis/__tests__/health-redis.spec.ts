import { createArchive } from '../../ingest/create-archive';
import { HealthService } from '../../maintenance/health.service';
import { freePort } from '../../testing/free-port';
import { describeWithRedis, removeRedisKeys, TEST_REDIS_URL, testRedisConfig } from '../../testing/redis';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { closeRedis, openRedis } from '../redis-connection';

jest.setTimeout(60_000);

describeWithRedis('/api/health with Redis configured', () => {
  const redis = testRedisConfig('health');
  let t: TestApp;

  beforeAll(async () => {
    t = await startTestApp({ REDIS_URL: TEST_REDIS_URL, REDIS_PREFIX: redis.prefix });
  });
  afterAll(async () => {
    await t?.stop();
    await removeRedisKeys(redis.prefix);
  });

  it('when Redis answers then health is ok', async () => {
    const res = await (await t.agent()).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok', service: 'equilight' });
  });

  it('when Redis does not answer then health is degraded, says so without the password, and still answers', async () => {
    const url = `redis://:secret-word@127.0.0.1:${await freePort()}`;
    const away = openRedis({ url, prefix: redis.prefix }, 'health-test', () => undefined);
    try {
      const health = new HealthService(t.dataSource, createArchive(t.config.archive), {
        url,
        ping: () => away.ping(),
      });
      const { httpStatus, body } = await health.report();
      expect(httpStatus).toBe(200);
      expect(body.status).toBe('degraded');
      expect(body.reasons).toHaveLength(1);
      expect(body.reasons![0]).toMatch(/^redis: redis:\/\/.*127\.0\.0\.1:\d+ does not answer/);
      expect(body.reasons![0]).not.toContain('secret-word');
    } finally {
      await closeRedis(away);
    }
  });
});
