import { EventEmitter } from 'node:events';

import type { LiveEvent, LiveEventData, LiveEventType } from '../contracts/events';

export type { LiveEvent, LiveEventType } from '../contracts/events';

/** Something that may end a live connection's right to its events; never sent to a browser. */
export type AccessChange =
  { kind: 'session-ended'; sessionId: string } | { kind: 'person-changed'; userId: number };

/** What one process tells the others: an event, or an access change. */
export type SharedMessage = { event: LiveEvent } | { access: AccessChange };

/**
 * Publish/subscribe of live events, and of access changes (sign-out, a person's role or deactivation)
 * that the WebSocket layer acts on. This one stays in the process; `RedisEventBus` also carries both to
 * every other server process (events/redis-event-bus.ts).
 *
 * Two kinds of listener:
 * - `subscribe`: every event of every process, each once (the WebSocket fan-out to browsers);
 * - `subscribeLocal`: only the events published in this process, for work that must happen once per
 *   event however many processes run (webhooks, mails).
 */
export class EventBus {
  private readonly emitter = new EventEmitter();

  constructor() {
    this.emitter.setMaxListeners(100);
  }

  publish<T extends LiveEventType>(type: T, data: LiveEventData<T>): void {
    const event = { type, data, at: new Date().toISOString() } as LiveEvent;
    this.emitter.emit('local', event);
    this.emitter.emit('event', event);
    this.share({ event });
  }

  subscribe(listener: (event: LiveEvent) => void): () => void {
    this.emitter.on('event', listener);
    return () => this.emitter.off('event', listener);
  }

  subscribeLocal(listener: (event: LiveEvent) => void): () => void {
    this.emitter.on('local', listener);
    return () => this.emitter.off('local', listener);
  }

  publishAccessChange(change: AccessChange): void {
    this.emitter.emit('access', change);
    this.share({ access: change });
  }

  onAccessChange(listener: (change: AccessChange) => void): () => void {
    this.emitter.on('access', listener);
    return () => this.emitter.off('access', listener);
  }

  /** Ready to receive from other processes (nothing to do in-process). */
  async start(): Promise<void> {}

  async close(): Promise<void> {}

  /** For the start line. */
  describe(): string {
    return 'this process only';
  }

  /** Tell the other processes; in-process there are none. */
  protected share(message: SharedMessage): void {
    void message;
  }

  /** Deliver what another process published, to this process's `subscribe` and access listeners. */
  protected receive(message: SharedMessage): void {
    if ('event' in message) this.emitter.emit('event', message.event);
    else this.emitter.emit('access', message.access);
  }
}
