import { eq, inArray } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { leads, measurements } from '../../db/schema';
import { daysAgo, daysAhead, insertArea, insertLead, insertMeasurement, insertPlant } from '../factories/records';
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

async function divisionWorld() {
  const w = await collectionWorld(server);
  const db = testDb();
  const bench = await insertArea(db, w.collectionId, { name: 'Bench' });
  const shelf = await insertArea(db, w.collectionId, { name: 'Shade shelf' });
  const parent = await insertPlant(db, w.collectionId, {
    tag: 'LC-9',
    genus: 'Lc.',
    epithet: 'Copper Fern',
    clonalName: 'Ember',
    source: 'Grown from a flask',
    areaId: bench.id,
    medium: 'bark',
  });
  const leadA = await insertLead(db, parent, { label: '2026-A' });
  const leadB = await insertLead(db, parent, { label: '2026-B' });
  const leadC = await insertLead(db, parent, { label: '2026-C' });
  await insertMeasurement(db, leadA, { heightMm: 44 });
  return { w, bench, shelf, parent, leadA, leadB, leadC };
}

describe('dividing a plant', () => {
  it('makes one plant per piece, moves the chosen leads with their history, and shows the lineage', async () => {
    const { w, shelf, parent, leadA, leadB, leadC } = await divisionWorld();
    const res = await w.grower.post(w.at(`/plants/${parent.id}/divide`), {
      dividedOn: daysAgo(1),
      pieces: [
        { tag: 'LC-9a', leadIds: [leadA.id, leadB.id], bulbCount: 4, areaId: shelf.id, medium: 'sphagnum' },
        { tag: 'LC-9b', leadIds: [leadC.id], bulbCount: 2 },
        { tag: 'LC-9c', bulbCount: 3 },
      ],
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const [a, b, c] = res.body.plants;
    for (const piece of [a, b, c]) {
      expect(piece).toMatchObject({
        genus: 'Lc.',
        epithet: 'Copper Fern',
        isSpecies: false,
        clonalName: 'Ember',
        source: 'Grown from a flask',
        parentPlantId: parent.id,
        dividedOn: daysAgo(1),
        version: 1,
      });
    }
    expect(a).toMatchObject({ tag: 'LC-9a', areaId: shelf.id, medium: 'sphagnum' });
    expect(b).toMatchObject({ tag: 'LC-9b', areaId: parent.areaId, medium: 'bark' });

    // Common practice is warned about, not refused: a small piece, and a piece with no lead.
    expect(res.body.warnings).toEqual([
      { piece: 1, message: expect.stringMatching(/2 bulbs.*at least 3/) },
      { piece: 2, message: expect.stringMatching(/no lead/) },
    ]);

    const moved = await testDb().select().from(leads).where(inArray(leads.id, [leadA.id, leadB.id, leadC.id]));
    expect(Object.fromEntries(moved.map((l) => [l.label, l.plantId]))).toEqual({ '2026-A': a.id, '2026-B': a.id, '2026-C': b.id });
    const [history] = await testDb().select().from(measurements).where(eq(measurements.leadId, leadA.id));
    expect(history.heightMm).toBe(44);

    const parentPage = await w.viewer.get(w.at(`/plants/${parent.id}`));
    expect(parentPage.body.leads).toEqual([]);
    expect(parentPage.body.lineage.children.map((p: { tag: string }) => p.tag)).toEqual(['LC-9a', 'LC-9b', 'LC-9c']);
    const piecePage = await w.viewer.get(w.at(`/plants/${a.id}`));
    expect(piecePage.body.lineage.parent).toMatchObject({ id: parent.id, tag: 'LC-9' });
    expect(piecePage.body.lineage.siblings.map((p: { tag: string }) => p.tag)).toEqual(['LC-9b', 'LC-9c']);
    expect(piecePage.body.leads.map((l: { label: string }) => l.label)).toEqual(['2026-A', '2026-B']);
    expect(piecePage.body.leads[0].latest).toMatchObject({ heightMm: 44 });
  });

  it('is one transaction: a duplicate tag in the second piece leaves no new plant and no lead moved', async () => {
    const { w, parent, leadA, leadB } = await divisionWorld();
    await insertPlant(testDb(), w.collectionId, { tag: 'TAKEN-1' });
    const before = await rowCounts();
    const res = await w.grower.post(w.at(`/plants/${parent.id}/divide`), {
      dividedOn: daysAgo(1),
      pieces: [
        { tag: 'FRESH-1', leadIds: [leadA.id], bulbCount: 4 },
        { tag: 'TAKEN-1', leadIds: [leadB.id], bulbCount: 4 },
      ],
    });
    expectRefused(res, 409, 'pieces.1.tag', /TAKEN-1/);
    expect(await rowCounts()).toEqual(before);
    const still = await testDb().select().from(leads).where(inArray(leads.id, [leadA.id, leadB.id]));
    expect(still.map((l) => [l.plantId, l.version])).toEqual([
      [parent.id, 1],
      [parent.id, 1],
    ]);
    const page = await w.viewer.get(w.at('/plants?q=FRESH-1'));
    expect(page.body.total).toBe(0);
  });

  it('two divisions racing for the same lead: one moves it, the other is refused', async () => {
    const { w, parent, leadA } = await divisionWorld();
    const divide = (tag: string) =>
      w.grower.post(w.at(`/plants/${parent.id}/divide`), { dividedOn: daysAgo(1), pieces: [{ tag, leadIds: [leadA.id] }] });
    const results = await Promise.all([divide('RACE-1'), divide('RACE-2')]);
    expect(results.map((r) => r.status).sort()).toEqual([201, 400]);
    const winner = results.find((r) => r.status === 201)!;
    const [row] = await testDb().select().from(leads).where(eq(leads.id, leadA.id));
    expect(row.plantId).toBe(winner.body.plants[0].id);
    expect((await w.viewer.get(w.at('/plants?q=RACE-'))).body.total).toBe(1);
  });

  it('refuses two pieces with the same tag (409) and writes nothing', async () => {
    const { w, parent } = await divisionWorld();
    const before = await rowCounts();
    const res = await w.grower.post(w.at(`/plants/${parent.id}/divide`), {
      dividedOn: daysAgo(1),
      pieces: [{ tag: 'TWIN' }, { tag: 'TWIN' }],
    });
    expectRefused(res, 409, 'pieces.1.tag', /TWIN/);
    expect(await rowCounts()).toEqual(before);
  });

  it("refuses a lead of another collection's plant, naming the piece, and writes nothing", async () => {
    const { w, parent, leadA } = await divisionWorld();
    const foreignPlant = await insertPlant(testDb(), w.otherCollectionId);
    const foreignLead = await insertLead(testDb(), foreignPlant);
    const before = await rowCounts();
    const res = await w.grower.post(w.at(`/plants/${parent.id}/divide`), {
      dividedOn: daysAgo(1),
      pieces: [
        { tag: 'OK-1', leadIds: [leadA.id] },
        { tag: 'OK-2', leadIds: [foreignLead.id] },
      ],
    });
    expectRefused(res, 400, 'pieces.1.leadIds', /not a lead of the plant being divided/);
    expect(await rowCounts()).toEqual(before);
    const [row] = await testDb().select().from(leads).where(eq(leads.id, foreignLead.id));
    expect(row.plantId).toBe(foreignPlant.id);
  });

  it('refuses a lead of another plant of the same collection, and one lead given to two pieces', async () => {
    const { w, parent, leadA } = await divisionWorld();
    const neighbour = await insertPlant(testDb(), w.collectionId);
    const neighbourLead = await insertLead(testDb(), neighbour);
    const before = await rowCounts();
    const other = await w.grower.post(w.at(`/plants/${parent.id}/divide`), {
      dividedOn: daysAgo(1),
      pieces: [{ tag: 'N-1', leadIds: [neighbourLead.id] }],
    });
    expectRefused(other, 400, 'pieces.0.leadIds', /not a lead of the plant being divided/);
    const twice = await w.grower.post(w.at(`/plants/${parent.id}/divide`), {
      dividedOn: daysAgo(1),
      pieces: [
        { tag: 'N-2', leadIds: [leadA.id] },
        { tag: 'N-3', leadIds: [leadA.id] },
      ],
    });
    expectRefused(twice, 400, 'pieces.1.leadIds', /one piece only/);
    expect(await rowCounts()).toEqual(before);
  });

  it.each([
    ['a division date in the future', { dividedOn: daysAhead(4), pieces: [{ tag: 'F-1' }] }, 'dividedOn', /future/],
    ['no pieces', { dividedOn: daysAgo(1), pieces: [] }, 'pieces', /at least one piece/],
    ['a piece of no bulbs', { dividedOn: daysAgo(1), pieces: [{ tag: 'Z-1', bulbCount: 0 }] }, 'pieces.0.bulbCount', /at least one bulb/],
    ['a malformed lead id', { dividedOn: daysAgo(1), pieces: [{ tag: 'Z-2', leadIds: ['abc'] }] }, 'pieces.0.leadIds.0', /valid id/],
  ])('refuses %s with 400, writing nothing', async (_what, body, field, reason) => {
    const { w, parent } = await divisionWorld();
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/plants/${parent.id}/divide`), body), 400, field, reason);
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses an area of another collection for a piece', async () => {
    const { w, parent } = await divisionWorld();
    const foreignArea = await insertArea(testDb(), w.otherCollectionId);
    const before = await rowCounts();
    const res = await w.grower.post(w.at(`/plants/${parent.id}/divide`), {
      dividedOn: daysAgo(1),
      pieces: [{ tag: 'A-1', areaId: foreignArea.id }],
    });
    expectRefused(res, 400, 'pieces.0.areaId', /No such area/);
    expect(await rowCounts()).toEqual(before);
  });

  it('cannot divide a plant of another collection (404), and a viewer cannot divide (403)', async () => {
    const { w, parent } = await divisionWorld();
    const foreign = await insertPlant(testDb(), w.otherCollectionId);
    const before = await rowCounts();
    const body = { dividedOn: daysAgo(1), pieces: [{ tag: 'X-1' }] };
    expectRefused(await w.grower.post(w.at(`/plants/${foreign.id}/divide`), body), 404);
    expectRefused(await w.viewer.post(w.at(`/plants/${parent.id}/divide`), body), 403);
    expect(await rowCounts()).toEqual(before);
  });
});
