import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { areas, careEntries, plants } from '../../db/schema';
import { buildAreaInput, buildCareInput, daysAgo, daysAhead, insertArea, insertCare, insertPlant } from '../factories/records';
import { rowCounts, testDb } from './support/database';
import { collectionWorld, expectRefused } from './support/records';
import { startTestServer, type TestServer } from './support/server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

describe('areas', () => {
  it('are listed by walking position then name; a new area goes last', async () => {
    const w = await collectionWorld(server);
    const first = await w.grower.post(w.at('/areas'), buildAreaInput({ name: 'Shade cloth bench' }));
    expect(first.status, JSON.stringify(first.body)).toBe(201);
    expect(first.body).toMatchObject({ name: 'Shade cloth bench', indoors: false, position: 0, version: 1 });
    const second = await w.grower.post(w.at('/areas'), buildAreaInput({ name: 'Indoor light stand', indoors: true }));
    expect(second.body.position).toBe(1);
    await insertArea(testDb(), w.collectionId, { name: 'Aardvark corner', position: 1 });
    await insertArea(testDb(), w.otherCollectionId, { name: 'Not ours' });
    const list = await w.viewer.get(w.at('/areas'));
    expect(list.body.map((a: { name: string }) => a.name)).toEqual(['Shade cloth bench', 'Aardvark corner', 'Indoor light stand']);
  });

  it('an edit increments the version and may move the area in the walking order; a stale one gets 409', async () => {
    const w = await collectionWorld(server);
    const area = await insertArea(testDb(), w.collectionId, { name: 'Bench', indoors: true });
    const ok = await w.grower.patch(w.at(`/areas/${area.id}`), { version: 1, position: 5, notes: 'east end' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body).toMatchObject({ position: 5, notes: 'east end', indoors: true, version: 2 });
    const before = await rowCounts();
    const stale = await w.owner.patch(w.at(`/areas/${area.id}`), { version: 1, name: 'Old bench' });
    expect(stale.status).toBe(409);
    expect(stale.body).toMatchObject({ error: { code: 'stale' }, current: { name: 'Bench', version: 2 } });
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses a duplicate name (409), an empty one (400) and a negative position (400); nothing is written', async () => {
    const w = await collectionWorld(server);
    await insertArea(testDb(), w.collectionId, { name: 'Bench' });
    const other = await insertArea(testDb(), w.collectionId, { name: 'Shelf' });
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at('/areas'), buildAreaInput({ name: 'Bench' })), 409, 'name', /"Bench"/);
    expectRefused(await w.grower.patch(w.at(`/areas/${other.id}`), { version: 1, name: 'Bench' }), 409, 'name', /"Bench"/);
    expectRefused(await w.grower.post(w.at('/areas'), buildAreaInput({ name: '' })), 400, 'name', /Enter a name/);
    expectRefused(await w.grower.patch(w.at(`/areas/${other.id}`), { version: 1, position: -1 }), 400, 'position', /negative/);
    expect(await rowCounts()).toEqual(before);
  });

  it('deleting is for owners; the plants stay, without an area', async () => {
    const w = await collectionWorld(server);
    const area = await insertArea(testDb(), w.collectionId);
    const plant = await insertPlant(testDb(), w.collectionId, { areaId: area.id });
    expectRefused(await w.grower.delete(w.at(`/areas/${area.id}`)), 403);
    expect((await w.owner.delete(w.at(`/areas/${area.id}`))).status).toBe(204);
    const [row] = await testDb().select().from(plants).where(eq(plants.id, plant.id));
    expect(row.areaId).toBeNull();
  });

  it("another collection's area cannot be edited, deleted or given care (404)", async () => {
    const w = await collectionWorld(server);
    const foreign = await insertArea(testDb(), w.otherCollectionId, { name: 'Theirs' });
    const before = await rowCounts();
    expectRefused(await w.owner.patch(w.at(`/areas/${foreign.id}`), { version: 1, name: 'Mine now' }), 404);
    expectRefused(await w.owner.delete(w.at(`/areas/${foreign.id}`)), 404);
    expectRefused(await w.owner.post(w.at(`/areas/${foreign.id}/care`), buildCareInput()), 404);
    expectRefused(await w.owner.patch(w.at('/areas/not-an-id'), { version: 1, name: 'x' }), 404);
    expect(await rowCounts()).toEqual(before);
    const [row] = await testDb().select().from(areas).where(eq(areas.id, foreign.id));
    expect(row.name).toBe('Theirs');
  });
});

describe('care entries', () => {
  it.each([
    ['water', {}],
    ['feed', { withCalcium: true }],
    ['treat', { product: 'Horticultural oil', target: 'scale' }],
    ['damage', { damageKind: 'sunburn' }],
    ['note', { note: 'Sheath looks papery' }],
  ])('records a %s entry for a plant, shown on the plant page', async (kind, extra) => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId);
    const res = await w.grower.post(w.at(`/plants/${plant.id}/care`), buildCareInput({ kind, ...extra }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ plantId: plant.id, areaId: null, kind, createdBy: w.people.grower.id, ...extra });
    const page = await w.viewer.get(w.at(`/plants/${plant.id}`));
    expect(page.body.care.map((c: { id: string }) => c.id)).toEqual([res.body.id]);
  });

  it('a move puts the plant in the new area, and a repot sets its medium, with the entry', async () => {
    const w = await collectionWorld(server);
    const from = await insertArea(testDb(), w.collectionId, { name: 'Bench' });
    const to = await insertArea(testDb(), w.collectionId, { name: 'Greenhouse' });
    const plant = await insertPlant(testDb(), w.collectionId, { areaId: from.id, medium: 'bark' });
    const move = await w.grower.post(w.at(`/plants/${plant.id}/care`), buildCareInput({ kind: 'move', toAreaId: to.id }));
    expect(move.status, JSON.stringify(move.body)).toBe(201);
    expect(move.body.toAreaId).toBe(to.id);
    const repot = await w.grower.post(w.at(`/plants/${plant.id}/care`), buildCareInput({ kind: 'repot', newMedium: 'LECA' }));
    expect(repot.status).toBe(201);
    const [row] = await testDb().select().from(plants).where(eq(plants.id, plant.id));
    expect(row).toMatchObject({ areaId: to.id, medium: 'LECA', version: 3 });
  });

  it('records an entry for an area (a move records where the bench went)', async () => {
    const w = await collectionWorld(server);
    const bench = await insertArea(testDb(), w.collectionId, { name: 'Bench' });
    const indoors = await insertArea(testDb(), w.collectionId, { name: 'Indoors', indoors: true });
    const res = await w.grower.post(w.at(`/areas/${bench.id}/care`), buildCareInput({ kind: 'move', toAreaId: indoors.id }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ areaId: bench.id, plantId: null, toAreaId: indoors.id });
    expectRefused(await w.grower.post(w.at(`/areas/${bench.id}/care`), buildCareInput({ kind: 'move', toAreaId: bench.id })), 400, 'toAreaId', /other than this one/);
  });

  it.each([
    ['an unknown kind', { kind: 'prune' }, 'kind', /Kind is one of/],
    ['a feed without saying whether it had calcium', { kind: 'feed' }, 'withCalcium', /calcium/],
    ['a repot without the new medium', { kind: 'repot' }, 'newMedium', /new medium/],
    ['a treatment without the product', { kind: 'treat', target: 'mealybug' }, 'product', /product/],
    ['damage of an unknown kind', { kind: 'damage', damageKind: 'hail' }, 'damageKind', /kind of damage/],
    ['an empty note', { kind: 'note', note: ' ' }, 'note', /Write the note/],
    ['a date in the future', { occurredOn: daysAhead(3) }, 'occurredOn', /future/],
  ])('refuses %s with 400 naming the field, writing nothing', async (_what, body, field, reason) => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId);
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/plants/${plant.id}/care`), buildCareInput(body)), 400, field, reason);
    expect(await rowCounts()).toEqual(before);
  });

  it("refuses a move to another collection's area (400) and leaves the plant where it was", async () => {
    const w = await collectionWorld(server);
    const home = await insertArea(testDb(), w.collectionId);
    const plant = await insertPlant(testDb(), w.collectionId, { areaId: home.id });
    const foreign = await insertArea(testDb(), w.otherCollectionId);
    const before = await rowCounts();
    const res = await w.grower.post(w.at(`/plants/${plant.id}/care`), buildCareInput({ kind: 'move', toAreaId: foreign.id }));
    expectRefused(res, 400, 'toAreaId', /No such area/);
    expect(await rowCounts()).toEqual(before);
    const [row] = await testDb().select().from(plants).where(eq(plants.id, plant.id));
    expect(row).toMatchObject({ areaId: home.id, version: 1 });
  });

  it("cannot be added to another collection's plant (404), nor by a viewer (403)", async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId);
    const foreign = await insertPlant(testDb(), w.otherCollectionId);
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/plants/${foreign.id}/care`), buildCareInput()), 404);
    expectRefused(await w.viewer.post(w.at(`/plants/${plant.id}/care`), buildCareInput()), 403);
    expect(await rowCounts()).toEqual(before);
  });

  it('a grower may delete their own entry, not another’s; an owner any; not across collections', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId);
    const mine = await insertCare(testDb(), w.collectionId, { plantId: plant.id, createdBy: w.people.grower.id });
    const owners = await insertCare(testDb(), w.collectionId, { plantId: plant.id, createdBy: w.people.owner.id, occurredOn: daysAgo(3) });
    const foreign = await insertCare(testDb(), w.otherCollectionId, { plantId: (await insertPlant(testDb(), w.otherCollectionId)).id });
    const before = await rowCounts();
    expectRefused(await w.grower.delete(w.at(`/care/${owners.id}`)), 403);
    expectRefused(await w.viewer.delete(w.at(`/care/${mine.id}`)), 403);
    expectRefused(await w.owner.delete(w.at(`/care/${foreign.id}`)), 404);
    expect(await rowCounts()).toEqual(before);
    expect((await w.grower.delete(w.at(`/care/${mine.id}`))).status).toBe(204);
    expect((await w.owner.delete(w.at(`/care/${owners.id}`))).status).toBe(204);
    const left = await testDb().select().from(careEntries).where(eq(careEntries.plantId, plant.id));
    expect(left).toEqual([]);
  });
});
