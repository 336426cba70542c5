import { once } from 'node:events';
import type { Redis } from 'ioredis';
import { closeRedis, openRedis, RedisUnavailableError } from '../../redis/redis-connection';
import { freePort } from '../../testing/free-port';
import { describeWithRedis, removeRedisKeys, testRedisConfig } from '../../testing/redis';
import type { AccessChange, LiveEvent } from '../event-bus';
import { RedisEventBus } from '../redis-event-bus';

jest.setTimeout(20_000);

/** Wait until `check` holds, polling; fail with `what` after a generous time. */
async function until(what: string, check: () => boolean, timeoutMs = 10_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!check()) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

/**
 * Two server processes' event buses: two RedisEventBus instances, each with its own two Redis
 * connections (publishing, listening), on one channel of this file's own prefix.
 */
describeWithRedis('live events across processes through Redis', () => {
  const redis = testRedisConfig('events');
  const log = jest.fn();
  let connections: Redis[];
  let one: RedisEventBus;
  let two: RedisEventBus;

  beforeEach(async () => {
    connections = [openRedis(redis, 'commands', log), openRedis(redis, 'commands', log)];
    one = new RedisEventBus(connections[0]!, redis, log);
    two = new RedisEventBus(connections[1]!, redis, log);
    await Promise.all([one.start(), two.start()]);
  });
  afterEach(async () => {
    await Promise.all([one.close(), two.close()]);
    for (const c of connections) await closeRedis(c);
  });
  afterAll(async () => {
    await removeRedisKeys(redis.prefix);
    expect(log).not.toHaveBeenCalled();
  });

  function record(bus: RedisEventBus) {
    const all: LiveEvent[] = [];
    const local: LiveEvent[] = [];
    const access: AccessChange[] = [];
    bus.subscribe((e) => all.push(e));
    bus.subscribeLocal((e) => local.push(e));
    bus.onAccessChange((c) => access.push(c));
    return { all, local, access };
  }

  it('when one process publishes then both deliver it to their subscribers, each exactly once', async () => {
    const a = record(one);
    const b = record(two);
    for (let id = 1; id <= 20; id++) one.publish('file.stored', { id, batchId: null });
    two.publish('batch.updated', { id: 5, state: 'approved' });
    await until('every event on both', () => a.all.length === 21 && b.all.length === 21);
    // A moment more: any echo of a process's own messages would arrive now.
    await new Promise((r) => setTimeout(r, 200));

    const ids = (events: LiveEvent[]) => events.filter((e) => e.type === 'file.stored').map((e) => e.data.id);
    const oneToTwenty = Array.from({ length: 20 }, (_, i) => i + 1);
    expect(ids(a.all)).toEqual(oneToTwenty);
    expect(ids(b.all)).toEqual(oneToTwenty);
    expect(a.all).toHaveLength(21);
    expect(b.all).toHaveLength(21);
    // The same event, as published (type, data and time).
    expect(b.all.find((e) => e.type === 'file.stored' && e.data.id === 7)).toEqual(
      a.all.find((e) => e.type === 'file.stored' && e.data.id === 7),
    );
    expect(a.all.find((e) => e.type === 'batch.updated')?.data).toEqual({ id: 5, state: 'approved' });
  });

  it('local subscribers get only their own process’s events (work done once across processes)', async () => {
    const a = record(one);
    const b = record(two);
    one.publish('file.quarantined', { id: 1, error: 'bad' });
    two.publish('file.quarantined', { id: 2, error: 'worse' });
    await until('both events on both', () => a.all.length === 2 && b.all.length === 2);
    expect(a.local.map((e) => e.data.id)).toEqual([1]);
    expect(b.local.map((e) => e.data.id)).toEqual([2]);
  });

  it('an access change on one process reaches the other (sign-out, role change)', async () => {
    const a = record(one);
    const b = record(two);
    one.publishAccessChange({ kind: 'session-ended', sessionId: 'abc' });
    two.publishAccessChange({ kind: 'person-changed', userId: 3 });
    await until('both changes on both', () => a.access.length === 2 && b.access.length === 2);
    await new Promise((r) => setTimeout(r, 200));
    expect(a.access).toEqual([
      { kind: 'session-ended', sessionId: 'abc' },
      { kind: 'person-changed', userId: 3 },
    ]);
    expect(new Set(b.access.map((c) => c.kind))).toEqual(new Set(['session-ended', 'person-changed']));
    expect(b.access).toHaveLength(2);
  });

  it('ignores what is not an Equilight message on the channel', async () => {
    const b = record(two);
    const stranger = openRedis(redis, 'stranger', log);
    try {
      const channel = `${redis.prefix}:events`;
      await stranger.publish(channel, 'not json');
      await stranger.publish(channel, JSON.stringify({ from: 'x', event: 'no object' }));
      await stranger.publish(channel, JSON.stringify({ event: { type: 'file.stored', data: { id: 1 } } }));
      one.publish('file.stored', { id: 9 });
      await until('the real event', () => b.all.length >= 1);
      await new Promise((r) => setTimeout(r, 200));
      expect(b.all.map((e) => e.data.id)).toEqual([9]);
    } finally {
      await closeRedis(stranger);
    }
  });

  it('when started while its connection is still in its handshake then it hears the other processes', async () => {
    // A server's first requests can keep it busy until the listening connection is past "connect" but not
    // yet ready: a SUBSCRIBE written then used to be undone by the client's own ready check (lost, silently).
    for (let round = 1; round <= 5; round++) {
      const late = new RedisEventBus(connections[0]!, redis, log);
      await once(late['subscriber'], 'connect');
      await late.start();
      try {
        const heard = record(late);
        // Long enough for a refused ready check to end in a reconnection.
        await new Promise((r) => setTimeout(r, 200));
        two.publish('file.stored', { id: round });
        await until('the other process’s event', () => heard.all.length === 1, 3_000);
        expect(heard.all[0]!.data.id).toBe(round);
        expect(log).not.toHaveBeenCalled();
      } finally {
        await late.close();
      }
    }
  });

  it('when Redis does not answer then start fails with a message that says so and what to do', async () => {
    const away = { url: `redis://:secret-word@127.0.0.1:${await freePort()}`, prefix: redis.prefix };
    const quiet = () => undefined;
    const connection = openRedis(away, 'commands', quiet);
    const bus = new RedisEventBus(connection, away, quiet);
    try {
      const failure = await bus.start().then(
        () => null,
        (err: unknown) => err,
      );
      expect(failure).toBeInstanceOf(RedisUnavailableError);
      const message = (failure as Error).message;
      expect(message).toMatch(
        /^Redis at redis:\/\/.*127\.0\.0\.1:\d+ does not answer \(.+\)\. Start it, or leave REDIS_URL/,
      );
      expect(message).not.toContain('secret-word');
    } finally {
      await bus.close();
      await closeRedis(connection);
    }
  });

  it('an event published on another prefix does not cross over', async () => {
    const other = testRedisConfig('events-other');
    const connection = openRedis(other, 'commands', log);
    const elsewhere = new RedisEventBus(connection, other, log);
    await elsewhere.start();
    try {
      const a = record(one);
      elsewhere.publish('file.stored', { id: 1 });
      one.publish('file.stored', { id: 2 });
      const b = record(two);
      await until('the event of this prefix', () => b.all.length >= 1 || a.all.length > 1);
      await new Promise((r) => setTimeout(r, 200));
      expect(a.all.map((e) => e.data.id)).toEqual([2]);
    } finally {
      await elsewhere.close();
      await closeRedis(connection);
    }
  });
});
