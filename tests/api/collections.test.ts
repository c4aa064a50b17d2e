import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { collections, memberships } from '../../db/schema';
import { buildCollectionWithMembers } from '../factories/users';
import { rowCounts, testDb } from './support/database';
import { browser, startTestServer, type TestServer } from './support/server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

describe('collections and members', () => {
  it('lists the members with their roles', async () => {
    const { collectionId, people } = await buildCollectionWithMembers(testDb());
    const res = await browser(server.url, people.viewer.cookie).get(`/api/collections/${collectionId}/members`);
    expect(res.status).toBe(200);
    expect(res.body.map((m: { role: string }) => m.role).sort()).toEqual(['grower', 'owner', 'viewer']);
  });

  it('an owner changes a role and removes a member', async () => {
    const { collectionId, people } = await buildCollectionWithMembers(testDb());
    const owner = browser(server.url, people.owner.cookie);
    const promoted = await owner.patch(`/api/collections/${collectionId}/members/${people.viewer.id}`, { role: 'grower' });
    expect(promoted.status).toBe(200);
    expect(promoted.body.find((m: { userId: string }) => m.userId === people.viewer.id).role).toBe('grower');

    expect((await owner.delete(`/api/collections/${collectionId}/members/${people.grower.id}`)).status).toBe(204);
    const rows = await testDb().select().from(memberships).where(eq(memberships.collectionId, collectionId));
    expect(rows.map((r) => r.userId)).not.toContain(people.grower.id);
    // The removed person no longer sees the collection at all.
    expect((await browser(server.url, people.grower.cookie).get(`/api/collections/${collectionId}`)).status).toBe(404);
  });

  it('the last owner can be neither demoted nor removed', async () => {
    const { collectionId, people } = await buildCollectionWithMembers(testDb());
    const owner = browser(server.url, people.owner.cookie);
    const before = await rowCounts();
    const demote = await owner.patch(`/api/collections/${collectionId}/members/${people.owner.id}`, { role: 'grower' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe('last_owner');
    const remove = await owner.delete(`/api/collections/${collectionId}/members/${people.owner.id}`);
    expect(remove.status).toBe(409);
    expect(await rowCounts()).toEqual(before);
    const [row] = await testDb()
      .select()
      .from(memberships)
      .where(and(eq(memberships.collectionId, collectionId), eq(memberships.userId, people.owner.id)));
    expect(row.role).toBe('owner');
  });

  it('with two owners, one may step down', async () => {
    const { collectionId, people } = await buildCollectionWithMembers(testDb());
    const owner = browser(server.url, people.owner.cookie);
    await owner.patch(`/api/collections/${collectionId}/members/${people.grower.id}`, { role: 'owner' });
    const stepDown = await owner.patch(`/api/collections/${collectionId}/members/${people.owner.id}`, { role: 'viewer' });
    expect(stepDown.status).toBe(200);
  });

  it('refuses an unknown role and a missing member clearly, writing nothing', async () => {
    const { collectionId, people } = await buildCollectionWithMembers(testDb());
    const owner = browser(server.url, people.owner.cookie);
    const before = await rowCounts();
    const bad = await owner.patch(`/api/collections/${collectionId}/members/${people.viewer.id}`, { role: 'admin' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details[0].field).toBe('role');
    const missing = await owner.patch(`/api/collections/${collectionId}/members/nobody-here`, { role: 'viewer' });
    expect(missing.status).toBe(404);
    expect(await rowCounts()).toEqual(before);
  });

  it('updates settings and validates them', async () => {
    const { collectionId, people } = await buildCollectionWithMembers(testDb());
    const owner = browser(server.url, people.owner.cookie);
    const ok = await owner.patch(`/api/collections/${collectionId}`, { units: 'in', seasonStartMonth: 9, latitude: -33.9, longitude: 151.2 });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ units: 'in', seasonStartMonth: 9, role: 'owner' });
    expect(ok.body.latitude).toBeCloseTo(-33.9, 4);

    for (const [body, field] of [
      [{ seasonStartMonth: 13 }, 'seasonStartMonth'],
      [{ units: 'furlongs' }, 'units'],
      [{ latitude: 91 }, 'latitude'],
      [{ name: '' }, 'name'],
    ] as const) {
      const res = await owner.patch(`/api/collections/${collectionId}`, body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.details.map((d: { field: string }) => d.field)).toContain(field);
    }
    const empty = await owner.patch(`/api/collections/${collectionId}`, {});
    expect(empty.status).toBe(400);
    const [row] = await testDb().select().from(collections).where(eq(collections.id, collectionId));
    expect(row).toMatchObject({ units: 'in', seasonStartMonth: 9 });
  });

  it('a malformed collection id is treated like a missing one', async () => {
    const { people } = await buildCollectionWithMembers(testDb());
    const res = await browser(server.url, people.owner.cookie).get('/api/collections/not-a-uuid');
    expect(res.status).toBe(404);
  });

  it('a person can create a second collection and is its owner', async () => {
    const { people } = await buildCollectionWithMembers(testDb());
    const person = browser(server.url, people.viewer.cookie);
    const created = await person.post('/api/collections', { name: 'Kitchen windowsill' });
    expect(created.status).toBe(201);
    expect(created.body.role).toBe('owner');
    const session = await person.get('/api/session');
    expect(session.body.me.collections.map((c: { name: string }) => c.name)).toContain('Kitchen windowsill');
  });
});
