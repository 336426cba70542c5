import { EventEmitter } from 'node:events';

export type LiveEventType =
  'file.received' | 'file.stored' | 'file.quarantined' | 'file.duplicate' | 'batch.updated';

export interface LiveEvent {
  type: LiveEventType;
  data: { id: number } & Record<string, unknown>;
  at: string;
}

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

  publish(type: LiveEventType, data: LiveEvent['data']): void {
    this.emitter.emit('event', { type, data, at: new Date().toISOString() } satisfies LiveEvent);
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
