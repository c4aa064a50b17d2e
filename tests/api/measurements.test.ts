import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { measurements } from '../../db/schema';
import { buildMeasurementInput, daysAgo, daysAhead, insertLead, insertMeasurement, insertPlant } from '../factories/records';
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

async function measureWorld() {
  const w = await collectionWorld(server);
  const plant = await insertPlant(testDb(), w.collectionId);
  const lead = await insertLead(testDb(), plant, { firstSeen: daysAgo(60) });
  return { w, plant, lead };
}

describe('recording a measurement', () => {
  it('stores it as the grower who made it; the lead page lists it', async () => {
    const { w, lead } = await measureWorld();
    const res = await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ heightMm: 37.5, bulbWidthMm: 12, note: 'new root at the front' }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ leadId: lead.id, date: daysAgo(10), heightMm: 37.5, leafCount: 2, sheath: 'none', rootTips: 3, bulbWidthMm: 12, createdBy: w.people.grower.id, version: 1 });
    const page = await w.viewer.get(w.at(`/leads/${lead.id}`));
    expect(page.body.measurements.map((m: { id: string }) => m.id)).toEqual([res.body.id]);
  });

  it('accepts the lead’s first-seen day and tomorrow (UTC), for growers east of UTC', async () => {
    const { w, lead } = await measureWorld();
    expect((await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ date: daysAgo(60) }))).status).toBe(201);
    expect((await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ date: daysAhead(1) }))).status).toBe(201);
  });

  it.each([
    ['a negative height', { heightMm: -1 }, 'heightMm', /cannot be negative/],
    ['a height of 1501 mm', { heightMm: 1501 }, 'heightMm', /above 1500 mm is not plausible/],
    ['no height', { heightMm: undefined }, 'heightMm', /height/],
    ['a leaf count of 31', { leafCount: 31 }, 'leafCount', /above 30 is not plausible/],
    ['a fractional leaf count', { leafCount: 2.5 }, 'leafCount', /whole number/],
    ['negative root tips', { rootTips: -2 }, 'rootTips', /cannot be negative/],
    ['an unknown sheath state', { sheath: 'open' }, 'sheath', /none, forming, empty, budded, dry/],
    ['a malformed date', { date: '12/05/2026' }, 'date', /YYYY-MM-DD/],
    ['a date in the future', { date: daysAhead(2) }, 'date', /future/],
    ['a date before the lead was first seen', { date: daysAgo(61) }, 'date', new RegExp(`before the lead was first seen \\(${daysAgo(60)}\\)`)],
    ['a client key that is not a uuid', { clientKey: 'abc' }, 'clientKey', /UUID/i],
  ])('refuses %s with 400 naming the field, writing nothing', async (_what, override, field, reason) => {
    const { w, lead } = await measureWorld();
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput(override)), 400, field, reason);
    expect(await rowCounts()).toEqual(before);
  });

  it("cannot be recorded on another collection's lead (404), nor by a viewer (403)", async () => {
    const { w, lead } = await measureWorld();
    const foreign = await insertLead(testDb(), await insertPlant(testDb(), w.otherCollectionId));
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/leads/${foreign.id}/measurements`), buildMeasurementInput()), 404);
    expectRefused(await w.viewer.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput()), 403);
    expect(await rowCounts()).toEqual(before);
  });
});

describe('a repeated entry (the same client key)', () => {
  it('is stored once: the repeat answers 200 with the stored entry and writes nothing', async () => {
    const { w, lead } = await measureWorld();
    const clientKey = randomUUID();
    const first = await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ clientKey, heightMm: 40 }));
    expect(first.status).toBe(201);
    const before = await rowCounts();
    const again = await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ clientKey, heightMm: 40 }));
    expect(again.status).toBe(200);
    expect(again.body).toEqual(first.body);
    expect(await rowCounts()).toEqual(before);
    const rows = await testDb().select().from(measurements).where(eq(measurements.clientKey, clientKey));
    expect(rows).toHaveLength(1);
  });

  it('is stored once when the copies race each other', async () => {
    const { w, lead } = await measureWorld();
    const clientKey = randomUUID();
    const body = buildMeasurementInput({ clientKey });
    const results = await Promise.all(Array.from({ length: 6 }, () => w.grower.post(w.at(`/leads/${lead.id}/measurements`), body)));
    expect(results.map((r) => r.status).sort()).toEqual([200, 200, 200, 200, 200, 201]);
    expect(new Set(results.map((r) => r.body.id)).size).toBe(1);
    const rows = await testDb().select().from(measurements).where(eq(measurements.leadId, lead.id));
    expect(rows).toHaveLength(1);
  });

  it('for another lead is refused (409), and in another collection is a different entry', async () => {
    const { w, plant, lead } = await measureWorld();
    const otherLead = await insertLead(testDb(), plant);
    const clientKey = randomUUID();
    await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ clientKey }));
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/leads/${otherLead.id}/measurements`), buildMeasurementInput({ clientKey })), 409, 'clientKey');
    expect(await rowCounts()).toEqual(before);

    const v = await measureWorld();
    expect((await v.w.grower.post(v.w.at(`/leads/${v.lead.id}/measurements`), buildMeasurementInput({ clientKey }))).status).toBe(201);
  });
});

describe('marking the sheath', () => {
  it("on a day with a look, sets that look's sheath; no new measurement, no height invented", async () => {
    const { w, lead } = await measureWorld();
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(30), heightMm: 20, leafCount: 1 });
    const today = await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(0), heightMm: 61, leafCount: 2 });
    const before = await rowCounts();
    const res = await w.grower.post(w.at(`/leads/${lead.id}/sheath`), { date: daysAgo(0), sheath: 'budded' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ id: today.id, date: daysAgo(0), sheath: 'budded', heightMm: 61, leafCount: 2, version: 2 });
    expect((await rowCounts()).measurements).toBe(before.measurements);
  });

  it("on a new day, is a new look with the height the grower typed, carrying nothing else forward", async () => {
    const { w, lead } = await measureWorld();
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(8), heightMm: 61, leafCount: 2, rootTips: 4, bulbWidthMm: 18 });
    const res = await w.grower.post(w.at(`/leads/${lead.id}/sheath`), { date: daysAgo(0), sheath: 'forming', heightMm: 63 });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ date: daysAgo(0), sheath: 'forming', heightMm: 63, leafCount: null, rootTips: null, bulbWidthMm: null, createdBy: w.people.grower.id });
  });

  it('asks for the height on a new day rather than copying the last one; nothing is written', async () => {
    const { w, lead } = await measureWorld();
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(8), heightMm: 61 });
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/leads/${lead.id}/sheath`), { date: daysAgo(0), sheath: 'empty' }), 400, 'heightMm', /height today/);
    expect(await rowCounts()).toEqual(before);
  });

  it('is stored once per client key', async () => {
    const { w, lead } = await measureWorld();
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(5) });
    const body = { date: daysAgo(0), sheath: 'empty', heightMm: 40, clientKey: randomUUID() };
    expect((await w.grower.post(w.at(`/leads/${lead.id}/sheath`), body)).status).toBe(201);
    const before = await rowCounts();
    expect((await w.grower.post(w.at(`/leads/${lead.id}/sheath`), body)).status).toBe(200);
    expect(await rowCounts()).toEqual(before);
  });

  it('takes no sheath mark on a genus whose flowers do not come from a sheath (Stan., Den.)', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId, { genus: 'Stan.' });
    const lead = await insertLead(testDb(), plant, { firstSeen: daysAgo(60) });
    const before = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/leads/${lead.id}/sheath`), { date: daysAgo(0), sheath: 'forming', heightMm: 40 }), 400, 'sheath', /does not flower from a sheath/);
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses an unknown state and the date rules; nothing is written', async () => {
    const { w, lead } = await measureWorld();
    await insertMeasurement(testDb(), lead);
    const withOne = await rowCounts();
    expectRefused(await w.grower.post(w.at(`/leads/${lead.id}/sheath`), { date: daysAgo(0), sheath: 'open', heightMm: 40 }), 400, 'sheath', /none, forming/);
    expectRefused(await w.grower.post(w.at(`/leads/${lead.id}/sheath`), { date: daysAhead(3), sheath: 'dry', heightMm: 40 }), 400, 'date', /future/);
    expectRefused(await w.grower.post(w.at(`/leads/${lead.id}/sheath`), { date: daysAgo(70), sheath: 'dry', heightMm: 40 }), 400, 'date', /first seen/);
    expect(await rowCounts()).toEqual(withOne);
  });
});

describe('one look per lead and day', () => {
  it('refuses a second measurement of a lead on one date with 409 and the stored one; nothing is written', async () => {
    const { w, lead } = await measureWorld();
    const first = await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ heightMm: 40 }));
    expect(first.status).toBe(201);
    const before = await rowCounts();
    const second = await w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ heightMm: 42 }));
    expect(second.status).toBe(409);
    expect(second.body).toMatchObject({ error: { code: 'measurement_exists' }, current: { id: first.body.id, heightMm: 40 } });
    expect(second.body.error.message).toMatch(/already has a measurement on .*; edit that one instead/);
    expect(await rowCounts()).toEqual(before);
  });

  it('lets only one of two saves racing for the same day land', async () => {
    const { w, lead } = await measureWorld();
    const results = await Promise.all([41, 42, 43].map((h) => w.grower.post(w.at(`/leads/${lead.id}/measurements`), buildMeasurementInput({ heightMm: h }))));
    expect(results.map((r) => r.status).sort()).toEqual([201, 409, 409]);
    const rows = await testDb().select().from(measurements).where(eq(measurements.leadId, lead.id));
    expect(rows).toHaveLength(1);
  });

  it('refuses moving a measurement onto a date that has one', async () => {
    const { w, lead } = await measureWorld();
    await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(10), heightMm: 30 });
    const m = await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(3), heightMm: 33 });
    const res = await w.grower.patch(w.at(`/measurements/${m.id}`), { version: 1, date: daysAgo(10) });
    expect(res.status).toBe(409);
    expect(res.body).toMatchObject({ error: { code: 'measurement_exists' }, current: { heightMm: 30 } });
    const [row] = await testDb().select().from(measurements).where(eq(measurements.id, m.id));
    expect(row.version).toBe(1);
  });
});

describe('editing a measurement', () => {
  it('a save increments the version; a stale save gets 409 with the current entry and writes nothing', async () => {
    const { w, lead } = await measureWorld();
    const m = await insertMeasurement(testDb(), lead, { heightMm: 30, createdBy: w.people.grower.id });
    const ok = await w.grower.patch(w.at(`/measurements/${m.id}`), { version: 1, heightMm: 31, date: daysAgo(3) });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body).toMatchObject({ heightMm: 31, date: daysAgo(3), leafCount: 1, version: 2 });
    const before = await rowCounts();
    const stale = await w.owner.patch(w.at(`/measurements/${m.id}`), { version: 1, heightMm: 99 });
    expect(stale.status).toBe(409);
    expect(stale.body).toMatchObject({ error: { code: 'stale' }, current: { id: m.id, heightMm: 31, version: 2 } });
    const [row] = await testDb().select().from(measurements).where(eq(measurements.id, m.id));
    expect(row).toMatchObject({ heightMm: 31, version: 2 });
    expect(await rowCounts()).toEqual(before);
  });

  it.each([
    ['a date in the future', { date: daysAhead(2) }, 'date', /future/],
    ['a date before the lead was first seen', { date: daysAgo(90) }, 'date', /first seen/],
    ['a height of 1501 mm', { heightMm: 1501 }, 'heightMm', /not plausible/],
    ['a leaf count of 31', { leafCount: 31 }, 'leafCount', /not plausible/],
    ['an unknown sheath state', { sheath: 'wet' }, 'sheath', /none, forming/],
  ])('refuses %s with 400, changing nothing', async (_what, change, field, reason) => {
    const { w, lead } = await measureWorld();
    const m = await insertMeasurement(testDb(), lead);
    expectRefused(await w.grower.patch(w.at(`/measurements/${m.id}`), { version: 1, ...change }), 400, field, reason);
    const [row] = await testDb().select().from(measurements).where(eq(measurements.id, m.id));
    expect(row.version).toBe(1);
    expect(row.updatedAt).toEqual(m.updatedAt);
  });

  it("cannot touch another collection's measurement (404)", async () => {
    const { w } = await measureWorld();
    const foreignLead = await insertLead(testDb(), await insertPlant(testDb(), w.otherCollectionId));
    const foreign = await insertMeasurement(testDb(), foreignLead);
    const before = await rowCounts();
    expectRefused(await w.owner.patch(w.at(`/measurements/${foreign.id}`), { version: 1, heightMm: 1 }), 404);
    expectRefused(await w.owner.delete(w.at(`/measurements/${foreign.id}`)), 404);
    expect(await rowCounts()).toEqual(before);
  });
});

describe('deleting a measurement', () => {
  it('a grower may delete their own, not another’s; an owner any; a viewer none', async () => {
    const { w, lead } = await measureWorld();
    const mine = await insertMeasurement(testDb(), lead, { createdBy: w.people.grower.id });
    const owners = await insertMeasurement(testDb(), lead, { createdBy: w.people.owner.id });
    const before = await rowCounts();
    expectRefused(await w.viewer.delete(w.at(`/measurements/${mine.id}`)), 403);
    const refused = await w.grower.delete(w.at(`/measurements/${owners.id}`));
    expectRefused(refused, 403);
    expect(refused.body.error.message).toMatch(/only the measurements they recorded/);
    expect(await rowCounts()).toEqual(before);

    expect((await w.grower.delete(w.at(`/measurements/${mine.id}`))).status).toBe(204);
    expect((await w.owner.delete(w.at(`/measurements/${owners.id}`))).status).toBe(204);
    expect((await rowCounts()).measurements).toBe(before.measurements - 2);
  });
});
