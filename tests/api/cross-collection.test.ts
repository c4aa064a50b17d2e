import { randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { localDiskStore, type PhotoStore } from '../../server/photos/store';
import { insertHandoff } from '../factories/handoffs';
import { cameraJpeg } from '../factories/photos';
import { testDb } from './support/database';
import { databaseState } from './support/hostile';
import { hostileWorld, validBodies, type HostileWorld } from './support/hostile-fixtures';
import { registeredRoutes } from './support/routes';
import { browser, startTestServer, type TestServer } from './support/server';

/**
 * No cross-collection reads or writes by guessing ids: the owner of collection A, using ids
 * that belong to collection B — through A's path, or with B's collection id itself — gets
 * 404 every time (never 200/204, never a 403 that would reveal that the record exists),
 * and the database does not change.
 */

/** Path parameters that are ids (not tokens or keys, which carry their own credential). */
const isIdParam = (name: string) => /Id$/.test(name);
const paramNames = (template: string) => [...template.matchAll(/:(\w+)/g)].map((m) => m[1]);

const idRoutes = registeredRoutes(createApp({ db: testDb() })).filter((r) => paramNames(r).some(isIdParam));

let server: TestServer;
let photoDir: string;
let photoStore: PhotoStore;
/** A: the collection the attacker owns. B: somebody else's, whose ids are used. */
let a: HostileWorld;
let b: HostileWorld;
let bIds: Record<string, string>;

beforeAll(async () => {
  photoDir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-cross-photos-'));
  photoStore = localDiskStore(photoDir);
  server = await startTestServer({ photoStore });
  a = await hostileWorld(photoStore);
  b = await hostileWorld(photoStore);
  const handoff = await insertHandoff(testDb(), {
    collectionId: b.collectionId,
    plantId: b.records.plant.id,
    sentBy: b.people.owner.id,
    recipientEmail: 'friend@example.test',
  });
  bIds = {
    ...b.params,
    // B's own member who is not in A: changing or removing them through A must not reach B.
    userId: b.people.grower.id,
    handoffId: handoff.id,
    // An upload key, which names no record: only B's collection id in the path can reach B.
    clientKey: randomUUID(),
  };
});

afterAll(async () => {
  await server.close();
  await fs.rm(photoDir, { recursive: true, force: true });
});

/** Fill a route with B's ids, and the collection id given. */
function pathWith(template: string, collectionId: string): string {
  return template.replace(/:(\w+)/g, (_m, name: string) => {
    if (name === 'collectionId') return collectionId;
    const id = bIds[name];
    if (!id) throw new Error(`no fixture for :${name}: add one of collection B's ids for it in cross-collection.test.ts`);
    return id;
  });
}

async function attempt(route: string, collectionId: string) {
  const [method, template] = route.split(' ');
  const body = validBodies(a)[route]?.();
  const before = await databaseState();
  const res = await browser(server.url, a.cookie).send(method.toLowerCase() as 'get', pathWith(template, collectionId), body ?? {});
  expect(res.status, `${route}: ${JSON.stringify(res.body)}`).toBe(404);
  expect(res.body.error.code).toEqual(expect.any(String));
  expect(await databaseState(), `${route} changed the database`).toEqual(before);
}

describe('ids of another collection', () => {
  it('covers every route that takes an id, each with a fixture', () => {
    expect(idRoutes.length).toBeGreaterThan(30);
    const missing = idRoutes.flatMap((r) => paramNames(r).filter((p) => isIdParam(p) && p !== 'collectionId' && !(p in bIds)).map((p) => `${r} (:${p})`));
    expect(missing, 'routes with an id parameter that has no fixture of collection B').toEqual([]);
  });

  const throughOwnPath = idRoutes.filter((r) => paramNames(r).some((p) => isIdParam(p) && p !== 'collectionId'));
  it.each(throughOwnPath)("%s: B's ids through A's path → 404, nothing written", async (route) => {
    await attempt(route, a.collectionId);
  });

  const withCollection = idRoutes.filter((r) => paramNames(r).includes('collectionId'));
  it.each(withCollection)("%s: B's collection id itself → 404, nothing written", async (route) => {
    await attempt(route, b.collectionId);
  });
});

describe('ids of another collection inside a body', () => {
  it('refuses a plant placed in an area of B', async () => {
    const before = await databaseState();
    const res = await browser(server.url, a.cookie).post(`/api/collections/${a.collectionId}/plants`, { ...validBodies(a)['POST /api/collections/:collectionId/plants'](), areaId: b.records.area.id });
    expect([400, 404], JSON.stringify(res.body)).toContain(res.status);
    expect(await databaseState()).toEqual(before);
  });

  it("refuses moving A's plant into an area of B", async () => {
    const before = await databaseState();
    const res = await browser(server.url, a.cookie).patch(`/api/collections/${a.collectionId}/plants/${a.records.plant.id}`, { version: 1, areaId: b.records.area.id });
    expect([400, 404], JSON.stringify(res.body)).toContain(res.status);
    expect(await databaseState()).toEqual(before);
  });

  it('refuses a lead whose parent lead is in B', async () => {
    const before = await databaseState();
    const res = await browser(server.url, a.cookie).post(`/api/collections/${a.collectionId}/plants/${a.records.plant.id}/leads`, {
      ...validBodies(a)['POST /api/collections/:collectionId/plants/:plantId/leads'](),
      parentLeadId: b.records.lead.id,
    });
    expect([400, 404], JSON.stringify(res.body)).toContain(res.status);
    expect(await databaseState()).toEqual(before);
  });

  it("refuses a Rounds order that names B's plants", async () => {
    const before = await databaseState();
    const res = await browser(server.url, a.cookie).put(`/api/collections/${a.collectionId}/rounds/order`, { plantIds: [a.records.plant.id, b.records.plant.id] });
    expect([400, 404], JSON.stringify(res.body)).toContain(res.status);
    expect(await databaseState()).toEqual(before);
  });

  it.each(['plantId', 'leadId', 'measurementId'] as const)("refuses a photo of B's %s uploaded into A", async (field) => {
    const ids = { plantId: b.records.plant.id, leadId: b.records.lead.id, measurementId: b.records.measurement.id };
    const before = await databaseState();
    const supertest = (await import('supertest')).default;
    const res = await supertest(server.url)
      .post(`/api/collections/${a.collectionId}/photos`)
      .set('Origin', server.url)
      .set('Cookie', a.cookie)
      .field(field, ids[field])
      .attach('photo', await cameraJpeg({ width: 40, height: 30, orientation: 1 }), { filename: 'bench.jpg', contentType: 'image/jpeg' });
    expect(res.status, JSON.stringify(res.body)).toBe(404);
    expect(await databaseState()).toEqual(before);
  });

  it("lists no photos of B's lead or plant through A", async () => {
    for (const query of [`leadId=${b.records.lead.id}`, `plantId=${b.records.plant.id}`]) {
      const res = await browser(server.url, a.cookie).get(`/api/collections/${a.collectionId}/photos?${query}`);
      expect([404], `${query}: ${JSON.stringify(res.body)}`).toContain(res.status);
    }
  });
});
