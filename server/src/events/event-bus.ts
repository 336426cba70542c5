import { EventEmitter } from 'node:events';

export type LiveEventType =
  'file.received' | 'file.stored' | 'file.quarantined' | 'file.duplicate' | 'batch.updated';

export interface LiveEvent {
  type: LiveEventType;
  data: { id: number } & Record<string, unknown>;
  at: string;
}

/**
 * In-process publish/subscribe of live events. The WebSocket endpoint fans them out to browsers;
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
}
