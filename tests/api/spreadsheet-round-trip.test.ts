import AdmZip from 'adm-zip';
import { asc, eq } from 'drizzle-orm';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seasonOf } from '@/lib/dates';
import { bloomRecords, collections, leads, measurements, plants } from '../../db/schema';
import { generateCollection } from '../../db/seed/generate';
import { insertGenerated } from '../../db/seed/insert';
import { daysAgo, insertLead, insertMeasurement, insertPlant } from '../factories/records';
import { testDb } from './support/database';
import { collectionWorld } from './support/records';
import { startTestServer, type TestServer } from './support/server';

/*
 * The spreadsheet way out and back in: the export's records.csv, sent unchanged to the
 * spreadsheet import of an empty collection, maps itself and brings back every plant's name,
 * every lead and every measurement and bloom record. (The JSON export and restore carry the
 * rest — areas, care entries, notes, first-seen days; export.test.ts checks that round trip.)
 */

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

async function records(collectionId: string) {
  const db = testDb();
  const plantRows = await db
    .select({ tag: plants.tag, genus: plants.genus, epithet: plants.epithet, clonalName: plants.clonalName })
    .from(plants)
    .where(eq(plants.collectionId, collectionId))
    .orderBy(asc(plants.tag));
  const leadRows = await db
    .select({ tag: plants.tag, label: leads.label, season: leads.season })
    .from(leads)
    .innerJoin(plants, eq(plants.id, leads.plantId))
    .where(eq(leads.collectionId, collectionId))
    .orderBy(asc(plants.tag), asc(leads.label));
  const measurementRows = await db
    .select({
      tag: plants.tag,
      label: leads.label,
      measuredOn: measurements.measuredOn,
      heightMm: measurements.heightMm,
      leafCount: measurements.leafCount,
      sheath: measurements.sheath,
      rootTips: measurements.rootTips,
    })
    .from(measurements)
    .innerJoin(leads, eq(leads.id, measurements.leadId))
    .innerJoin(plants, eq(plants.id, leads.plantId))
    .where(eq(measurements.collectionId, collectionId))
    .orderBy(asc(plants.tag), asc(leads.label), asc(measurements.measuredOn));
  const bloomRows = await db
    .select({
      tag: plants.tag,
      label: leads.label,
      budsSeenOn: bloomRecords.budsSeenOn,
      firstOpenOn: bloomRecords.firstOpenOn,
      lastFadedOn: bloomRecords.lastFadedOn,
      flowerCount: bloomRecords.flowerCount,
      spikeCount: bloomRecords.spikeCount,
    })
    .from(bloomRecords)
    .innerJoin(leads, eq(leads.id, bloomRecords.leadId))
    .innerJoin(plants, eq(plants.id, leads.plantId))
    .where(eq(bloomRecords.collectionId, collectionId))
    .orderBy(asc(plants.tag), asc(leads.label));
  return { plants: plantRows, leads: leadRows, measurements: measurementRows, blooms: bloomRows };
}

describe('records.csv from the export, into the spreadsheet import', () => {
  it('reproduces plants, leads, measurements and bloom records in an empty collection, formula-like tags included', async () => {
    const w = await collectionWorld(server);
    const generated = generateCollection({ seed: 5151, today: daysAgo(0), plants: 8, seasons: 3 });
    await testDb().transaction((tx) => insertGenerated(tx, w.collectionId, generated, { createdBy: w.people.grower.id }));
    // A tag and a label the export must escape ("'-A1"), which the import must read back as written.
    const odd = await insertPlant(testDb(), w.collectionId, { tag: '-A1', epithet: 'Quoted Dawn', clonalName: 'Plus' });
    const [{ sourceStart }] = await testDb().select({ sourceStart: collections.seasonStartMonth }).from(collections).where(eq(collections.id, w.collectionId));
    const oddLead = await insertLead(testDb(), odd, { label: '=B', season: seasonOf(daysAgo(40), sourceStart), firstSeen: daysAgo(40) });
    await insertMeasurement(testDb(), oddLead, { measuredOn: daysAgo(20), heightMm: 33.5 });
    const original = await records(w.collectionId);
    expect(original.measurements.length).toBeGreaterThan(100);
    expect(original.blooms.length).toBeGreaterThan(5);

    const zipRes = await supertest(server.url)
      .get(w.at('/export.zip?photos=no'))
      .set('Cookie', w.people.owner.cookie)
      .buffer(true)
      .parse((res, done) => {
        const parts: Buffer[] = [];
        res.on('data', (part: Buffer) => parts.push(part));
        res.on('end', () => done(null, Buffer.concat(parts)));
      });
    expect(zipRes.status).toBe(200);
    const csv = new AdmZip(zipRes.body as Buffer).getEntry('records.csv')!.getData().toString('utf8');
    expect(csv).toContain(`"'-A1"`);

    const created = await w.owner.post('/api/collections', { name: 'Moved here' });
    expect(created.status).toBe(201);
    const target = created.body.id as string;
    const send = (path: string) =>
      supertest(server.url)
        .post(`/api/collections/${target}/imports${path}`)
        .set('Origin', server.url)
        .set('Cookie', w.people.owner.cookie)
        .set('Content-Type', 'text/csv')
        .buffer(true)
        .parse((res, done) => {
          let text = '';
          res.setEncoding('utf8');
          res.on('data', (part: string) => (text += part));
          res.on('end', () => done(null, text));
        })
        .send(csv);

    const dry = await send('/check');
    expect(dry.status, String(dry.body)).toBe(200);
    const report = JSON.parse(dry.body as string);
    expect(report.issues).toEqual([]);
    expect(report.ready).toBe(true);

    const run = await send('');
    expect(run.status, String(run.body)).toBe(200);
    const last = JSON.parse((run.body as string).trim().split('\n').at(-1)!);
    expect(last.phase).toBe('done');

    const copy = await records(target);
    expect(copy.plants).toEqual(original.plants);
    expect(copy.leads).toEqual(original.leads);
    expect(copy.measurements).toEqual(original.measurements);
    expect(copy.blooms).toEqual(original.blooms);

    // Leads of earlier growth years come in finished, the current growth year's (today's, by the
    // collection's season start) as growing.
    const statuses = await testDb()
      .select({ season: leads.season, status: leads.status })
      .from(leads)
      .where(eq(leads.collectionId, target));
    const [{ startMonth }] = await testDb().select({ startMonth: collections.seasonStartMonth }).from(collections).where(eq(collections.id, target));
    const current = seasonOf(daysAgo(0), startMonth);
    expect(statuses.filter((s) => s.season < current).every((s) => s.status === 'mature')).toBe(true);
    expect(statuses.filter((s) => s.season >= current).every((s) => s.status === 'growing')).toBe(true);
    expect(statuses.some((s) => s.season < current)).toBe(true);
  });
});
