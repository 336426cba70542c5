import type { Store } from 'express-rate-limit';
import type { Redis } from 'ioredis';
import { type RedisReply, RedisStore } from 'rate-limit-redis';

/**
 * Where a rate limiter keeps its counts, by the limiter's name: undefined keeps them in this process
 * (express-rate-limit's memory store); with Redis, every server process counts in the same place.
 */
export type RateLimitStores = (limiter: string) => Store | undefined;

export const inProcessCounts: RateLimitStores = () => undefined;

/** Counts in Redis under `<prefix>:rate-limit:<limiter>:`, one store per limiter. */
export function redisRateLimitStores(redis: Redis, prefix: string): RateLimitStores {
  return (limiter) =>
    new RedisStore({
      prefix: `${prefix}:rate-limit:${limiter}:`,
      sendCommand: (command: string, ...args: string[]) =>
        redis.call(command, ...args) as Promise<RedisReply>,
    });
}
