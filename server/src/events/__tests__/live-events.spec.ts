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
  async function signedInCookie(email: string): Promise<string> {
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
      body: JSON.stringify({ email, password: DEMO_PASSWORD }),
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

  it('streams file.received and file.stored to a signed-in browser', async () => {
    const cookie = await signedInCookie(DEMO_EMAILS.scientist);
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
