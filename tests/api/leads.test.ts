import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { leads } from '../../db/schema';
import { buildBloomInput, buildLeadInput, daysAgo, daysAhead, insertLead, insertMeasurement, insertPlant } from '../factories/records';
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

async function leadWorld() {
  const w = await collectionWorld(server);
  const plant = await insertPlant(testDb(), w.collectionId, { tag: 'DEN-3', genus: 'Den.', epithet: 'Night Ferry' });
  return { w, plant };
}

describe('adding a lead', () => {
  it('stores it on the plant; the lead page shows the plant, measurements oldest first and no bloom yet', async () => {
    const { w, plant } = await leadWorld();
    const res = await w.grower.post(w.at(`/plants/${plant.id}/leads`), buildLeadInput({ label: '2026-A', firstSeen: daysAgo(50) }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ plantId: plant.id, label: '2026-A', season: 2026, status: 'growing', fromBackBulb: false, version: 1 });
    const lead = { id: res.body.id as string, collectionId: w.collectionId };
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(10), heightMm: 30 });
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(40), heightMm: 5 });
    const page = await w.viewer.get(w.at(`/leads/${lead.id}`));
    expect(page.status).toBe(200);
    expect(page.body.plant).toMatchObject({ id: plant.id, tag: 'DEN-3', genus: 'Den.' });
    expect(page.body.measurements.map((m: { heightMm: number }) => m.heightMm)).toEqual([5, 30]);
    expect(page.body.bloom).toBeNull();
  });

  it('accepts a parent lead of the same plant', async () => {
    const { w, plant } = await leadWorld();
    const older = await insertLead(testDb(), plant, { season: 2025, label: '2025-A', firstSeen: '2025-04-01' });
    const res = await w.grower.post(w.at(`/plants/${plant.id}/leads`), buildLeadInput({ parentLeadId: older.id }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.parentLeadId).toBe(older.id);
  });

  it.each([
    ['a season that is not a year', { season: 1800 }, 'season', /year/],
    ['an unknown status', { status: 'sleeping' }, 'status', /Status is one of/],
    ['a first-seen date in the future', { firstSeen: daysAhead(3) }, 'firstSeen', /future/],
    ['an empty label', { label: '  ' }, 'label', /label/],
  ])('refuses %s with 400 naming the field, writing nothing', async (_what, override, field, reason) => {
    const { w, plant } = await leadWorld();
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/plants/${plant.id}/leads`), buildLeadInput(override)), 400, field, reason);
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses a duplicate label (409) and a parent lead of another plant or collection (400); nothing is written', async () => {
    const { w, plant } = await leadWorld();
    await insertLead(testDb(), plant, { label: '2026-A' });
    const neighbour = await insertPlant(testDb(), w.collectionId);
    const neighbourLead = await insertLead(testDb(), neighbour);
    const foreignLead = await insertLead(testDb(), await insertPlant(testDb(), w.otherCollectionId));
    const before = await rowCounts();
    const dup = await w.grower.post(w.at(`/plants/${plant.id}/leads`), buildLeadInput({ label: '2026-A' }));
    expectRefused(dup, 409, 'label', /2026-A/);
    for (const parentLeadId of [neighbourLead.id, foreignLead.id]) {
      const res = await w.grower.post(w.at(`/plants/${plant.id}/leads`), buildLeadInput({ parentLeadId }));
      expectRefused(res, 400, 'parentLeadId', /another lead of this plant/);
    }
    expect(await rowCounts()).toEqual(before);
  });

  it('the same label is fine on another plant', async () => {
    const { w, plant } = await leadWorld();
    await insertLead(testDb(), plant, { label: '2026-A' });
    const other = await insertPlant(testDb(), w.collectionId);
    expect((await w.grower.post(w.at(`/plants/${other.id}/leads`), buildLeadInput({ label: '2026-A' }))).status).toBe(201);
  });

  it('cannot add a lead to a plant of another collection (404), nor can a viewer (403)', async () => {
    const { w, plant } = await leadWorld();
    const foreign = await insertPlant(testDb(), w.otherCollectionId);
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/plants/${foreign.id}/leads`), buildLeadInput()), 404);
    expectRefused(await w.viewer.post(w.at(`/plants/${plant.id}/leads`), buildLeadInput()), 403);
    expect(await rowCounts()).toEqual(before);
  });
});

describe('editing a lead', () => {
  it('marks it dried off, incrementing the version; fields not sent are kept', async () => {
    const { w, plant } = await leadWorld();
    const lead = await insertLead(testDb(), plant, { fromBackBulb: true, status: 'mature' });
    const res = await w.grower.patch(w.at(`/leads/${lead.id}`), { version: 1, status: 'dried_off' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ status: 'dried_off', fromBackBulb: true, version: 2 });
  });

  it('a stale save gets 409 with the current lead and writes nothing', async () => {
    const { w, plant } = await leadWorld();
    const lead = await insertLead(testDb(), plant);
    await w.owner.patch(w.at(`/leads/${lead.id}`), { version: 1, status: 'mature' });
    const before = await rowCounts();
    const stale = await w.grower.patch(w.at(`/leads/${lead.id}`), { version: 1, status: 'rotted' });
    expect(stale.status).toBe(409);
    expect(stale.body).toMatchObject({ error: { code: 'stale' }, current: { id: lead.id, status: 'mature', version: 2 } });
    const [row] = await testDb().select().from(leads).where(eq(leads.id, lead.id));
    expect(row).toMatchObject({ status: 'mature', version: 2 });
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses a duplicate label, a first-seen date after its measurements, a cycle of parents and itself as parent', async () => {
    const { w, plant } = await leadWorld();
    const db = testDb();
    await insertLead(db, plant, { label: 'TAKEN' });
    const grandparent = await insertLead(db, plant, { label: 'G', firstSeen: daysAgo(300) });
    const parent = await insertLead(db, plant, { label: 'P', parentLeadId: grandparent.id, firstSeen: daysAgo(200) });
    const child = await insertLead(db, plant, { label: 'C', parentLeadId: parent.id, firstSeen: daysAgo(100) });
    await insertMeasurement(db, child, { measuredOn: daysAgo(60) });
    const before = await rowCounts();
    expectRefused(await w.grower.patch(w.at(`/leads/${child.id}`), { version: 1, label: 'TAKEN' }), 409, 'label', /TAKEN/);
    expectRefused(await w.grower.patch(w.at(`/leads/${child.id}`), { version: 1, firstSeen: daysAgo(30) }), 400, 'firstSeen', new RegExp(daysAgo(60)));
    expectRefused(await w.grower.patch(w.at(`/leads/${child.id}`), { version: 1, firstSeen: daysAhead(5) }), 400, 'firstSeen', /future/);
    expectRefused(await w.grower.patch(w.at(`/leads/${grandparent.id}`), { version: 1, parentLeadId: child.id }), 400, 'parentLeadId', /cycle/);
    expectRefused(await w.grower.patch(w.at(`/leads/${child.id}`), { version: 1, parentLeadId: child.id }), 400, 'parentLeadId', /own parent/);
    expect(await rowCounts()).toEqual(before);
    const rows = await db.select().from(leads).where(eq(leads.plantId, plant.id));
    expect(rows.every((l) => l.version === 1)).toBe(true);
  });

  it('a lead of another collection cannot be read, edited or deleted (404)', async () => {
    const { w } = await leadWorld();
    const foreign = await insertLead(testDb(), await insertPlant(testDb(), w.otherCollectionId));
    const before = await rowCounts();
    expectRefused(await w.owner.get(w.at(`/leads/${foreign.id}`)), 404);
    expectRefused(await w.owner.patch(w.at(`/leads/${foreign.id}`), { version: 1, status: 'rotted' }), 404);
    expectRefused(await w.owner.delete(w.at(`/leads/${foreign.id}`)), 404);
    expectRefused(await w.owner.get(w.at('/leads/12345')), 404);
    expect(await rowCounts()).toEqual(before);
  });
});

describe('deleting a lead', () => {
  it('is an owner action that takes its measurements along', async () => {
    const { w, plant } = await leadWorld();
    const lead = await insertLead(testDb(), plant);
    await insertMeasurement(testDb(), lead);
    const before = await rowCounts();
    expectRefused(await w.grower.delete(w.at(`/leads/${lead.id}`)), 403);
    expect((await w.owner.delete(w.at(`/leads/${lead.id}`))).status).toBe(204);
    const after = await rowCounts();
    expect([after.leads, after.measurements]).toEqual([before.leads - 1, before.measurements - 1]);
  });
});

describe('the bloom record', () => {
  it('is created by the first save (201) and replaced by a save with its version (200)', async () => {
    const { w, plant } = await leadWorld();
    const lead = await insertLead(testDb(), plant, { firstSeen: daysAgo(200) });
    const created = await w.grower.put(w.at(`/leads/${lead.id}/bloom`), buildBloomInput({ flowerCount: 5 }));
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    expect(created.body).toMatchObject({ leadId: lead.id, flowerCount: 5, spikeCount: 1, version: 1 });
    const updated = await w.grower.put(w.at(`/leads/${lead.id}/bloom`), buildBloomInput({ flowerCount: 6, lastFadedOn: daysAgo(1), version: 1 }));
    expect(updated.status, JSON.stringify(updated.body)).toBe(200);
    expect(updated.body).toMatchObject({ flowerCount: 6, lastFadedOn: daysAgo(1), version: 2 });
    const page = await w.viewer.get(w.at(`/leads/${lead.id}`));
    expect(page.body.bloom).toMatchObject({ flowerCount: 6, version: 2 });
  });

  it('a stale save, or a create when one exists, gets 409 with the current record and writes nothing', async () => {
    const { w, plant } = await leadWorld();
    const lead = await insertLead(testDb(), plant, { firstSeen: daysAgo(200) });
    await w.grower.put(w.at(`/leads/${lead.id}/bloom`), buildBloomInput({ flowerCount: 5 }));
    await w.owner.put(w.at(`/leads/${lead.id}/bloom`), buildBloomInput({ flowerCount: 7, version: 1 }));
    const before = await rowCounts();
    const stale = await w.grower.put(w.at(`/leads/${lead.id}/bloom`), buildBloomInput({ flowerCount: 9, version: 1 }));
    expect(stale.status).toBe(409);
    expect(stale.body).toMatchObject({ error: { code: 'stale' }, current: { flowerCount: 7, version: 2 } });
    const blind = await w.grower.put(w.at(`/leads/${lead.id}/bloom`), buildBloomInput({ flowerCount: 9 }));
    expect(blind.status).toBe(409);
    expect(blind.body.current).toMatchObject({ flowerCount: 7, version: 2 });
    expect(await rowCounts()).toEqual(before);
    expect((await w.viewer.get(w.at(`/leads/${lead.id}`))).body.bloom.flowerCount).toBe(7);
  });

  it.each([
    ['a date in the future', { firstOpenOn: daysAhead(5), budsSeenOn: daysAgo(2) }, 'firstOpenOn', /future/],
    ['a date before the lead was first seen', { budsSeenOn: daysAgo(150), firstOpenOn: daysAgo(140) }, 'budsSeenOn', /before the lead was first seen/],
    ['flowers opening before the buds were seen', { budsSeenOn: daysAgo(10), firstOpenOn: daysAgo(20) }, 'firstOpenOn', /after the buds/],
    ['an implausible flower count', { flowerCount: 501 }, 'flowerCount', /not plausible/],
    ['a negative spike count', { spikeCount: -1 }, 'spikeCount', /negative/],
  ])('refuses %s with 400 naming the field, writing nothing', async (_what, override, field, reason) => {
    const { w, plant } = await leadWorld();
    const lead = await insertLead(testDb(), plant, { firstSeen: daysAgo(100) });
    const before = await rowCounts();
    expectRefused(await w.grower.put(w.at(`/leads/${lead.id}/bloom`), buildBloomInput(override)), 400, field, reason);
    expect(await rowCounts()).toEqual(before);
  });

  it("cannot be written on another collection's lead (404)", async () => {
    const { w } = await leadWorld();
    const foreign = await insertLead(testDb(), await insertPlant(testDb(), w.otherCollectionId));
    const before = await rowCounts();
    expectRefused(await w.grower.put(w.at(`/leads/${foreign.id}/bloom`), buildBloomInput()), 404);
    expect(await rowCounts()).toEqual(before);
  });
});
