import { eq } from 'drizzle-orm';
import { drizzle } from 'drizzle-orm/postgres-js';
import postgres from 'postgres';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { staleBodySchema } from '@/shared/schemas/common';
import { plantSchema } from '@/shared/schemas/records';
import * as schema from '../../db/schema';
import { plants } from '../../db/schema';
import { buildPlantInput, daysAgo, daysAhead, insertArea, insertCare, insertLead, insertMeasurement, insertPlant } from '../factories/records';
import { rowCounts, testDatabaseUrl, testDb } from './support/database';
import { collectionWorld, expectRefused } from './support/records';
import { startTestServer, type TestServer } from './support/server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

describe('creating a plant', () => {
  it('stores it and returns it with version 1; the clonal name is kept without its quotes', async () => {
    const w = await collectionWorld(server);
    const area = await insertArea(testDb(), w.collectionId, { name: 'South bench' });
    const res = await w.grower.post(w.at('/plants'), buildPlantInput({ tag: 'RLC-1', clonalName: "'Dune'", areaId: area.id }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ tag: 'RLC-1', genus: 'Rlc.', clonalName: 'Dune', areaId: area.id, version: 1, parentPlantId: null });
    const detail = await w.viewer.get(w.at(`/plants/${res.body.id}`));
    expect(detail.status).toBe(200);
    expect(detail.body).toMatchObject({ tag: 'RLC-1', areaName: 'South bench', leads: [], care: [] });
    expect(detail.body.lineage).toEqual({ parent: null, siblings: [], children: [] });
  });

  it.each([
    ['an empty tag', { tag: '' }, 'tag', /tag/i],
    ['a genus that is not an abbreviation', { genus: 'cattleya!' }, 'genus', /abbreviation/],
    ['a missing epithet', { epithet: undefined }, 'epithet', /grex or species/],
    ['a malformed date', { acquiredOn: '2026-02-30' }, 'acquiredOn', /YYYY-MM-DD/],
    ['an acquisition date in the future', { acquiredOn: daysAhead(3) }, 'acquiredOn', /future/],
  ])('refuses %s with 400 naming the field, writing nothing', async (_what, override, field, reason) => {
    const w = await collectionWorld(server);
    const before = await rowCounts();
    const res = await w.grower.post(w.at('/plants'), buildPlantInput(override));
    expectRefused(res, 400, field, reason);
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses an area of another collection (400 areaId) and a duplicate tag (409 naming it)', async () => {
    const w = await collectionWorld(server);
    const foreignArea = await insertArea(testDb(), w.otherCollectionId);
    await insertPlant(testDb(), w.collectionId, { tag: 'C-7' });
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at('/plants'), buildPlantInput({ areaId: foreignArea.id })), 400, 'areaId', /No such area/);
    const dup = await w.grower.post(w.at('/plants'), buildPlantInput({ tag: 'C-7' }));
    expectRefused(dup, 409, 'tag', /C-7/);
    expect(dup.body.error.message).toContain('"C-7"');
    expect(await rowCounts()).toEqual(before);
  });

  it('the same tag is fine in another collection', async () => {
    const w = await collectionWorld(server);
    await insertPlant(testDb(), w.otherCollectionId, { tag: 'SHARED-1' });
    expect((await w.grower.post(w.at('/plants'), buildPlantInput({ tag: 'SHARED-1' }))).status).toBe(201);
  });
});

describe('the plant list', () => {
  async function listWorld() {
    const w = await collectionWorld(server);
    const db = testDb();
    const bench = await insertArea(db, w.collectionId, { name: 'Bench' });
    const wall = await insertArea(db, w.collectionId, { name: 'Mount wall' });
    const a = await insertPlant(db, w.collectionId, { tag: 'A_1', genus: 'Den.', epithet: 'Silver Rain', areaId: bench.id, acquiredOn: '2020-05-01' });
    const b = await insertPlant(db, w.collectionId, { tag: 'AB1', genus: 'C.', epithet: 'Amber Reach', clonalName: 'Tide', areaId: wall.id, acquiredOn: '2023-01-10' });
    const c = await insertPlant(db, w.collectionId, { tag: '100%', genus: 'Stan.', epithet: 'tigrina', isSpecies: true, acquiredOn: null });
    await insertPlant(db, w.otherCollectionId, { tag: 'A_2', genus: 'Den.', epithet: 'Silver Rain' });
    return { w, bench, wall, a, b, c };
  }

  const tags = (body: { items: Array<{ tag: string }> }) => body.items.map((p) => p.tag);

  it('pages through the collection only, with the total', async () => {
    const { w } = await listWorld();
    const first = await w.viewer.get(w.at('/plants?pageSize=2'));
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ page: 1, pageSize: 2, total: 3 });
    // Tags sort by character code, ignoring case ("a_1" < "ab1").
    expect(tags(first.body)).toEqual(['100%', 'A_1']);
    const second = await w.viewer.get(w.at('/plants?pageSize=2&page=2'));
    expect(tags(second.body)).toEqual(['AB1']);
  });

  it.each([
    ['tag', 'ab1', ['AB1']],
    ['an underscore, literally', '_', ['A_1']],
    ['a percent sign, literally', '%', ['100%']],
    ['genus', 'den', ['A_1']],
    ['epithet', 'amber', ['AB1']],
    ['clonal name', 'tide', ['AB1']],
    ['the name as shown', "C. Amber Reach 'Tide'", ['AB1']],
  ])('searches by %s', async (_what, q, expected) => {
    const { w } = await listWorld();
    const res = await w.viewer.get(w.at(`/plants?q=${encodeURIComponent(q)}`));
    expect(res.status).toBe(200);
    expect(tags(res.body)).toEqual(expected);
    expect(res.body.total).toBe(expected.length);
  });

  it('filters by genus (the dot optional), area and lead status', async () => {
    const { w, wall, a, b } = await listWorld();
    await insertLead(testDb(), a, { status: 'dried_off' });
    await insertLead(testDb(), b, { status: 'growing' });
    const den = await w.viewer.get(w.at('/plants?genus=Den'));
    expect(den.status, JSON.stringify(den.body)).toBe(200);
    expect(tags(den.body)).toEqual(['A_1']);
    expect(tags((await w.viewer.get(w.at('/plants?genus=Stan.'))).body)).toEqual(['100%']);
    expect(tags((await w.viewer.get(w.at(`/plants?areaId=${wall.id}`))).body)).toEqual(['AB1']);
    const st = await w.viewer.get(w.at('/plants?leadStatus=dried_off'));
    expect(st.status, JSON.stringify(st.body)).toBe(200);
    expect(tags(st.body)).toEqual(['A_1']);
  });

  it('sorts by name, acquisition date (undated last) and tag, either way', async () => {
    const { w } = await listWorld();
    expect(tags((await w.viewer.get(w.at('/plants?sort=name'))).body)).toEqual(['AB1', 'A_1', '100%']);
    expect(tags((await w.viewer.get(w.at('/plants?sort=acquired'))).body)).toEqual(['A_1', 'AB1', '100%']);
    expect(tags((await w.viewer.get(w.at('/plants?sort=acquired&order=desc'))).body)).toEqual(['AB1', 'A_1', '100%']);
    expect(tags((await w.viewer.get(w.at('/plants?order=desc'))).body)).toEqual(['AB1', 'A_1', '100%']);
  });

  it('refuses bad query values naming them', async () => {
    const { w } = await listWorld();
    expectRefused(await w.viewer.get(w.at('/plants?pageSize=101')), 400, 'query.pageSize');
    expectRefused(await w.viewer.get(w.at('/plants?sort=colour')), 400, 'query.sort');
    expectRefused(await w.viewer.get(w.at('/plants?leadStatus=sleeping')), 400, 'query.leadStatus', /Status is one of/);
    expectRefused(await w.viewer.get(w.at('/plants?areaId=nope')), 400, 'query.areaId');
  });

  it("shows each plant's area and the leads of its latest season with their latest measurement", async () => {
    const { w, a } = await listWorld();
    const db = testDb();
    const old = await insertLead(db, a, { season: 2025, label: '2025-A', firstSeen: '2025-04-01' });
    await insertMeasurement(db, old, { measuredOn: '2025-09-01', heightMm: 80 });
    const lead = await insertLead(db, a, { season: 2026, label: '2026-A', firstSeen: daysAgo(60) });
    await insertMeasurement(db, lead, { measuredOn: daysAgo(30), heightMm: 20 });
    await insertMeasurement(db, lead, { measuredOn: daysAgo(5), heightMm: 35, sheath: 'forming' });
    const res = await w.viewer.get(w.at('/plants?q=A_1'));
    const [item] = res.body.items;
    expect(item.areaName).toBe('Bench');
    expect(item.currentLeads.map((l: { label: string }) => l.label)).toEqual(['2026-A']);
    expect(item.currentLeads[0].latest).toMatchObject({ date: daysAgo(5), heightMm: 35, sheath: 'forming' });
  });

  it('costs the same number of queries for 2 plants as for 30 (no query per plant)', async () => {
    const client = postgres(testDatabaseUrl(), { max: 2, onnotice: () => {} });
    let queries = 0;
    const counted = drizzle(client, { schema, logger: { logQuery: () => void (queries += 1) } });
    const countingServer = await startTestServer({ db: counted });
    try {
      const w = await collectionWorld(countingServer);
      const db = testDb();
      const seed = async (n: number) => {
        for (let i = 0; i < n; i += 1) {
          const plant = await insertPlant(db, w.collectionId);
          const lead = await insertLead(db, plant);
          await insertMeasurement(db, lead);
        }
      };
      const count = async () => {
        queries = 0;
        const res = await w.viewer.get(w.at('/plants?pageSize=100'));
        expect(res.status).toBe(200);
        return queries;
      };
      await seed(2);
      const few = await count();
      await seed(28);
      expect(await count()).toBe(few);
      expect(few).toBeLessThanOrEqual(6);
    } finally {
      await countingServer.close();
      await client.end();
    }
  });
});

describe('the plant page', () => {
  it('shows leads newest season first, the lineage and care newest first', async () => {
    const w = await collectionWorld(server);
    const db = testDb();
    const grand = await insertPlant(db, w.collectionId, { tag: 'G' });
    const parent = await insertPlant(db, w.collectionId, { tag: 'P', parentPlantId: grand.id, dividedOn: '2024-03-01' });
    const self = await insertPlant(db, w.collectionId, { tag: 'S', parentPlantId: parent.id, dividedOn: '2025-03-01' });
    await insertPlant(db, w.collectionId, { tag: 'S2', parentPlantId: parent.id, dividedOn: '2025-03-01' });
    await insertPlant(db, w.collectionId, { tag: 'K', parentPlantId: self.id, dividedOn: '2026-03-01' });
    await insertPlant(db, w.collectionId, { tag: 'Cousin', parentPlantId: grand.id, dividedOn: '2024-03-01' });
    const l25 = await insertLead(db, self, { season: 2025, label: '2025-A', firstSeen: '2025-04-01' });
    await insertMeasurement(db, l25, { measuredOn: '2025-05-01', heightMm: 10 });
    await insertMeasurement(db, l25, { measuredOn: '2025-08-01', heightMm: 70 });
    await insertLead(db, self, { season: 2026, label: '2026-A', firstSeen: daysAgo(40) });
    await insertCare(db, w.collectionId, { plantId: self.id, occurredOn: '2025-06-01', kind: 'water' });
    await insertCare(db, w.collectionId, { plantId: self.id, occurredOn: '2025-07-01', kind: 'feed', withCalcium: true });

    const res = await w.viewer.get(w.at(`/plants/${self.id}`));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.leads.map((l: { label: string }) => l.label)).toEqual(['2026-A', '2025-A']);
    expect(res.body.leads[0].latest).toBeNull();
    expect(res.body.leads[1].latest).toMatchObject({ date: '2025-08-01', heightMm: 70 });
    expect(res.body.lineage.parent).toMatchObject({ tag: 'P', dividedOn: '2024-03-01' });
    expect(res.body.lineage.siblings.map((p: { tag: string }) => p.tag)).toEqual(['S2']);
    expect(res.body.lineage.children.map((p: { tag: string }) => p.tag)).toEqual(['K']);
    expect(res.body.care.map((c: { kind: string }) => c.kind)).toEqual(['feed', 'water']);
  });

  it('answers 404 for a plant of another collection and for a malformed id', async () => {
    const w = await collectionWorld(server);
    const foreign = await insertPlant(testDb(), w.otherCollectionId);
    expectRefused(await w.owner.get(w.at(`/plants/${foreign.id}`)), 404);
    expectRefused(await w.owner.get(w.at('/plants/not-a-uuid')), 404);
  });
});

describe('editing a plant', () => {
  it('a save increments the version and changes only the fields sent', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId, { isSpecies: true, epithet: 'walkeriana', clonalName: 'Pale' });
    const res = await w.grower.patch(w.at(`/plants/${plant.id}`), { version: 1, medium: 'mount' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ version: 2, medium: 'mount', isSpecies: true, clonalName: 'Pale' });
    const [row] = await testDb().select().from(plants).where(eq(plants.id, plant.id));
    expect(row.updatedAt.getTime()).toBeGreaterThan(plant.updatedAt.getTime());
    const cleared = await w.grower.patch(w.at(`/plants/${plant.id}`), { version: 2, clonalName: null });
    expect(cleared.body).toMatchObject({ version: 3, clonalName: null });
  });

  it('a stale save gets 409 with the record as it now stands, and writes nothing', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId, { medium: 'bark' });
    expect((await w.owner.patch(w.at(`/plants/${plant.id}`), { version: 1, medium: 'LECA' })).status).toBe(200);
    const before = await rowCounts();
    const stale = await w.grower.patch(w.at(`/plants/${plant.id}`), { version: 1, medium: 'sphagnum' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale');
    expect(stale.body.current).toMatchObject({ id: plant.id, medium: 'LECA', version: 2 });
    expect(() => staleBodySchema(plantSchema).parse(stale.body)).not.toThrow();
    const [row] = await testDb().select().from(plants).where(eq(plants.id, plant.id));
    expect(row).toMatchObject({ medium: 'LECA', version: 2 });
    expect(await rowCounts()).toEqual(before);
  });

  it('two saves of the same copy racing each other: one lands, the other gets 409', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId, { medium: 'bark' });
    const [a, b] = await Promise.all([
      w.grower.patch(w.at(`/plants/${plant.id}`), { version: 1, medium: 'LECA' }),
      w.owner.patch(w.at(`/plants/${plant.id}`), { version: 1, medium: 'sphagnum' }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const winner = a.status === 200 ? a : b;
    const [row] = await testDb().select().from(plants).where(eq(plants.id, plant.id));
    expect(row).toMatchObject({ medium: winner.body.medium, version: 2 });
  });

  it('refuses a duplicate tag, a missing version, an empty change and a future date; nothing is written', async () => {
    const w = await collectionWorld(server);
    await insertPlant(testDb(), w.collectionId, { tag: 'TAKEN' });
    const plant = await insertPlant(testDb(), w.collectionId, { tag: 'MINE' });
    const before = await rowCounts();
    expectRefused(await w.grower.patch(w.at(`/plants/${plant.id}`), { version: 1, tag: 'TAKEN' }), 409, 'tag', /TAKEN/);
    expectRefused(await w.grower.patch(w.at(`/plants/${plant.id}`), { tag: 'NEW' }), 400, 'version', /version/);
    expectRefused(await w.grower.patch(w.at(`/plants/${plant.id}`), { version: 1 }), 400, 'body', /at least one field/);
    expectRefused(await w.grower.patch(w.at(`/plants/${plant.id}`), { version: 1, acquiredOn: daysAhead(5) }), 400, 'acquiredOn', /future/);
    const [row] = await testDb().select().from(plants).where(eq(plants.id, plant.id));
    expect(row).toMatchObject({ tag: 'MINE', version: 1 });
    expect(await rowCounts()).toEqual(before);
  });

  it('cannot reach a plant of another collection (404), and writes nothing there', async () => {
    const w = await collectionWorld(server);
    const foreign = await insertPlant(testDb(), w.otherCollectionId, { medium: 'bark' });
    const before = await rowCounts();
    expectRefused(await w.owner.patch(w.at(`/plants/${foreign.id}`), { version: 1, medium: 'LECA' }), 404);
    expectRefused(await w.owner.delete(w.at(`/plants/${foreign.id}`)), 404);
    expect(await rowCounts()).toEqual(before);
  });
});

describe('deleting a plant', () => {
  it('is an owner action that removes its leads, measurements and care', async () => {
    const w = await collectionWorld(server);
    const db = testDb();
    const plant = await insertPlant(db, w.collectionId);
    const lead = await insertLead(db, plant);
    await insertMeasurement(db, lead);
    await insertCare(db, w.collectionId, { plantId: plant.id });
    const before = await rowCounts();
    expectRefused(await w.grower.delete(w.at(`/plants/${plant.id}`)), 403);
    expect(await rowCounts()).toEqual(before);
    expect((await w.owner.delete(w.at(`/plants/${plant.id}`))).status).toBe(204);
    const after = await rowCounts();
    expect(after.plants).toBe(before.plants - 1);
    expect(after.leads).toBe(before.leads - 1);
    expect(after.measurements).toBe(before.measurements - 1);
    expect(after.care_entries).toBe(before.care_entries - 1);
    expectRefused(await w.owner.delete(w.at(`/plants/${plant.id}`)), 404);
  });
});
