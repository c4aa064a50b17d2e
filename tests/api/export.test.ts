import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import AdmZip from 'adm-zip';
import { asc, eq } from 'drizzle-orm';
import Papa from 'papaparse';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exportDocumentSchema, type ExportDocument } from '@/shared/schemas/export';
import { areas, careEntries, collections, leads, measurements, plants } from '../../db/schema';
import { generateCollection } from '../../db/seed/generate';
import { insertGenerated } from '../../db/seed/insert';
import { localDiskStore } from '../../server/photos/store';
import { insertPhoto } from '../factories/photos';
import { daysAgo, insertArea, insertCare, insertLead, insertMeasurement, insertPlant } from '../factories/records';
import { rowCounts, testDb } from './support/database';
import { collectionWorld, expectRefused } from './support/records';
import { startTestServer, type TestServer } from './support/server';

let server: TestServer;
let photoDir: string;

beforeAll(async () => {
  photoDir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-export-photos-'));
  // Two heavy-job slots: the test of two restores at once is about the database's lock, which is
  // what keeps two server processes (one slot each) apart.
  server = await startTestServer({ photoStore: localDiskStore(photoDir), heavyJobSlots: 2 });
});
afterAll(async () => {
  await server.close();
  await fs.rm(photoDir, { recursive: true, force: true });
});

type World = Awaited<ReturnType<typeof collectionWorld>>;
type Who = 'owner' | 'grower' | 'viewer' | 'outsider';

/** The spreadsheet import's field names, in order, as listed in the shared import/export field list. */
const IMPORT_FIELDS = [
  'tag', 'genus', 'epithet', 'clonal_name', 'lead', 'season', 'date', 'height_mm', 'leaves', 'sheath',
  'root_tips', 'buds_seen', 'first_open', 'last_faded', 'flowers', 'spikes',
];

const TABLE_FILES = [
  'collection.csv', 'areas.csv', 'plants.csv', 'leads.csv', 'measurements.csv', 'bloom_records.csv',
  'care_entries.csv', 'photos.csv', 'members.csv', 'records.csv',
];

function download(w: World, who: Who, url: string) {
  return supertest(server.url)
    .get(url)
    .set('Cookie', w.people[who].cookie)
    .buffer(true)
    .parse((res, done) => {
      const parts: Buffer[] = [];
      res.on('data', (part: Buffer) => parts.push(part));
      res.on('end', () => done(null, Buffer.concat(parts)));
    });
}

function restoreFile(cookie: string, collectionId: string, data: Buffer) {
  return supertest(server.url)
    .post(`/api/collections/${collectionId}/restore`)
    .set('Origin', server.url)
    .set('Cookie', cookie)
    .attach('document', data, { filename: 'backup.json', contentType: 'application/json' });
}

/** A CSV from the zip, parsed the way a spreadsheet import would read it. */
function readCsv(zip: AdmZip, name: string) {
  const entry = zip.getEntry(name);
  if (!entry) throw new Error(`no ${name} in the zip`);
  const text = entry.getData().toString('utf8');
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
  expect(parsed.errors, `${name}: ${JSON.stringify(parsed.errors)}`).toEqual([]);
  return { text, rows: parsed.data, fields: parsed.meta.fields ?? [] };
}

/** A collection filled like the demo (generator, three seasons), with a photo and a few awkward cells. */
async function demoLikeWorld() {
  const w = await collectionWorld(server);
  const generated = generateCollection({ seed: 4242, today: daysAgo(0), plants: 14, seasons: 3 });
  await testDb().transaction((tx) => insertGenerated(tx, w.collectionId, generated, { createdBy: w.people.grower.id }));
  await testDb().update(collections).set({ latitude: -33.9, longitude: 151.2, seasonStartMonth: 9 }).where(eq(collections.id, w.collectionId));

  // Cells a spreadsheet would run as formulas, and numbers that merely look like them.
  const area = await insertArea(testDb(), w.collectionId, { name: '@Roof', notes: '\tcmd /c calc' });
  const plant = await insertPlant(testDb(), w.collectionId, {
    tag: '+1',
    epithet: 'Formula Test',
    notes: '=HYPERLINK("http://evil.example/","click me")',
    areaId: area.id,
    minNightTempC: -2,
    givenTo: 'A friend',
    givenAwayOn: daysAgo(3),
  });
  const lead = await insertLead(testDb(), plant, { label: '-2+3', season: 2026, firstSeen: daysAgo(60) });
  await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(30), heightMm: 41.5, note: '@SUM(A1:A9)' });
  await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(10), heightMm: 55, note: '\r=1+1\nsecond line' });
  await insertCare(testDb(), w.collectionId, { plantId: plant.id, kind: 'move', toAreaId: area.id, note: '-fix me' });
  await insertCare(testDb(), w.collectionId, { areaId: area.id, kind: 'water', note: 'plain words' });
  // Full-width = + - @ (U+FF1D, U+FF0B, U+FF0D, U+FF20), which some spreadsheet programs also run as formulas.
  await insertCare(testDb(), w.collectionId, { areaId: area.id, kind: 'feed', product: '＝HYPERLINK("http://evil.example/")', target: '＋1', note: '－2＋3' });
  await insertCare(testDb(), w.collectionId, { areaId: area.id, kind: 'note', note: '＠SUM(A1:A9)' });
  const photo = await insertPhoto(testDb(), localDiskStore(photoDir), { collectionId: w.collectionId, userId: w.people.grower.id, role: 'grower' }, lead.id);
  return { w, generated, plant, lead, area, photo };
}

/** The records with every id replaced by what a grower would call it: tags, labels, area names. */
function byNaturalKeys(doc: ExportDocument) {
  const areaName = new Map(doc.areas.map((a) => [a.id, a.name]));
  const plantTag = new Map(doc.plants.map((p) => [p.id, p.tag]));
  const leadKey = new Map(doc.leads.map((l) => [l.id, `${plantTag.get(l.plantId)}/${l.label}`]));
  const area = (id: string | null) => (id === null ? null : areaName.get(id));
  const plantOf = (id: string | null) => (id === null ? null : plantTag.get(id));
  const leadOf = (id: string | null) => (id === null ? null : leadKey.get(id));
  const sorted = <T>(rows: T[]) => rows.map((r) => JSON.stringify(r)).sort();
  return {
    collection: { ...doc.collection, name: undefined },
    areas: sorted(doc.areas.map(({ id: _id, ...a }) => a)),
    plants: sorted(doc.plants.map(({ id: _id, ...p }) => ({ ...p, areaId: area(p.areaId), parentPlantId: plantOf(p.parentPlantId) }))),
    leads: sorted(doc.leads.map(({ id: _id, ...l }) => ({ ...l, plantId: plantOf(l.plantId), parentLeadId: leadOf(l.parentLeadId) }))),
    measurements: sorted(doc.measurements.map(({ id: _id, ...m }) => ({ ...m, leadId: leadOf(m.leadId) }))),
    bloomRecords: sorted(doc.bloomRecords.map(({ id: _id, ...b }) => ({ ...b, leadId: leadOf(b.leadId) }))),
    careEntries: sorted(
      doc.careEntries.map(({ id: _id, ...c }) => ({ ...c, plantId: plantOf(c.plantId), areaId: area(c.areaId), toAreaId: area(c.toAreaId) })),
    ),
  };
}

let demo: Awaited<ReturnType<typeof demoLikeWorld>>;
let zip: AdmZip;
beforeAll(async () => {
  demo = await demoLikeWorld();
  const res = await download(demo.w, 'viewer', demo.w.at('/export.zip'));
  expect(res.status, res.body.toString()).toBe(200);
  zip = new AdmZip(res.body as Buffer);
});

describe('the zip export', () => {
  it('is a named attachment holding README, one CSV per table, records.csv and the photos', async () => {
    const res = await download(demo.w, 'viewer', demo.w.at('/export.zip'));
    expect(res.headers['content-type']).toBe('application/zip');
    expect(res.headers['content-disposition']).toBe(`attachment; filename=sympodia-test-bench-${new Date().toISOString().slice(0, 10)}.zip`);
    expect(res.headers['cache-control']).toContain('no-store');
    const names = zip.getEntries().map((e) => e.entryName).sort();
    expect(names).toEqual(['README.txt', ...TABLE_FILES, `photos/${demo.photo.id}.webp`].sort());
    // The photo is the display file the store holds, byte for byte.
    const stored = await fs.readFile(path.join(photoDir, demo.w.collectionId, demo.photo.id, 'display.webp'));
    expect(zip.getEntry(`photos/${demo.photo.id}.webp`)!.getData().equals(stored)).toBe(true);
    expect(zip.getEntry('README.txt')!.getData().toString('utf8')).toMatch(/records\.csv/);
  });

  it('leaves the photo files out when asked, and refuses an unknown choice', async () => {
    const res = await download(demo.w, 'viewer', demo.w.at('/export.zip?photos=no'));
    expect(res.status).toBe(200);
    const lean = new AdmZip(res.body as Buffer);
    expect(lean.getEntries().map((e) => e.entryName).sort()).toEqual(['README.txt', ...TABLE_FILES].sort());
    const photosCsv = readCsv(lean, 'photos.csv');
    expect(photosCsv.rows).toHaveLength(1);
    expect(photosCsv.rows[0].file).toBe('');
    const refused = await demo.w.viewer.get(demo.w.at('/export.zip?photos=maybe'));
    expectRefused(refused, 400, 'query.photos');
  });

  it('writes UTF-8 with a byte-order mark and every text cell in double quotes', () => {
    const raw = zip.getEntry('plants.csv')!.getData().toString('utf8');
    expect(raw.charCodeAt(0)).toBe(0xfeff);
    expect(raw.split('\r\n')[0]).toBe(
      '\uFEFF"id","tag","genus","epithet","is_species","clonal_name","source","acquired_on","area_id","area_name","medium","notes","parent_plant_id","parent_tag","divided_on","round_position","min_night_temp_c","history_only","given_away_on","given_to","received_from"',
    );
  });

  it('holds the same rows as the database, table by table', async () => {
    const db = testDb();
    const id = demo.w.collectionId;
    const plantRows = await db.select().from(plants).where(eq(plants.collectionId, id)).orderBy(asc(plants.tag));
    const csvPlants = readCsv(zip, 'plants.csv').rows;
    expect(csvPlants.map((p) => p.id)).toEqual(plantRows.map((p) => p.id));
    const division = plantRows.find((p) => p.parentPlantId)!;
    expect(division, 'the generator makes divisions').toBeDefined();
    const csvDivision = csvPlants.find((p) => p.id === division.id)!;
    expect(csvDivision.parent_plant_id).toBe(division.parentPlantId);
    expect(csvDivision.divided_on).toBe(division.dividedOn);
    expect(csvDivision.parent_tag).toBe(plantRows.find((p) => p.id === division.parentPlantId)!.tag);

    const leadRows = await db.select().from(leads).where(eq(leads.collectionId, id));
    const csvLeads = readCsv(zip, 'leads.csv').rows;
    expect(new Set(csvLeads.map((l) => l.id))).toEqual(new Set(leadRows.map((l) => l.id)));
    const brokeFrom = leadRows.find((l) => l.parentLeadId);
    if (brokeFrom) expect(csvLeads.find((l) => l.id === brokeFrom.id)!.parent_lead_id).toBe(brokeFrom.parentLeadId);

    const measurementRows = await db.select().from(measurements).where(eq(measurements.collectionId, id));
    const csvMeasurements = readCsv(zip, 'measurements.csv').rows;
    expect(csvMeasurements).toHaveLength(measurementRows.length);
    const heights = new Map(measurementRows.map((m) => [m.id, m]));
    for (const row of csvMeasurements) {
      const stored = heights.get(row.id)!;
      expect(Number(row.height_mm)).toBe(stored.heightMm);
      expect(row.date).toBe(stored.measuredOn);
      expect(row.sheath).toBe(stored.sheath);
    }

    const areaRows = await db.select().from(areas).where(eq(areas.collectionId, id));
    expect(readCsv(zip, 'areas.csv').rows.map((a) => a.id).sort()).toEqual(areaRows.map((a) => a.id).sort());
    const careRows = await db.select().from(careEntries).where(eq(careEntries.collectionId, id));
    const csvCare = readCsv(zip, 'care_entries.csv').rows;
    expect(csvCare.map((c) => c.id).sort()).toEqual(careRows.map((c) => c.id).sort());
    const move = csvCare.find((c) => c.kind === 'move' && c.plant_id === demo.plant.id)!;
    expect(move.to_area_id).toBe(demo.area.id);
    expect(readCsv(zip, 'bloom_records.csv').rows).toHaveLength(demo.generated.bloomRecords.length);

    const collectionCsv = readCsv(zip, 'collection.csv').rows;
    expect(collectionCsv).toEqual([expect.objectContaining({ name: 'Test bench', season_start_month: '9', units: 'mm', latitude: '-33.9', longitude: '151.2' })]);
  });

  it('names members and roles, never their e-mail addresses', () => {
    const { text, rows, fields } = readCsv(zip, 'members.csv');
    expect(fields).toEqual(['display_name', 'role', 'member_since']);
    expect(rows.map((r) => r.role).sort()).toEqual(['grower', 'owner', 'viewer']);
    for (const who of ['owner', 'grower', 'viewer'] as const) expect(text).not.toContain(demo.w.people[who].email);
    for (const entry of zip.getEntries()) expect(entry.getData().toString('utf8')).not.toContain(demo.w.people.owner.email);
  });

  it('flattens measurements into records.csv under the import field names, height in mm, bloom repeated per lead', async () => {
    const { rows, fields } = readCsv(zip, 'records.csv');
    expect(fields).toEqual(IMPORT_FIELDS);
    const measured = new Set(demo.generated.measurements.map((m) => m.leadId));
    const unmeasuredLeads = demo.generated.leads.filter((l) => !measured.has(l.id)).length;
    // The generated measurements, the two added ones, and one row per lead not yet measured.
    expect(rows).toHaveLength(demo.generated.measurements.length + 2 + unmeasuredLeads);

    const bloom = demo.generated.bloomRecords.find((b) => b.flowerCount !== null)!;
    const bloomLead = demo.generated.leads.find((l) => l.id === bloom.leadId)!;
    const bloomPlant = demo.generated.plants.find((p) => p.id === bloomLead.plantId)!;
    const leadRows = rows.filter((r) => r.tag === bloomPlant.tag && r.lead === bloomLead.label);
    expect(leadRows.length).toBe(Math.max(1, demo.generated.measurements.filter((m) => m.leadId === bloomLead.id).length));
    for (const row of leadRows) {
      expect(row).toMatchObject({ genus: bloomPlant.genus, epithet: bloomPlant.epithet, season: String(bloomLead.season), flowers: String(bloom.flowerCount), first_open: bloom.firstOpenOn ?? '' });
    }
    const added = rows.filter((r) => r.tag === "'+1");
    expect(added.map((r) => [r.lead, r.height_mm])).toEqual([["'-2+3", '41.5'], ["'-2+3", '55']]);
  });

  it('escapes cells a spreadsheet would run as formulas, and leaves numbers alone', () => {
    const plant = readCsv(zip, 'plants.csv').rows.find((p) => p.id === demo.plant.id)!;
    expect(plant.tag).toBe("'+1");
    expect(plant.notes).toBe(`'=HYPERLINK("http://evil.example/","click me")`);
    expect(plant.area_name).toBe("'@Roof");
    // A negative number is data: written as a number, not quoted, not escaped.
    expect(plant.min_night_temp_c).toBe('-2');
    const raw = zip.getEntry('plants.csv')!.getData().toString('utf8');
    expect(raw).toContain(',-2,');
    expect(readCsv(zip, 'collection.csv').text).toContain(',-33.9,151.2,');

    const area = readCsv(zip, 'areas.csv').rows.find((a) => a.id === demo.area.id)!;
    expect(area.notes).toBe("'\tcmd /c calc");
    const notes = readCsv(zip, 'measurements.csv').rows.filter((m) => m.lead_id === demo.lead.id).map((m) => m.note);
    expect(notes).toEqual(["'@SUM(A1:A9)", "'\r=1+1\nsecond line"]);
    expect(readCsv(zip, 'care_entries.csv').rows.find((c) => c.note.includes('fix me'))!.note).toBe("'-fix me");
    const fed = readCsv(zip, 'care_entries.csv').rows.find((c) => c.product.includes('HYPERLINK'))!;
    expect([fed.product, fed.target, fed.note]).toEqual(["'＝HYPERLINK(\"http://evil.example/\")", "'＋1", "'－2＋3"]);
    expect(readCsv(zip, 'care_entries.csv').rows.find((c) => c.note.includes('SUM'))!.note).toBe("'＠SUM(A1:A9)");

    // No cell anywhere starts like a formula once read back.
    for (const name of TABLE_FILES) {
      for (const row of readCsv(zip, name).rows) {
        for (const [column, value] of Object.entries(row)) {
          if (/^[=+@\t\r\uFF1D\uFF0B\uFF0D\uFF20]/.test(value)) throw new Error(`${name} ${column}: ${JSON.stringify(value)}`);
          if (value.startsWith('-')) expect(Number.isFinite(Number(value)), `${name} ${column}: ${value}`).toBe(true);
        }
      }
    }
  });
});

describe('the JSON export', () => {
  it('is one attachment that validates against the export schema and holds every record', async () => {
    const res = await demo.w.viewer.get(demo.w.at('/export.json'));
    expect(res.status).toBe(200);
    expect(res.headers['content-disposition']).toBe(`attachment; filename=sympodia-test-bench-${new Date().toISOString().slice(0, 10)}.json`);
    const parsed = exportDocumentSchema.safeParse(res.body);
    expect(parsed.success, JSON.stringify(parsed.error?.issues.slice(0, 3))).toBe(true);
    const doc = parsed.data!;
    expect(doc).toMatchObject({ format: 'sympodia-export', version: 1, collection: { name: 'Test bench', seasonStartMonth: 9, latitude: -33.9 } });
    expect(Date.now() - Date.parse(doc.exportedAt)).toBeLessThan(60_000);
    const counts = await rowCounts();
    // This file's only records are the demo-like collection's.
    expect(doc.plants).toHaveLength(counts.plants);
    expect(doc.leads).toHaveLength(counts.leads);
    expect(doc.measurements).toHaveLength(counts.measurements);
    expect(doc.bloomRecords).toHaveLength(counts.bloom_records);
    expect(doc.careEntries).toHaveLength(counts.care_entries);
    expect(doc.photos).toEqual([expect.objectContaining({ id: demo.photo.id, leadId: demo.lead.id, file: `photos/${demo.photo.id}.webp` })]);
    expect(JSON.stringify(doc)).not.toContain(demo.w.people.grower.id);
  });
});

async function emptyCollectionOf(w: World, name: string) {
  const res = await w.owner.post('/api/collections', { name });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

describe('restore', () => {
  it('round trip: export, restore into an empty collection, export again — equal but for ids and timestamps', async () => {
    const first = await download(demo.w, 'viewer', demo.w.at('/export.json'));
    const original = exportDocumentSchema.parse(JSON.parse(first.body.toString('utf8')));
    expect(first.body.length, 'large enough to need the file upload').toBeGreaterThan(100 * 1024);
    const targetId = await emptyCollectionOf(demo.w, 'Restored bench');

    const res = await restoreFile(demo.w.people.owner.cookie, targetId, first.body as Buffer);
    expect(res.status, JSON.stringify(res.body).slice(0, 500)).toBe(201);
    expect(res.body).toEqual({
      restored: {
        areas: original.areas.length,
        plants: original.plants.length,
        leads: original.leads.length,
        measurements: original.measurements.length,
        bloomRecords: original.bloomRecords.length,
        careEntries: original.careEntries.length,
      },
      photosSkipped: 1,
      settings: { seasonStartMonth: 9, units: 'mm', latitude: -33.9, longitude: 151.2 },
      exportedFrom: 'Test bench',
    });

    const again = exportDocumentSchema.parse((await demo.w.owner.get(`/api/collections/${targetId}/export.json`)).body);
    expect(again.collection.name).toBe('Restored bench');
    expect(again.photos).toEqual([]);
    expect(byNaturalKeys(again)).toEqual(byNaturalKeys(original));
    // Fresh ids throughout.
    const oldIds = new Set([...original.areas, ...original.plants, ...original.leads, ...original.measurements].map((r) => r.id));
    for (const row of [...again.areas, ...again.plants, ...again.leads, ...again.measurements]) expect(oldIds.has(row.id)).toBe(false);
    // The divisions point at the restored parents, inside the new collection.
    const restoredDivision = again.plants.find((p) => p.parentPlantId)!;
    expect(again.plants.map((p) => p.id)).toContain(restoredDivision.parentPlantId);

    // The flat sheet carries no ids, so the two are the same text.
    const zipAgain = new AdmZip((await download(demo.w, 'owner', `/api/collections/${targetId}/export.zip`)).body as Buffer);
    expect(readCsv(zipAgain, 'records.csv').text).toBe(readCsv(zip, 'records.csv').text);

    // The restored records are live: the plant list and a lead page read them.
    const list = await demo.w.owner.get(`/api/collections/${targetId}/plants?pageSize=100`);
    expect(list.body.total).toBe(original.plants.length);
  });

  it('refuses a collection that already has records (409) and writes nothing', async () => {
    const doc = (await demo.w.viewer.get(demo.w.at('/export.json'))).body;
    const before = await rowCounts();
    const res = await restoreFile(demo.w.people.owner.cookie, demo.w.collectionId, Buffer.from(JSON.stringify(doc)));
    expectRefused(res, 409);
    expect(res.body.error.code).toBe('collection_not_empty');
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses a collection holding only an area', async () => {
    const w = await collectionWorld(server);
    await insertArea(testDb(), w.collectionId);
    const before = await rowCounts();
    expectRefused(await w.owner.post(w.at('/restore'), smallDocument()), 409);
    expect(await rowCounts()).toEqual(before);
  });

  it('lets one of two restores at once win; the other finds the collection full', async () => {
    const w = await collectionWorld(server);
    const body = Buffer.from(JSON.stringify(smallDocument()));
    const answers = await Promise.all([restoreFile(w.people.owner.cookie, w.collectionId, body), restoreFile(w.people.owner.cookie, w.collectionId, body)]);
    expect(answers.map((a) => a.status).sort()).toEqual([201, 409]);
    const rows = await testDb().select().from(plants).where(eq(plants.collectionId, w.collectionId));
    expect(rows).toHaveLength(2);
  });

  it('restores a small document sent as a JSON body, remapping divisions, leads and care entries', async () => {
    const w = await collectionWorld(server);
    const res = await w.owner.post(w.at('/restore'), smallDocument());
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const restored = await testDb().select().from(plants).where(eq(plants.collectionId, w.collectionId)).orderBy(asc(plants.tag));
    expect(restored.map((p) => p.tag)).toEqual(['A-1', 'A-1B']);
    expect(restored[1].parentPlantId).toBe(restored[0].id);
    const [area] = await testDb().select().from(areas).where(eq(areas.collectionId, w.collectionId));
    expect(restored[0].areaId).toBe(area.id);
    const leadRows = await testDb().select().from(leads).where(eq(leads.collectionId, w.collectionId)).orderBy(asc(leads.label));
    expect(leadRows[1].parentLeadId).toBe(leadRows[0].id);
    expect(leadRows[1].plantId).toBe(restored[1].id);
    const care = await testDb().select().from(careEntries).where(eq(careEntries.collectionId, w.collectionId));
    expect(care).toEqual([expect.objectContaining({ areaId: area.id, plantId: null, kind: 'water' })]);
    // Restored records count as added by the owner who restored them.
    expect(restored.every((p) => p.createdBy === w.people.owner.id)).toBe(true);
  });

  it('answers 400 naming the bad field, and writes nothing', async () => {
    const w = await collectionWorld(server);
    const before = await rowCounts();
    const cases: Array<[unknown, string, RegExp]> = [
      [{ ...smallDocument(), format: 'some-other-program' }, 'format', /Not a Sympodia export/],
      [{ ...smallDocument(), version: 2 }, 'version', /version 1/],
      [withPlant({ genus: 'cattleya' }), 'plants.0.genus', /genus/],
      [withPlant({ areaId: 'nowhere' }), 'plants.0.areaId', /No area/],
      [{ ...smallDocument(), measurements: [{ ...smallDocument().measurements[0], heightMm: 4000 }] }, 'measurements.0.heightMm', /not plausible/],
      [{ ...smallDocument(), leads: smallDocument().leads.map((l) => ({ ...l, parentLeadId: l.id === 'lead-1' ? 'lead-2' : 'lead-1' })) }, 'leads.0.parentLeadId', /cannot break from itself/],
      [{ ...smallDocument(), measurements: [{ ...smallDocument().measurements[0], date: '2999-01-01' }] }, 'measurements.0.date', /future/],
    ];
    for (const [body, field, reason] of cases) expectRefused(await w.owner.post(w.at('/restore'), body), 400, field, reason);

    const malformed = await supertest(server.url)
      .post(w.at('/restore'))
      .set('Origin', server.url)
      .set('Cookie', w.people.owner.cookie)
      .set('Content-Type', 'application/json')
      .send('{"format": "sympodia-export",');
    expectRefused(malformed, 400, 'body');
    expectRefused(await restoreFile(w.people.owner.cookie, w.collectionId, Buffer.from('not json at all')), 400, 'document', /not valid JSON/);
    expect(await rowCounts()).toEqual(before);
  });

  it('reads an uploaded file record by record: any field order, unknown fields skipped, a byte-order mark dropped', async () => {
    const w = await collectionWorld(server);
    const doc = smallDocument();
    // Lists before the header fields, an unknown field with a large array of its own, then a mark in front.
    const { format, version, exportedAt, collection, ...lists } = doc;
    const text = JSON.stringify({ ...lists, somethingNewer: Array.from({ length: 5000 }, (_, i) => ({ i, nested: [[i]] })), collection, exportedAt, version, format });
    const res = await restoreFile(w.people.owner.cookie, w.collectionId, Buffer.from(`\uFEFF${text}`, 'utf8'));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.restored).toMatchObject({ areas: 1, plants: 2, leads: 2, measurements: 1, careEntries: 1 });
  });

  it('names what an uploaded file lacks or gets wrong, at most 20 problems, and writes nothing', async () => {
    const w = await collectionWorld(server);
    const before = await rowCounts();
    const { leads: _leads, ...withoutLeads } = smallDocument();
    const upload = (doc: unknown) => restoreFile(w.people.owner.cookie, w.collectionId, Buffer.from(JSON.stringify(doc)));
    expectRefused(await upload(withoutLeads), 400, 'leads', /Missing/);
    expectRefused(await upload({ ...smallDocument(), plants: { p: 1 } }), 400, 'plants', /list of records/);
    expectRefused(await upload({ ...smallDocument(), version: 7 }), 400, 'version', /version 1/);
    expectRefused(await upload([smallDocument()]), 400, 'document', /no JSON object/);
    const many = await upload({ ...smallDocument(), measurements: Array.from({ length: 40 }, (_, i) => ({ id: `m-${i}`, leadId: 'lead-1', date: 'not a date', heightMm: 1 })) });
    expect(many.status).toBe(400);
    expect(many.body.error.details).toHaveLength(20);
    expect(many.body.error.details[0].field).toBe('measurements.0.date');
    expectRefused(await restoreFile(w.people.owner.cookie, w.collectionId, Buffer.from(JSON.stringify(smallDocument()).slice(0, -20))), 400, 'document', /not valid JSON/);
    expect(await rowCounts()).toEqual(before);
  });

  it('is for owners only; exports are for every member; other collections are not found', async () => {
    const w = await collectionWorld(server);
    for (const who of ['viewer', 'grower'] as const) {
      expectRefused(await w[who].post(w.at('/restore'), smallDocument()), 403);
      expect((await w[who].get(w.at('/export.json'))).status).toBe(200);
      expect((await download(w, who, w.at('/export.zip'))).status).toBe(200);
    }
    expectRefused(await w.outsider.get(w.at('/export.json')), 404);
    expectRefused(await w.outsider.get(w.at('/export.zip')), 404);
    expectRefused(await w.outsider.post(w.at('/restore'), smallDocument()), 404);
    expectRefused(await w.owner.get(w.elsewhere('/export.json')), 404);
    expectRefused(await w.owner.post(w.elsewhere('/restore'), smallDocument()), 404);
    expect(await testDb().select().from(plants).where(eq(plants.collectionId, w.otherCollectionId))).toEqual([]);
  });
});

/** A hand-sized export: two plants (one a division), two leads, a measurement, an area care entry. */
function smallDocument() {
  return {
    format: 'sympodia-export',
    version: 1,
    exportedAt: new Date().toISOString(),
    collection: { name: 'Small bench', seasonStartMonth: 3, units: 'in', latitude: null, longitude: null },
    areas: [{ id: 'area-1', name: 'East bench', indoors: false, position: 0, notes: null }],
    plants: [
      { id: 'plant-1', tag: 'A-1', genus: 'C.', epithet: 'Quiet Meadow', areaId: 'area-1' },
      { id: 'plant-2', tag: 'A-1B', genus: 'C.', epithet: 'Quiet Meadow', parentPlantId: 'plant-1', dividedOn: daysAgo(200) },
    ],
    leads: [
      { id: 'lead-1', plantId: 'plant-1', season: 2025, label: '2025-A', firstSeen: daysAgo(300) },
      { id: 'lead-2', plantId: 'plant-2', season: 2026, label: '2026-A', firstSeen: daysAgo(100), parentLeadId: 'lead-1' },
    ],
    measurements: [{ id: 'm-1', leadId: 'lead-2', date: daysAgo(20), heightMm: 35 }],
    bloomRecords: [],
    careEntries: [{ id: 'c-1', areaId: 'area-1', kind: 'water', occurredOn: daysAgo(2) }],
    photos: [],
  };
}

function withPlant(changes: Record<string, unknown>) {
  const doc = smallDocument();
  return { ...doc, plants: [{ ...doc.plants[0], ...changes }, doc.plants[1]] };
}
