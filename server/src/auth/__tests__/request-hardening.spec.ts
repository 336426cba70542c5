import http from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import WebSocket from 'ws';
import { attachLiveEvents } from '../../events/live-events';
import { createProfile, longTableCsv } from '../../ingest/__tests__/ingest-helpers';
import { DEMO_EMAILS, DEMO_PASSWORD, startTestApp, type TestApp } from '../../testing/test-app';

/** The `name=value` pairs a response sets, by cookie name. */
function setCookies(res: { headers: Record<string, unknown> }): Map<string, string> {
  const list = (res.headers['set-cookie'] as string[] | undefined) ?? [];
  return new Map(list.map((c) => c.split(';')[0]!).map((pair) => [pair.split('=')[0]!, pair]));
}

/** Sign in with plain requests (no agent) and return the cookies a browser would then hold. */
async function browserSignIn(t: TestApp, email: string): Promise<{ session: string; xsrf: string }> {
  const first = setCookies(await request(t.app).get('/api/health'));
  const xsrfBefore = first.get('XSRF-TOKEN')!;
  const login = await request(t.app)
    .post('/api/auth/login')
    .set('Cookie', xsrfBefore)
    .set('X-XSRF-TOKEN', decodeURIComponent(xsrfBefore.split('=')[1]!))
    .send({ email, password: DEMO_PASSWORD });
  expect(login.status).toBe(200);
  const after = setCookies(login);
  return { session: after.get('equilight.sid')!, xsrf: after.get('XSRF-TOKEN')! };
}

const valueOf = (pair: string): string => decodeURIComponent(pair.slice(pair.indexOf('=') + 1));

describe('requests from browsers and instruments', () => {
  let t: TestApp;
  let profileId: number;
  let instrumentToken: string;

  beforeAll(async () => {
    t = await startTestApp();
    const created = await createProfile(await t.agent('admin'));
    profileId = created.profile.id;
    instrumentToken = created.token;
  });
  afterAll(() => t.stop());

  describe('uploads', () => {
    it('when a multipart body is cut short then 400 with a message, not 500', async () => {
      const manager = await t.agent('lab_manager');
      const res = await manager
        .post('/api/ingest')
        .set('Content-Type', 'multipart/form-data; boundary=cut-short')
        .send(
          '--cut-short\r\nContent-Disposition: form-data; name="file"; filename="a.csv"\r\n\r\nposition,',
        );
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('bad_request');
      expect(res.body.error.message).toMatch(/not a readable multipart form/);
    });

    it('when a multipart body has no boundary then 400', async () => {
      const manager = await t.agent('lab_manager');
      const res = await manager.post('/api/ingest').set('Content-Type', 'multipart/form-data').send('x');
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(/multipart form/);
    });

    it('when a file name is not ASCII then it is stored as sent (UTF-8), not garbled', async () => {
      const manager = await t.agent('lab_manager');
      const res = await manager
        .post('/api/ingest')
        .field('profileId', String(profileId))
        .attach('file', Buffer.from(longTableCsv(101)), 'RUN-7 Lösung µM.csv');
      expect(res.status).toBe(202);
      const file = await manager.get(`/api/intake/${res.body.id}`);
      expect(file.body.originalName).toBe('RUN-7 Lösung µM.csv');
    });

    it('when a file name carries bidirectional control characters then they are removed', async () => {
      const manager = await t.agent('lab_manager');
      const name = 'RUN-8 \u202Evsc.exe\u202C \u2066x\u2069\u200E\u200F.csv';
      const res = await manager
        .post('/api/ingest')
        .field('profileId', String(profileId))
        .attach('file', Buffer.from(longTableCsv(102)), name);
      expect(res.status).toBe(202);
      const stored: string = (await manager.get(`/api/intake/${res.body.id}`)).body.originalName;
      expect(stored).toBe('RUN-8 vsc.exe x.csv');
      expect(stored).not.toMatch(/[\u200e\u200f\u202a-\u202e\u2066-\u2069]/);
    });
  });

  describe('cross-site request forgery', () => {
    it("when one session's XSRF token is sent with another session then 403", async () => {
      const scientist = await browserSignIn(t, DEMO_EMAILS.scientist);
      const manager = await browserSignIn(t, DEMO_EMAILS.lab_manager);
      // A token planted next to the manager's session (e.g. by a sibling sub-domain) is refused ...
      const forged = await request(t.app)
        .post('/api/layouts')
        .set('Cookie', `${manager.session}; ${scientist.xsrf}`)
        .set('X-XSRF-TOKEN', valueOf(scientist.xsrf))
        .send({ name: 'Forged', format: '96', positions: [] });
      expect(forged.status).toBe(403);
      expect(forged.body.error.code).toBe('csrf');
      // ... while the manager's own token works.
      const own = await request(t.app)
        .post('/api/layouts')
        .set('Cookie', `${manager.session}; ${manager.xsrf}`)
        .set('X-XSRF-TOKEN', valueOf(manager.xsrf))
        .send({ name: 'Own token', format: '96', positions: [{ position: 'A1', role: 'blank' }] });
      expect(own.status).toBe(201);
    });

    it('when the token from before sign-in is used after it then 403 (sign-in issues a new one)', async () => {
      const first = setCookies(await request(t.app).get('/api/health')).get('XSRF-TOKEN')!;
      const login = await request(t.app)
        .post('/api/auth/login')
        .set('Cookie', first)
        .set('X-XSRF-TOKEN', valueOf(first))
        .send({ email: DEMO_EMAILS.lab_manager, password: DEMO_PASSWORD });
      const session = setCookies(login).get('equilight.sid')!;
      expect(setCookies(login).get('XSRF-TOKEN')).not.toBe(first);
      const stale = await request(t.app)
        .post('/api/auth/logout')
        .set('Cookie', `${session}; ${first}`)
        .set('X-XSRF-TOKEN', valueOf(first));
      expect(stale.status).toBe(403);
    });

    it('when a mutating request comes from another origin then 403, even with a valid token', async () => {
      const manager = await t.agent('lab_manager');
      const body = { name: 'From elsewhere', format: '96', positions: [{ position: 'A1', role: 'blank' }] };
      const foreign = await manager.post('/api/layouts').set('Origin', 'https://evil.example').send(body);
      expect(foreign.status).toBe(403);
      expect(foreign.body.error.code).toBe('cross_origin');
      const viaReferer = await manager
        .post('/api/layouts')
        .set('Referer', 'https://evil.example/page')
        .send(body);
      expect(viaReferer.status).toBe(403);
      const opaque = await manager.post('/api/layouts').set('Origin', 'null').send(body);
      expect(opaque.status).toBe(403);
      const own = await manager.post('/api/layouts').set('Origin', t.config.publicUrl).send(body);
      expect(own.status).toBe(201);
    });

    it('when the Origin names the Host the request came to then it is accepted', async () => {
      const manager = await t.agent('lab_manager');
      const res = await manager
        .post('/api/layouts')
        .set('Host', 'equilight.lab.example:8443')
        .set('Origin', 'https://equilight.lab.example:8443')
        .send({ name: 'Behind a proxy', format: '96', positions: [{ position: 'A1', role: 'blank' }] });
      expect(res.status).toBe(201);
    });

    it('when an instrument sends with only its bearer token then no XSRF or Origin check applies', async () => {
      const res = await request(t.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${instrumentToken}`)
        .set('Origin', 'https://elsewhere.example')
        .attach('file', Buffer.from(longTableCsv(103)), 'RUN-9.csv');
      expect(res.status).toBe(202);
    });
  });

  describe('response headers', () => {
    it('when the app answers then its CSP lets scripts connect only to its own origin', async () => {
      const res = await request(t.app).get('/api/health');
      const csp = String(res.headers['content-security-policy']);
      expect(csp).toMatch(/connect-src 'self'(;|$)/);
      expect(csp).toMatch(/font-src 'self' data:(;|$)/);
      expect(csp).not.toMatch(/\bwss?:/);
    });

    it('when served over plain HTTP (COOKIE_SECURE=false) then no HSTS header', async () => {
      const res = await request(t.app).get('/api/health');
      expect(res.headers['strict-transport-security']).toBeUndefined();
    });

    it('when an API answer is JSON then Cache-Control is no-store', async () => {
      const admin = await t.agent('admin');
      for (const url of ['/api/health', '/api/auth/me', '/api/users', '/api/no-such-route']) {
        const res = await admin.get(url);
        expect(res.headers['cache-control']).toBe('no-store');
      }
    });
  });

  describe('live events', () => {
    it('when a WebSocket upgrade carries an Origin that does not parse then 403, not 500', async () => {
      const server = http.createServer(t.app);
      const live = attachLiveEvents(server, {
        sessionParser: t.sessionParser,
        users: t.services.users,
        events: t.events,
      });
      await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
      const base = `127.0.0.1:${(server.address() as AddressInfo).port}`;
      try {
        for (const origin of ['http://[', 'not a url', '://']) {
          const status = await new Promise<number>((resolve, reject) => {
            const ws = new WebSocket(`ws://${base}/api/events`, { headers: { Origin: origin } });
            ws.on('unexpected-response', (_req, res) => resolve(res.statusCode ?? 0));
            ws.on('open', () => reject(new Error('the socket opened')));
            ws.on('error', () => undefined);
          });
          expect(status).toBe(403);
        }
      } finally {
        live.close();
        await new Promise((r) => server.close(r));
      }
    });
  });
});

describe('HTTPS deployment', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ COOKIE_SECURE: 'true' });
  });
  afterAll(() => t.stop());

  it('when COOKIE_SECURE=true then HSTS is sent', async () => {
    const res = await request(t.app).get('/api/health');
    expect(String(res.headers['strict-transport-security'])).toMatch(/max-age=\d+/);
  });
});
