import { DOCUMENT } from '@angular/common';
import { DestroyRef, Injectable, InjectionToken, inject, signal } from '@angular/core';
import { toObservable } from '@angular/core/rxjs-interop';
import {
  EMPTY,
  type Observable,
  Subject,
  defer,
  distinctUntilChanged,
  filter,
  finalize,
  repeat,
  retry,
  switchMap,
  timer,
} from 'rxjs';
import { webSocket } from 'rxjs/webSocket';
import { type LiveEventOf, type LiveEventType, liveEventSchema } from '@equilight/contracts';
import { AuthService } from '../auth/auth.service';

export type { LiveEventType } from '@equilight/contracts';

/** One message of /api/events (of one type, or any). `data` always names the record by id. */
export type LiveEvent<T extends LiveEventType = LiveEventType> = LiveEventOf<T>;

/** The socket class; tests replace it with a fake so no unit test opens a real connection. */
export type WebSocketCtor = new (url: string, protocols?: string | string[]) => WebSocket;

export const WEB_SOCKET_CTOR = new InjectionToken<WebSocketCtor>('WEB_SOCKET_CTOR', {
  providedIn: 'root',
  factory: () => WebSocket,
});

/** Same origin as the page, so the session cookie authenticates the upgrade. */
export const LIVE_EVENTS_URL = new InjectionToken<string>('LIVE_EVENTS_URL', {
  providedIn: 'root',
  factory: () => {
    const { protocol, host } = inject(DOCUMENT).location;
    return `${protocol === 'https:' ? 'wss' : 'ws'}://${host}/api/events`;
  },
});

export const RECONNECT_FIRST_DELAY_MS = 1000;
export const RECONNECT_MAX_DELAY_MS = 30_000;

/** Wait before reconnect attempt `attempt` (0-based): 1 s, 2 s, 4 s, … capped at 30 s. */
export function reconnectDelayMs(attempt: number): number {
  return Math.min(RECONNECT_FIRST_DELAY_MS * 2 ** attempt, RECONNECT_MAX_DELAY_MS);
}

export function isLiveEvent(value: unknown): value is LiveEvent {
  return liveEventSchema.safeParse(value).success;
}

/**
 * The server's live events over one WebSocket, open while someone is signed in.
 * A lost connection is retried after 1 s, doubling to at most 30 s; a successful open resets the wait.
 */
@Injectable({ providedIn: 'root' })
export class LiveEventsService {
  private readonly url = inject(LIVE_EVENTS_URL);
  private readonly ctor = inject(WEB_SOCKET_CTOR);
  private readonly events = new Subject<LiveEvent>();
  private readonly isConnected = signal(false);
  private attempt = 0;

  /** Every event, as it arrives. Never errors or completes. */
  readonly events$: Observable<LiveEvent> = this.events.asObservable();
  /** True while the socket is open. */
  readonly connected = this.isConnected.asReadonly();

  constructor() {
    const subscription = toObservable(inject(AuthService).signedIn)
      .pipe(
        distinctUntilChanged(),
        switchMap((signedIn) => (signedIn ? this.connection() : EMPTY)),
      )
      .subscribe((event) => this.events.next(event));
    inject(DestroyRef).onDestroy(() => subscription.unsubscribe());
  }

  ofType<T extends LiveEventType>(...types: T[]): Observable<LiveEvent<T>> {
    return this.events$.pipe(filter((e): e is LiveEvent<T> => (types as string[]).includes(e.type)));
  }

  private connection(): Observable<LiveEvent> {
    this.attempt = 0;
    const nextDelay = () => timer(reconnectDelayMs(this.attempt++));
    return defer(() =>
      webSocket<unknown>({
        url: this.url,
        WebSocketCtor: this.ctor,
        // A message that is not JSON is dropped, not a reason to drop the connection.
        deserializer: (e: MessageEvent) => {
          try {
            return JSON.parse(String(e.data)) as unknown;
          } catch {
            return null;
          }
        },
        openObserver: {
          next: () => {
            this.attempt = 0;
            this.isConnected.set(true);
          },
        },
        closeObserver: { next: () => this.isConnected.set(false) },
      }),
    ).pipe(
      // A clean close completes, a broken one errors: both mean "try again later".
      retry({ delay: nextDelay }),
      repeat({ delay: nextDelay }),
      filter(isLiveEvent),
      finalize(() => this.isConnected.set(false)),
    );
  }
}
