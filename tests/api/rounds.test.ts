import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { plants } from '../../db/schema';
import { daysAgo, insertArea, insertLead, insertMeasurement, insertPlant } from '../factories/records';
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

async function roundsWorld() {
  const w = await collectionWorld(server);
  const db = testDb();
  const wall = await insertArea(db, w.collectionId, { name: 'Mount wall', position: 2 });
  const bench = await insertArea(db, w.collectionId, { name: 'Bench', position: 1 });
  const p1 = await insertPlant(db, w.collectionId, { tag: 'B-2', areaId: bench.id });
  const p2 = await insertPlant(db, w.collectionId, { tag: 'B-1', areaId: bench.id });
  const p3 = await insertPlant(db, w.collectionId, { tag: 'W-1', areaId: wall.id });
  const p4 = await insertPlant(db, w.collectionId, { tag: 'A-0' });
  await insertPlant(db, w.otherCollectionId, { tag: 'THEIRS' });
  return { w, wall, bench, p1, p2, p3, p4 };
}

const order = (body: { stops: Array<{ plant: { tag: string } }> }) => body.stops.map((s) => s.plant.tag);

describe('the Rounds walk', () => {
  it('with no saved order, walks by area position, then tag; plants without an area last', async () => {
    const { w } = await roundsWorld();
    const res = await w.viewer.get(w.at('/rounds'));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(order(res.body)).toEqual(['B-1', 'B-2', 'W-1', 'A-0']);
    expect(res.body.stops[0].plant.areaName).toBe('Bench');
  });

  it("shows each plant's current leads with their latest measurement", async () => {
    const { w, p3 } = await roundsWorld();
    const old = await insertLead(testDb(), p3, { season: 2025, label: '2025-A', firstSeen: '2025-04-01' });
    await insertMeasurement(testDb(), old, { measuredOn: '2025-06-01' });
    const lead = await insertLead(testDb(), p3, { season: 2026, label: '2026-A', firstSeen: daysAgo(50) });
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(20), heightMm: 15 });
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(4), heightMm: 28, leafCount: 2 });
    const res = await w.viewer.get(w.at('/rounds'));
    const stop = res.body.stops.find((s: { plant: { tag: string } }) => s.plant.tag === 'W-1');
    expect(stop.leads.map((l: { label: string }) => l.label)).toEqual(['2026-A']);
    expect(stop.leads[0].latest).toMatchObject({ heightMm: 28, leafCount: 2, date: daysAgo(4) });
  });

  it('saves an order in one go; plants not listed follow, unplaced', async () => {
    const { w, p1, p2, p3, p4 } = await roundsWorld();
    const res = await w.grower.put(w.at('/rounds/order'), { plantIds: [p3.id, p4.id, p1.id] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(order(res.body)).toEqual(['W-1', 'A-0', 'B-2', 'B-1']);
    const [row] = await testDb().select().from(plants).where(eq(plants.id, p3.id));
    expect(row).toMatchObject({ roundPosition: 0, version: 1 });

    const shorter = await w.grower.put(w.at('/rounds/order'), { plantIds: [p2.id] });
    expect(order(shorter.body)).toEqual(['B-1', 'B-2', 'W-1', 'A-0']);
    const [unplaced] = await testDb().select().from(plants).where(eq(plants.id, p3.id));
    expect(unplaced.roundPosition).toBeNull();
    expect(order((await w.viewer.get(w.at('/rounds'))).body)).toEqual(['B-1', 'B-2', 'W-1', 'A-0']);
  });

  it("refuses another collection's plant, an unknown id or a plant listed twice; the saved order stands", async () => {
    const { w, p1, p2 } = await roundsWorld();
    await w.grower.put(w.at('/rounds/order'), { plantIds: [p2.id, p1.id] });
    const foreign = await insertPlant(testDb(), w.otherCollectionId);
    const before = await rowCounts();
    const saved = await testDb().select({ id: plants.id, pos: plants.roundPosition }).from(plants).where(eq(plants.collectionId, w.collectionId));
    expectRefused(await w.grower.put(w.at('/rounds/order'), { plantIds: [p1.id, foreign.id] }), 400, 'plantIds.1', /Not a plant of this collection/);
    expectRefused(await w.grower.put(w.at('/rounds/order'), { plantIds: [p1.id, p2.id, p1.id] }), 400, 'plantIds.2', /twice/);
    expectRefused(await w.grower.put(w.at('/rounds/order'), { plantIds: ['nope'] }), 400, 'plantIds.0', /valid id/);
    expectRefused(await w.viewer.put(w.at('/rounds/order'), { plantIds: [] }), 403);
    expect(await rowCounts()).toEqual(before);
    const after = await testDb().select({ id: plants.id, pos: plants.roundPosition }).from(plants).where(eq(plants.collectionId, w.collectionId));
    expect(after).toEqual(expect.arrayContaining(saved));
    const [theirs] = await testDb().select().from(plants).where(eq(plants.id, foreign.id));
    expect(theirs.roundPosition).toBeNull();
  });
});
