import { expect } from 'vitest';
import { buildCollectionWithMembers } from '../../factories/users';
import { testDb } from './database';
import { browser, type TestServer } from './server';

type Response = Awaited<ReturnType<ReturnType<typeof browser>['get']>>;

/** A collection with a signed-in client per role, and `at('/plants')` for its API paths. */
export async function collectionWorld(server: TestServer) {
  const fixture = await buildCollectionWithMembers(testDb());
  const as = (who: 'owner' | 'grower' | 'viewer' | 'outsider') => browser(server.url, fixture.people[who].cookie);
  return {
    ...fixture,
    owner: as('owner'),
    grower: as('grower'),
    viewer: as('viewer'),
    outsider: as('outsider'),
    at: (path: string) => `/api/collections/${fixture.collectionId}${path}`,
    elsewhere: (path: string) => `/api/collections/${fixture.otherCollectionId}${path}`,
  };
}

/** Asserts a refusal: the status, and (for field errors) the failing field and its reason. */
export function expectRefused(res: Response, status: number, field?: string, reason?: RegExp) {
  expect(res.status, JSON.stringify(res.body)).toBe(status);
  expect(res.body.error.code).toEqual(expect.any(String));
  expect(res.body.error.message).toEqual(expect.any(String));
  if (field) {
    const issue = (res.body.error.details ?? []).find((d: { field: string }) => d.field === field);
    expect(issue, `no issue for ${field} in ${JSON.stringify(res.body)}`).toBeDefined();
    if (reason) expect(issue.reason).toMatch(reason);
  }
}
