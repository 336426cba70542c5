import crypto from 'node:crypto';
import type { Redis } from 'ioredis';
import { type RedisConfig, redactUrl } from '../config';
import { closeRedis, openRedis, whenReady } from '../redis/redis-connection';
import { EventBus, type SharedMessage } from './event-bus';

/** What travels on the channel: a message and the process it comes from. */
type Envelope = SharedMessage & { from: string };

function isEnvelope(value: unknown): value is Envelope {
  if (typeof value !== 'object' || value === null) return false;
  const v = value as Record<string, unknown>;
  if (typeof v['from'] !== 'string') return false;
  const event = v['event'] as Record<string, unknown> | undefined;
  const access = v['access'] as Record<string, unknown> | undefined;
  if (event) return typeof event['type'] === 'string' && typeof event['data'] === 'object';
  return typeof access?.['kind'] === 'string';
}

/**
 * The event bus of several server processes: each event and access change is delivered in its own
 * process at once (as in-process) and published on the Redis channel `<prefix>:events`; every other
 * process delivers what it receives there to its `subscribe` and access listeners. A process skips its
 * own messages when they come back, so each listener gets every event exactly once. Redis pub/sub keeps
 * nothing: what is published while a process is cut off from Redis does not reach it (the pages read
 * their data again anyway when they reconnect).
 */
export class RedisEventBus extends EventBus {
  /** This bus's name on the channel (one per process, or per app in tests). */
  readonly origin = crypto.randomUUID();
  private readonly channel: string;
  private readonly subscriber: Redis;

  constructor(
    private readonly publisher: Redis,
    private readonly redis: RedisConfig,
    private readonly log: (message: string, err?: unknown) => void = console.error,
  ) {
    super();
    this.channel = `${redis.prefix}:events`;
    this.subscriber = openRedis(redis, 'events', log);
    this.subscriber.on('message', (channel: string, text: string) => {
      if (channel === this.channel) this.onMessage(text);
    });
  }

  override async start(): Promise<void> {
    await whenReady(this.subscriber, this.redis);
    await this.subscriber.subscribe(this.channel);
  }

  override async close(): Promise<void> {
    await closeRedis(this.subscriber);
  }

  override describe(): string {
    return `every process, through Redis pub/sub at ${redactUrl(this.redis.url)} (channel ${this.channel})`;
  }

  protected override share(message: SharedMessage): void {
    const envelope: Envelope = { from: this.origin, ...message };
    this.publisher
      .publish(this.channel, JSON.stringify(envelope))
      .catch((err: unknown) => this.log('Could not pass a live event on through Redis', err));
  }

  private onMessage(text: string): void {
    let envelope: unknown;
    try {
      envelope = JSON.parse(text);
    } catch {
      return;
    }
    if (!isEnvelope(envelope) || envelope.from === this.origin) return;
    this.receive('event' in envelope ? { event: envelope.event } : { access: envelope.access });
  }
}
