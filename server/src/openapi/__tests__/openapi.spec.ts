import request from 'supertest';
import { startTestApp, type TestApp } from '../../testing/test-app';
import type { Express } from 'express';
import { API_OPERATIONS } from '../../contracts/routes';

describe('OpenAPI document', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.stop());

  it('is served without sign-in as OpenAPI 3 with every catalogued operation', async () => {
    const res = await request(t.app).get('/api/openapi.json');
    expect(res.status).toBe(200);
    expect(res.body.openapi).toMatch(/^3\./);
    const operations = Object.values(res.body.paths as Record<string, object>).flatMap((p) => Object.keys(p));
    expect(operations).toHaveLength(API_OPERATIONS.length);
  });

  it('describes answers with the response schemas the web app parses with', async () => {
    const doc = (await request(t.app).get('/api/openapi.json')).body;
    const batch = doc.paths['/api/batches/{id}'].get.responses['200'].content['application/json'].schema;
    expect(batch.required).toEqual(expect.arrayContaining(['id', 'state', 'settings', 'summary']));
    expect(batch.properties.state.enum).toEqual(['open', 'reviewed', 'approved']);
    const intake = doc.paths['/api/intake'].get.responses['200'].content['application/json'].schema;
    expect(intake.properties.items.items.properties.status.enum).toContain('quarantined');
    // Every operation that answers JSON says how.
    const notJson = /text\/csv|application\/pdf|octet-stream|spreadsheetml|OpenAPI 3 document/;
    const withoutSchema = API_OPERATIONS.filter(
      (op) => !op.response && op.success[0] !== 204 && !notJson.test(op.success[1]),
    );
    expect(withoutSchema.map((op) => `${op.method} ${op.path}`)).toEqual([]);
  });

  it('lists every mounted route, with the roles its role check lets through', () => {
    const mounted = mountedRoutes(t.app);
    const key = (method: string, path: string) => `${method.toUpperCase()} ${path}`;
    const table = new Map(
      API_OPERATIONS.map((op) => [
        key(op.method, op.path),
        typeof op.access === 'string' ? op.access : [...op.access].sort().join(','),
      ]),
    );
    const found = new Map(mounted.map((r) => [key(r.method, r.path), r.roles]));
    // No mounted route is missing from the table, and no table entry is missing from the app.
    expect([...found.keys()].filter((k) => !table.has(k))).toEqual([]);
    expect([...table.keys()].filter((k) => !found.has(k))).toEqual([]);
    // The same roles: a public route has no role check, an instrument route its own token check.
    for (const [k, access] of table) {
      const roles = found.get(k);
      if (access === 'public' || access === 'instrument' || access === 'watcher')
        expect([k, roles]).toEqual([k, null]);
      else expect([k, roles]).toEqual([k, access]);
    }
  });

  it('describes request bodies with the schemas the routes validate with', async () => {
    const doc = (await request(t.app).get('/api/openapi.json')).body;
    const login = doc.paths['/api/auth/login'].post.requestBody.content['application/json'].schema;
    expect(login.required).toEqual(['email', 'password']);
    expect(login.properties.password.maxLength).toBe(200);
    const batch = doc.paths['/api/batches'].post.requestBody.content['application/json'].schema;
    expect(batch.properties.settings).toBeDefined();
    expect(batch.required).toEqual(
      expect.arrayContaining(['name', 'profileId', 'layoutId', 'manifestId', 'runId']),
    );
    const intake = doc.paths['/api/intake'].get.parameters.map((p: { name: string }) => p.name);
    expect(intake).toEqual(expect.arrayContaining(['status', 'sort', 'page', 'pageSize']));
  });

  // Signed in as admin so role checks pass and the route itself answers; signing out goes last.
  const ordered = [...API_OPERATIONS].sort(
    (a, b) => Number(a.path === '/api/auth/logout') - Number(b.path === '/api/auth/logout'),
  );
  let agent: Awaited<ReturnType<TestApp['agent']>>;

  it.each(ordered.map((op) => [op.method.toUpperCase(), op.path, op] as const))(
    '%s %s is a mounted route',
    async (_m, _p, op) => {
      agent ??= await t.agent('admin');
      const url = op.path.replace(/\{\w+\}/g, '999999');
      const res = await agent[op.method as 'get'](url).send({});
      // Any answer but the "no such route" 404 proves the route exists (a missing record is a different 404).
      expect(res.body?.error?.message ?? '').not.toMatch(/^No API route/);
    },
  );
});

interface StackLayer {
  rawPath?: unknown;
  handle: { stack?: StackLayer[]; roles?: readonly string[] };
  route?: { path: string; methods: Record<string, boolean>; stack: StackLayer[] };
}

/**
 * Every route of the app as Express holds it (method, OpenAPI-style path) with the roles of the role
 * checks it passes through: a router's `use(requireRole(...))` covers the routes after it, a route's own
 * check narrows it. Null: no role check on the way.
 */
function mountedRoutes(app: Express): { method: string; path: string; roles: string | null }[] {
  const routes: { method: string; path: string; roles: string | null }[] = [];
  const walk = (stack: StackLayer[], prefix: string, inherited: readonly string[] | null): void => {
    let roles = inherited;
    for (const layer of stack) {
      if (layer.route) {
        const own = layer.route.stack.map((l) => l.handle.roles).filter((r) => r !== undefined);
        const effective = own.reduce<readonly string[] | null>(
          (acc, r) => (acc === null ? r : acc.filter((x) => r.includes(x))),
          roles,
        );
        const path = (prefix + layer.route.path).replace(/\/$/, '').replace(/:(\w+)/g, '{$1}');
        for (const method of Object.keys(layer.route.methods).filter((m) => m !== '_all'))
          routes.push({ method, path, roles: effective ? [...effective].sort().join(',') : null });
      } else if (layer.handle.stack) {
        walk(layer.handle.stack, prefix + (typeof layer.rawPath === 'string' ? layer.rawPath : ''), roles);
      } else if (layer.handle.roles) {
        roles = roles === null ? layer.handle.roles : roles.filter((x) => layer.handle.roles!.includes(x));
      }
    }
  };
  walk((app as unknown as { router: { stack: StackLayer[] } }).router.stack, '', null);
  return routes.filter((r) => r.path.startsWith('/api'));
}
