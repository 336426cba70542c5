import crypto from 'node:crypto';
import { Redis } from 'ioredis';
import type { RedisConfig } from '../config';

/** The Redis of the tests (jest.config.js checks that it answers). */
export const TEST_REDIS_URL = process.env['EQUILIGHT_TEST_REDIS_URL'] ?? 'redis://127.0.0.1:6379';

/**
 * `describe` for tests on a real Redis: skipped when jest.config.js found none answering (it said so in
 * one line, or failed the run under EQUILIGHT_REQUIRE_REDIS=1).
 */
export const describeWithRedis = process.env['EQUILIGHT_TEST_REDIS'] === 'off' ? describe.skip : describe;

/** A key prefix of its own for one test file (or one test), so files running side by side never meet. */
export function testRedisConfig(name: string): RedisConfig {
  return {
    url: TEST_REDIS_URL,
    prefix: `eqtest-${name}-${process.pid}-${crypto.randomBytes(3).toString('hex')}`,
  };
}

/** Remove every key under a test prefix. */
export async function removeRedisKeys(prefix: string): Promise<number> {
  const redis = new Redis(TEST_REDIS_URL);
  try {
    let removed = 0;
    let cursor = '0';
    do {
      const [next, keys] = await redis.scan(cursor, 'MATCH', `${prefix}:*`, 'COUNT', 500);
      cursor = next;
      if (keys.length) removed += await redis.del(...keys);
    } while (cursor !== '0');
    return removed;
  } finally {
    redis.disconnect();
  }
}
