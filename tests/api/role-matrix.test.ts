import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { buildCollectionWithMembers, buildSignUp } from '../factories/users';
import { testDb } from './support/database';
import { registeredRoutes } from './support/routes';
import { browser, startTestServer, type TestServer } from './support/server';

type Principal = 'anonymous' | 'outsider' | 'viewer' | 'grower' | 'owner';
type Expected = Record<Principal, number>;

const PUBLIC = (status: number): Expected => ({ anonymous: status, outsider: status, viewer: status, grower: status, owner: status });
const SIGNED_IN = (status: number): Expected => ({ anonymous: 401, outsider: status, viewer: status, grower: status, owner: status });
/** Collection routes: a non-member learns nothing (404); a member below the role gets 403. */
const MEMBERS = (minimum: 'viewer' | 'grower' | 'owner', status: number): Expected => {
  const allowed = (role: 'viewer' | 'grower' | 'owner') =>
    ({ viewer: 1, grower: 2, owner: 3 })[role] >= ({ viewer: 1, grower: 2, owner: 3 })[minimum] ? status : 403;
  return { anonymous: 401, outsider: 404, viewer: allowed('viewer'), grower: allowed('grower'), owner: allowed('owner') };
};

interface Entry {
  expected: Expected;
  body?: () => unknown;
}

/**
 * Every /api route and who may use it. A route the server registers without an entry
 * here fails the first test, so access is decided for each new route.
 */
const MATRIX: Record<string, Entry> = {
  'GET /api/health': { expected: PUBLIC(200) },
  'GET /api/session': { expected: PUBLIC(200) },
  'POST /api/auth/sign-up': { expected: PUBLIC(201), body: () => buildSignUp() },
  'POST /api/auth/sign-in': { expected: PUBLIC(401), body: () => ({ email: 'nobody@example.test', password: 'not-a-real-one' }) },
  'POST /api/auth/sign-out': { expected: SIGNED_IN(204) },
  'POST /api/collections': { expected: SIGNED_IN(201), body: () => ({ name: 'Windowsill' }) },
  'GET /api/collections/:collectionId': { expected: MEMBERS('viewer', 200) },
  'PATCH /api/collections/:collectionId': { expected: MEMBERS('owner', 200), body: () => ({ name: 'Renamed bench' }) },
  'DELETE /api/collections/:collectionId': { expected: MEMBERS('owner', 204) },
  'GET /api/collections/:collectionId/members': { expected: MEMBERS('viewer', 200) },
  'PATCH /api/collections/:collectionId/members/:userId': { expected: MEMBERS('owner', 200), body: () => ({ role: 'viewer' }) },
  'DELETE /api/collections/:collectionId/members/:userId': { expected: MEMBERS('owner', 204) },
};

const PRINCIPALS: Principal[] = ['anonymous', 'outsider', 'viewer', 'grower', 'owner'];

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

describe('role matrix', () => {
  it('has an entry for every registered /api route, and no entry for a route that does not exist', () => {
    const routes = registeredRoutes(createApp({ db: testDb() })).filter((r) => r.split(' ')[1].startsWith('/api/'));
    expect(routes.length).toBeGreaterThan(5);
    expect(routes).toEqual(Object.keys(MATRIX).sort());
  });

  const cases = Object.entries(MATRIX).flatMap(([route, entry]) =>
    PRINCIPALS.map((principal) => ({ route, principal, entry, status: entry.expected[principal] })),
  );

  it.each(cases)('$route as $principal → $status', async ({ route, principal, entry, status }) => {
    // A fresh collection for every case, so deletions cannot leak into the next one.
    const fixture = await buildCollectionWithMembers(testDb());
    const [method, template] = route.split(' ');
    const path = template
      .replace(':collectionId', fixture.collectionId)
      .replace(':userId', fixture.people.grower.id);
    const cookie = principal === 'anonymous' ? undefined : fixture.people[principal].cookie;
    const res = await browser(server.url, cookie).send(method.toLowerCase() as 'get', path, entry.body?.());
    expect(res.status, JSON.stringify(res.body)).toBe(status);
    if (status >= 400) expect(res.body.error.code).toEqual(expect.any(String));
  });
});
