/** The OpenAPI document parses, is 3.1, and lists exactly the routes the Express app really has. */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { API_ROUTES } from '../../server/openapi';
import { apiRoutes } from '../support/app-routes';
import { createTestApp, type TestApp } from '../support/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t?.close();
});

describe('OpenAPI document', () => {
  it('is served as parseable OpenAPI 3.1 with request schemas from zod', async () => {
    const res = await request(t.app).get('/api/openapi.json');
    expect(res.status).toBe(200);
    const doc = JSON.parse(res.text);
    expect(doc.openapi).toBe('3.1.0');
    expect(doc.components.securitySchemes.bearer).toMatchObject({ type: 'http', scheme: 'bearer' });
    const createToken = doc.paths['/api/access-tokens'].post;
    expect(createToken.requestBody.content['application/json'].schema.properties.scope.enum).toEqual(['read', 'write']);
    const getRun = doc.paths['/api/projects/{projectId}/runs/{runId}'].get;
    expect(getRun.parameters.map((p: { name: string }) => p.name)).toEqual(['projectId', 'runId']);
    expect(getRun.security).toEqual([{ session: [] }, { bearer: [] }]);
    const listRuns = doc.paths['/api/projects/{projectId}/runs'].get;
    expect(listRuns.parameters.map((p: { name: string }) => p.name)).toEqual(expect.arrayContaining(['status', 'sort']));
  });

  it('lists every route of the app, and no route the app does not have', () => {
    const actual = apiRoutes(t.app);
    const documented = API_ROUTES.map((r) => `${r.method.toUpperCase()} ${r.path}`).sort();
    expect(actual.length).toBeGreaterThan(50);
    expect(documented).toEqual(actual);
  });
});
