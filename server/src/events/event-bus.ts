import { EventEmitter } from 'node:events';

import type { LiveEvent, LiveEventData, LiveEventType } from '../contracts/events';

export type { LiveEvent, LiveEventType } from '../contracts/events';

/** Something that may end a live connection's right to its events; never sent to a browser. */
export type AccessChange =
  { kind: 'session-ended'; sessionId: string } | { kind: 'person-changed'; userId: number };

/**
 * In-process publish/subscribe of live events, and of access changes (sign-out, a person's role or
 * deactivation) that the WebSocket layer acts on. The WebSocket endpoint fans them out to browsers;
 * a Redis pub/sub bus can take its place for several server instances.
 */
export class EventBus {
  private readonly emitter = new EventEmitter();

  constructor() {
    this.emitter.setMaxListeners(100);
  }

  publish<T extends LiveEventType>(type: T, data: LiveEventData<T>): void {
    this.emitter.emit('event', { type, data, at: new Date().toISOString() } as LiveEvent);
  }

  subscribe(listener: (event: LiveEvent) => void): () => void {
    this.emitter.on('event', listener);
    return () => this.emitter.off('event', listener);
  }

  publishAccessChange(change: AccessChange): void {
    this.emitter.emit('access', change);
  }

  onAccessChange(listener: (change: AccessChange) => void): () => void {
    this.emitter.on('access', listener);
    return () => this.emitter.off('access', listener);
  }
}
