import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { buildRecords } from '../factories/records';
import { rowCounts, testDb } from './support/database';
import { collectionWorld } from './support/records';
import { registeredRoutes } from './support/routes';
import { startTestServer, type TestServer } from './support/server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

const RECORD_PARAMS = [':areaId', ':plantId', ':leadId', ':measurementId', ':careId'];

/** Every route with a record id in its path, read from the app itself so new routes are covered. */
const recordRoutes = registeredRoutes(createApp({ db: testDb() })).filter((r) => RECORD_PARAMS.some((p) => r.includes(p)));

/** Valid bodies, so that the refusal comes from the id and not from the input. */
const today = new Date().toISOString().slice(0, 10);
const BODIES: Record<string, unknown> = {
  'PATCH /api/collections/:collectionId/areas/:areaId': { version: 1, name: 'Renamed' },
  'POST /api/collections/:collectionId/areas/:areaId/care': { kind: 'water', occurredOn: today },
  'PATCH /api/collections/:collectionId/plants/:plantId': { version: 1, medium: 'LECA' },
  'POST /api/collections/:collectionId/plants/:plantId/divide': { dividedOn: today, pieces: [{ tag: 'Piece' }] },
  'POST /api/collections/:collectionId/plants/:plantId/leads': { season: 2026, label: 'New', firstSeen: today },
  'POST /api/collections/:collectionId/plants/:plantId/care': { kind: 'water', occurredOn: today },
  'POST /api/collections/:collectionId/plants/:plantId/handoffs': { email: 'next-keeper@example.test' },
  'PATCH /api/collections/:collectionId/leads/:leadId': { version: 1, status: 'rotted' },
  'POST /api/collections/:collectionId/leads/:leadId/measurements': { date: today, heightMm: 10 },
  'POST /api/collections/:collectionId/leads/:leadId/sheath': { date: today, sheath: 'budded' },
  'PUT /api/collections/:collectionId/leads/:leadId/bloom': { flowerCount: 3 },
  'PATCH /api/collections/:collectionId/measurements/:measurementId': { version: 1, heightMm: 10 },
};

describe('record ids in the path', () => {
  it('covers the record routes', () => {
    expect(recordRoutes.length).toBeGreaterThanOrEqual(15);
  });

  // A malformed id is answered as a missing record (404), as the guard answers a malformed collection id.
  it.each(recordRoutes)('%s with a malformed id → 404, nothing written', async (route) => {
    const w = await collectionWorld(server);
    await buildRecords(testDb(), w.collectionId, w.people.grower.id);
    const [method, template] = route.split(' ');
    let path = template.replace(':collectionId', w.collectionId);
    for (const param of RECORD_PARAMS) path = path.replace(param, 'not-a-uuid');
    const before = await rowCounts();
    const res = await w.owner.send(method.toLowerCase() as 'get', path, {});
    expect(res.status, JSON.stringify(res.body)).toBe(404);
    expect(res.body.error.code).toBe('not_found');
    expect(await rowCounts()).toEqual(before);
  });

  // The ids are real, but of another collection: a member of both learns nothing through this one.
  it.each(recordRoutes)("%s with another collection's ids → 404, nothing written", async (route) => {
    const w = await collectionWorld(server);
    const theirs = await buildRecords(testDb(), w.otherCollectionId, w.people.outsider.id);
    const ids: Record<string, string> = {
      ':areaId': theirs.area.id,
      ':plantId': theirs.plant.id,
      ':leadId': theirs.lead.id,
      ':measurementId': theirs.measurement.id,
      ':careId': theirs.care.id,
    };
    const [method, template] = route.split(' ');
    let path = template.replace(':collectionId', w.collectionId);
    for (const param of RECORD_PARAMS) path = path.replace(param, ids[param]);
    const before = await rowCounts();
    const res = await w.owner.send(method.toLowerCase() as 'get', path, BODIES[route] ?? {});
    expect(res.status, JSON.stringify(res.body)).toBe(404);
    expect(await rowCounts()).toEqual(before);
  });
});
