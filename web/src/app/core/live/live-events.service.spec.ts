import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { AuthService } from '../auth/auth.service';
import {
  LIVE_EVENTS_URL,
  type LiveEvent,
  LiveEventsService,
  WEB_SOCKET_CTOR,
  reconnectDelayMs,
} from './live-events.service';

/** Stands in for the browser's WebSocket: records every socket and lets the test drive it. */
class FakeSocket {
  static all: FakeSocket[] = [];
  static get last(): FakeSocket {
    return FakeSocket.all[FakeSocket.all.length - 1];
  }
  readyState = 0;
  onopen: ((e: Event) => void) | null = null;
  onmessage: ((e: MessageEvent) => void) | null = null;
  onerror: ((e: Event) => void) | null = null;
  onclose: ((e: CloseEvent) => void) | null = null;

  constructor(readonly url: string) {
    FakeSocket.all.push(this);
  }

  open(): void {
    this.readyState = 1;
    this.onopen?.(new Event('open'));
  }

  receive(data: unknown): void {
    this.onmessage?.({ data: typeof data === 'string' ? data : JSON.stringify(data) } as MessageEvent);
  }

  /** The server went away (unclean) or said goodbye (clean). */
  drop(wasClean = false): void {
    this.readyState = 3;
    if (!wasClean) this.onerror?.(new Event('error'));
    this.onclose?.({ wasClean, code: wasClean ? 1000 : 1006 } as CloseEvent);
  }

  send(): void {
    /* the app never sends */
  }

  close(): void {
    if (this.readyState === 3) return;
    this.readyState = 3;
    this.onclose?.({ wasClean: true, code: 1000 } as CloseEvent);
  }
}

const STORED: LiveEvent = {
  type: 'file.stored',
  data: { id: 7, readingCount: 96 },
  at: '2031-04-02T09:00:00Z',
};

describe('LiveEventsService', () => {
  let auth: AuthService;

  async function setup(signedIn: boolean) {
    FakeSocket.all = [];
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: WEB_SOCKET_CTOR, useValue: FakeSocket },
        { provide: LIVE_EVENTS_URL, useValue: 'ws://lab.test/api/events' },
      ],
    });
    auth = TestBed.inject(AuthService);
    if (signedIn) await signIn();
    const service = TestBed.inject(LiveEventsService);
    TestBed.tick();
    return service;
  }

  /** The server says who is signed in; the socket follows AuthService.signedIn. */
  async function signIn(): Promise<void> {
    const done = auth.refresh();
    TestBed.inject(HttpTestingController)
      .expectOne('/api/auth/me')
      .flush({ id: 1, email: 'lab@equilight.test', displayName: 'Lab', role: 'lab_manager', active: true });
    await done;
  }

  afterEach(() => jest.useRealTimers());

  it('when nobody is signed in then opens no socket, and opens one on sign-in', async () => {
    const service = await setup(false);
    expect(FakeSocket.all).toHaveLength(0);
    expect(service.connected()).toBe(false);
    await signIn();
    TestBed.tick();
    expect(FakeSocket.all).toHaveLength(1);
    expect(FakeSocket.last.url).toBe('ws://lab.test/api/events');
  });

  it('when open then reports connected and passes events through, filtered by type', async () => {
    const service = await setup(true);
    const all: LiveEvent[] = [];
    const stored: LiveEvent[] = [];
    service.events$.subscribe((e) => all.push(e));
    service.ofType('file.stored', 'file.quarantined').subscribe((e) => stored.push(e));
    FakeSocket.last.open();
    expect(service.connected()).toBe(true);
    FakeSocket.last.receive({ type: 'file.received', data: { id: 7 }, at: '2031-04-02T08:59:59Z' });
    FakeSocket.last.receive(STORED);
    expect(all.map((e) => e.type)).toEqual(['file.received', 'file.stored']);
    expect(stored).toEqual([STORED]);
  });

  it('when a message is not JSON or not an event then drops it and keeps the connection', async () => {
    const service = await setup(true);
    const all: LiveEvent[] = [];
    service.events$.subscribe((e) => all.push(e));
    FakeSocket.last.open();
    FakeSocket.last.receive('not json {');
    FakeSocket.last.receive({ type: 'something.else', data: { id: 1 }, at: 'x' });
    FakeSocket.last.receive({ type: 'file.stored', data: {}, at: 'x' });
    FakeSocket.last.receive(STORED);
    expect(all).toEqual([STORED]);
    expect(FakeSocket.all).toHaveLength(1);
    expect(service.connected()).toBe(true);
  });

  it('when the connection keeps failing then waits 1 s, 2 s, 4 s … up to 30 s between attempts', async () => {
    const service = await setup(true); // signing in waits a real task (AuthService.refresh)
    jest.useFakeTimers();
    const waits = [1000, 2000, 4000, 8000, 16000, 30000, 30000];
    for (const wait of waits) {
      const before = FakeSocket.all.length;
      FakeSocket.last.drop();
      expect(service.connected()).toBe(false);
      jest.advanceTimersByTime(wait - 1);
      expect(FakeSocket.all).toHaveLength(before);
      jest.advanceTimersByTime(1);
      expect(FakeSocket.all).toHaveLength(before + 1);
    }
  });

  it('when a reconnect succeeds then the next failure waits 1 s again', async () => {
    const service = await setup(true); // signing in waits a real task (AuthService.refresh)
    jest.useFakeTimers();
    FakeSocket.last.drop();
    jest.advanceTimersByTime(1000);
    FakeSocket.last.drop();
    jest.advanceTimersByTime(2000);
    expect(FakeSocket.all).toHaveLength(3);
    FakeSocket.last.open();
    expect(service.connected()).toBe(true);
    FakeSocket.last.drop(true); // a clean close from the server also reconnects
    jest.advanceTimersByTime(999);
    expect(FakeSocket.all).toHaveLength(3);
    jest.advanceTimersByTime(1);
    expect(FakeSocket.all).toHaveLength(4);
  });

  it('when the person signs out then closes the socket and stops reconnecting', async () => {
    const service = await setup(true); // signing in waits a real task (AuthService.refresh)
    jest.useFakeTimers();
    const socket = FakeSocket.last;
    socket.open();
    auth.clear();
    TestBed.tick();
    expect(socket.readyState).toBe(3);
    expect(service.connected()).toBe(false);
    jest.advanceTimersByTime(60_000);
    expect(FakeSocket.all).toHaveLength(1);
  });

  it('computes the back-off schedule', () => {
    expect([0, 1, 2, 3, 4, 5, 6, 10].map(reconnectDelayMs)).toEqual([
      1000, 2000, 4000, 8000, 16000, 30000, 30000, 30000,
    ]);
  });
});
