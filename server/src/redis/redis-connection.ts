import { Redis } from 'ioredis';
import { type RedisConfig, redactUrl } from '../config';

/**
 * One connection to the Redis of REDIS_URL. It reconnects by itself; an outage is logged once when it
 * starts and once when it ends, not on every reconnection attempt. A command waits through a few
 * reconnection attempts and then fails, so a request that needs Redis answers with an error rather than
 * hanging while Redis is away.
 */
export function openRedis(
  redis: RedisConfig,
  role: string,
  log: (message: string, err?: unknown) => void,
): Redis {
  const connection = new Redis(redis.url, {
    connectionName: `${redis.prefix}:${role}`,
    maxRetriesPerRequest: 3,
  });
  let down = false;
  connection.on('error', (err: unknown) => {
    if (down) return;
    down = true;
    log(`Redis (${role}) at ${redactUrl(redis.url)} does not answer; retrying`, err);
  });
  connection.on('ready', () => {
    if (!down) return;
    down = false;
    log(`Redis (${role}) at ${redactUrl(redis.url)} answers again`);
  });
  return connection;
}

/** Redis did not answer when the server needed it to start; its message says what to do. */
export class RedisUnavailableError extends Error {}

/**
 * Wait until a connection has finished its handshake (status `ready`); when Redis does not answer, fails
 * as a command does, with a RedisUnavailableError. A SUBSCRIBE sent before then can overtake the client's
 * own ready check (ioredis writes it during the handshake); the check is then refused in subscriber mode,
 * the client reconnects and the subscription is lost without a word. A PING waits in the client's queue
 * until the connection is ready, so once it is answered a SUBSCRIBE goes out after the handshake.
 */
export async function whenReady(connection: Redis, redis: RedisConfig): Promise<void> {
  try {
    while (connection.status !== 'ready') await connection.ping();
  } catch (err) {
    const reason = err instanceof Error ? err.message : String(err);
    throw new RedisUnavailableError(
      `Redis at ${redactUrl(redis.url)} does not answer (${reason}). Start it, or leave REDIS_URL and QUEUE_URL unset to run a single server process without Redis.`,
    );
  }
}

/** Close a connection: politely when Redis answers, at once when it does not. */
export async function closeRedis(connection: Redis): Promise<void> {
  if (connection.status === 'end') return;
  if (connection.status !== 'ready') {
    connection.disconnect();
    return;
  }
  try {
    await connection.quit();
  } catch {
    connection.disconnect();
  }
}
