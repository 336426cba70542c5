import http from 'node:http';
import type { AddressInfo } from 'node:net';
import WebSocket from 'ws';
import { DEMO_EMAILS, DEMO_PASSWORD, startTestApp, type TestApp } from '../../testing/test-app';
import { createProfile, longTableCsv } from '../../ingest/__tests__/ingest-helpers';
import { type LiveEvent } from '../event-bus';
import { attachLiveEvents } from '../live-events';

describe('live events over WebSocket', () => {
  let t: TestApp;
  let server: http.Server;
  let base: string;
  let live: ReturnType<typeof attachLiveEvents>;

  beforeAll(async () => {
    t = await startTestApp();
    server = http.createServer(t.app);
    live = attachLiveEvents(server, {
      sessionParser: t.sessionParser,
      users: t.services.users,
      events: t.events,
    });
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
    base = `127.0.0.1:${(server.address() as AddressInfo).port}`;
  });
  afterAll(async () => {
    live.close();
    await new Promise((r) => server.close(r));
    await t.stop();
  });

  /** Sign in over real HTTP and return the cookie header a browser would send. */
  async function signedInCookie(email: string, password = DEMO_PASSWORD): Promise<string> {
    const first = await fetch(`http://${base}/api/health`);
    const xsrf = first.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .find((c) => c.startsWith('XSRF-TOKEN='))!;
    const login = await fetch(`http://${base}/api/auth/login`, {
      method: 'POST',
      headers: {
        'content-type': 'application/json',
        cookie: xsrf,
        'x-xsrf-token': decodeURIComponent(xsrf.split('=')[1]),
      },
      body: JSON.stringify({ email, password }),
    });
    expect(login.status).toBe(200);
    const session = login.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .find((c) => c.startsWith('equilight.sid='))!;
    return `${xsrf}; ${session}`;
  }

  function refusal(headers: Record<string, string>, path = '/api/events'): Promise<number> {
    return new Promise((resolve, reject) => {
      const ws = new WebSocket(`ws://${base}${path}`, { headers });
      ws.on('unexpected-response', (_req, res) => resolve(res.statusCode ?? 0));
      ws.on('open', () => reject(new Error('the socket opened')));
      ws.on('error', () => undefined);
    });
  }

  it('refuses an upgrade without a session', async () => {
    expect(await refusal({})).toBe(401);
  });

  it('refuses an upgrade with a forged session cookie', async () => {
    expect(await refusal({ cookie: 'equilight.sid=s%3Aforged.signature' })).toBe(401);
  });

  it('refuses an upgrade from another origin even with a session', async () => {
    const cookie = await signedInCookie(DEMO_EMAILS.scientist);
    expect(await refusal({ cookie, origin: 'http://evil.example' })).toBe(403);
  });

  it('refuses other paths', async () => {
    const cookie = await signedInCookie(DEMO_EMAILS.scientist);
    expect(await refusal({ cookie }, '/api/other')).toBe(404);
  });

  it('streams file.received and file.stored to a signed-in lab manager', async () => {
    const cookie = await signedInCookie(DEMO_EMAILS.lab_manager);
    const ws = new WebSocket(`ws://${base}/api/events`, { headers: { cookie, origin: `http://${base}` } });
    const messages: LiveEvent[] = [];
    const stored = new Promise<LiveEvent>((resolve) =>
      ws.on('message', (data) => {
        const event = JSON.parse(String(data)) as LiveEvent;
        messages.push(event);
        if (event.type === 'file.stored') resolve(event);
      }),
    );
    await new Promise((r) => ws.once('open', r));
    const { token } = await createProfile(await t.agent('admin'));
    const res = await fetch(`http://${base}/api/ingest`, {
      method: 'POST',
      headers: { authorization: `Bearer ${token}` },
      body: (() => {
        const form = new FormData();
        form.append('file', new Blob([longTableCsv(77)]), 'RUN-0077.csv');
        return form;
      })(),
    });
    expect(res.status).toBe(202);
    const { id } = (await res.json()) as { id: number };
    const event = await stored;
    expect(event.data).toMatchObject({ id, readingCount: 96, runId: 'RUN-0077' });
    expect(messages.map((m) => m.type)).toEqual(
      expect.arrayContaining(['hello', 'file.received', 'file.stored']),
    );
    expect(live.clientCount()).toBe(1);
    ws.close();
  });
});

describe('live events end with access and follow the roles of the REST routes', () => {
  let t: TestApp;
  let server: http.Server;
  let base: string;
  let live: ReturnType<typeof attachLiveEvents>;

  beforeAll(async () => {
    t = await startTestApp();
    server = http.createServer(t.app);
    live = attachLiveEvents(server, {
      sessionParser: t.sessionParser,
      users: t.services.users,
      events: t.events,
    });
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
    base = `127.0.0.1:${(server.address() as AddressInfo).port}`;
  });
  afterAll(async () => {
    live.close();
    await new Promise((r) => server.close(r));
    await t.stop();
  });

  interface Browser {
    cookie: string;
    xsrf: string;
  }

  async function signIn(email: string, password = DEMO_PASSWORD): Promise<Browser> {
    const first = await fetch(`http://${base}/api/health`);
    const xsrfCookie = first.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .find((c) => c.startsWith('XSRF-TOKEN='))!;
    const xsrf = decodeURIComponent(xsrfCookie.split('=')[1]);
    const login = await fetch(`http://${base}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', cookie: xsrfCookie, 'x-xsrf-token': xsrf },
      body: JSON.stringify({ email, password }),
    });
    expect(login.status).toBe(200);
    const cookies = login.headers.getSetCookie().map((c) => c.split(';')[0]);
    const session = cookies.find((c) => c.startsWith('equilight.sid='))!;
    // Sign-in issues a new XSRF token bound to the new session, as a browser would take it up.
    const sessionXsrf = cookies.find((c) => c.startsWith('XSRF-TOKEN=')) ?? xsrfCookie;
    return { cookie: `${sessionXsrf}; ${session}`, xsrf: decodeURIComponent(sessionXsrf.split('=')[1]) };
  }

  /** A real ws client that records every message and how the socket closed. */
  async function connect(browser: Browser) {
    const ws = new WebSocket(`ws://${base}/api/events`, {
      headers: { cookie: browser.cookie, origin: `http://${base}` },
    });
    const raw: string[] = [];
    ws.on('message', (data) => raw.push(String(data)));
    const closed = new Promise<{ code: number; reason: string }>((resolve) =>
      ws.on('close', (code, reason) => resolve({ code, reason: String(reason) })),
    );
    await new Promise((r) => ws.once('open', r));
    await waitFor(() => raw.length > 0); // the hello
    return { ws, raw, closed, events: () => raw.map((m) => JSON.parse(m) as LiveEvent) };
  }

  async function waitFor(check: () => boolean, timeoutMs = 5000): Promise<void> {
    const deadline = Date.now() + timeoutMs;
    while (!check()) {
      if (Date.now() > deadline) throw new Error('timed out');
      await new Promise((r) => setTimeout(r, 20));
    }
  }

  function within<T>(promise: Promise<T>, ms: number): Promise<T> {
    return Promise.race([
      promise,
      new Promise<T>((_, reject) => setTimeout(() => reject(new Error(`not within ${ms} ms`)), ms)),
    ]);
  }

  async function newPerson(role: string): Promise<{ id: number; email: string; password: string }> {
    const admin = await t.agent('admin');
    const email = `live-${role}-${Date.now()}@equilight.test`;
    const password = 'a-long-enough-password';
    const res = await admin.post('/api/users').send({ email, displayName: `Live ${role}`, role, password });
    expect(res.status).toBe(201);
    return { id: (res.body as { user: { id: number } }).user.id, email, password };
  }

  it('when a person signs out then their open socket closes', async () => {
    const browser = await signIn(DEMO_EMAILS.lab_manager);
    const socket = await connect(browser);
    const res = await fetch(`http://${base}/api/auth/logout`, {
      method: 'POST',
      headers: { cookie: browser.cookie, 'x-xsrf-token': browser.xsrf },
    });
    expect(res.status).toBe(204);
    expect((await within(socket.closed, 3000)).code).toBe(4401);
  });

  it('when a person is deactivated then their open socket closes', async () => {
    const person = await newPerson('scientist');
    const socket = await connect(await signIn(person.email, person.password));
    const admin = await t.agent('admin');
    expect((await admin.patch(`/api/users/${person.id}`).send({ active: false })).status).toBe(200);
    expect((await within(socket.closed, 3000)).code).toBe(4403);
  });

  it('when a person changes role then their open socket closes (to reconnect with the new role)', async () => {
    const person = await newPerson('lab_manager');
    const socket = await connect(await signIn(person.email, person.password));
    const admin = await t.agent('admin');
    expect((await admin.patch(`/api/users/${person.id}`).send({ role: 'scientist' })).status).toBe(200);
    expect((await within(socket.closed, 3000)).code).toBe(4403);
  });

  it("when a file is quarantined then a scientist's socket hears nothing of it, a lab manager's hears all", async () => {
    const scientist = await connect(await signIn(DEMO_EMAILS.scientist));
    const manager = await connect(await signIn(DEMO_EMAILS.lab_manager));
    const { token } = await createProfile(await t.agent('admin'));
    const form = new FormData();
    form.append('file', new Blob(['vault_password,hunter2-quarantine-text\n1,2\n']), 'RUN-0099.csv');
    const res = await fetch(`http://${base}/api/ingest`, {
      method: 'POST',
      headers: { authorization: `Bearer ${token}` },
      body: form,
    });
    expect(res.status).toBe(202);
    await waitFor(() => manager.events().some((e) => e.type === 'file.quarantined'));
    const quarantined = manager.events().find((e) => e.type === 'file.quarantined')!;
    expect(String(quarantined.data['error'])).toMatch(/hunter2/);
    // What GET /api/intake refuses a scientist, the socket does not tell them either.
    expect((await (await t.agent('scientist')).get('/api/intake')).status).toBe(403);
    await new Promise((r) => setTimeout(r, 300));
    expect(scientist.events().map((e) => e.type)).toEqual(['hello']);
    expect(scientist.raw.join('')).not.toMatch(/hunter2|vault_password|quarantine/);
    scientist.ws.close();
    manager.ws.close();
  });

  it("when a file lands in a batch then a scientist's socket learns which batch, not the file's details", async () => {
    const scientist = await connect(await signIn(DEMO_EMAILS.scientist));
    t.events.publish('file.stored', {
      id: 9001,
      profileId: 3,
      readingCount: 96,
      runId: 'RUN-9001',
      batchId: 7,
      status: 'stored',
    });
    t.events.publish('file.stored', { id: 9002, profileId: 3, batchId: null, status: 'unassigned' });
    t.events.publish('batch.updated', { id: 7, state: 'open' });
    await waitFor(() => scientist.events().length >= 3);
    expect(
      scientist
        .events()
        .slice(1)
        .map((e) => [e.type, e.data]),
    ).toEqual([
      ['file.stored', { id: 9001, batchId: 7 }],
      ['batch.updated', { id: 7, state: 'open' }],
    ]);
    scientist.ws.close();
  });
});
