import request from 'supertest';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { API_OPERATIONS } from '../api-catalogue';

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
      const res = await agent[op.method](url).send({});
      // Any answer but the "no such route" 404 proves the route exists (a missing record is a different 404).
      expect(res.body?.error?.message ?? '').not.toMatch(/^No API route/);
    },
  );
});
