import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { brotliCompressSync, gzipSync } from 'node:zlib';
import { and, eq, sql } from 'drizzle-orm';
import iconv from 'iconv-lite';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bloomRecords, importMappings, leads, measurements, plants } from '../../db/schema';
import { IMPORT_MAX_BYTES } from '@/shared/schemas/imports';
import { insertLead, insertMeasurement, insertPlant } from '../factories/records';
import { testDb } from './support/database';
import { collectionWorld, expectRefused } from './support/records';
import { startTestServer, type TestServer } from './support/server';

let server: TestServer;
beforeAll(async () => {
  // Two heavy-job slots: the test of one file sent twice at once is about the advisory lock, which
  // is what keeps two server processes (one slot each) apart.
  server = await startTestServer({ heavyJobSlots: 2 });
});
afterAll(async () => {
  await server.close();
});

type World = Awaited<ReturnType<typeof collectionWorld>>;
type Who = 'owner' | 'grower' | 'viewer' | 'outsider';

const fixture = (name: string) => readFileSync(join(__dirname, '..', 'fixtures', 'import', name), 'utf8');

/** The file as the Import screen sends it: the raw CSV body, the options as JSON in the query. */
function send(w: World, who: Who, path: string, csv: string, options?: object, collection = w.collectionId) {
  let req = supertest(server.url)
    .post(`/api/collections/${collection}/imports${path}`)
    .set('Origin', server.url)
    .set('Cookie', w.people[who].cookie)
    .set('Content-Type', 'text/csv');
  if (options) req = req.query({ options: JSON.stringify(options) });
  return req
    .buffer(true)
    .parse((res, done) => {
      let text = '';
      res.setEncoding('utf8');
      res.on('data', (part: string) => (text += part));
      res.on('end', () => done(null, text));
    })
    .send(csv)
    .then((res) => {
      const text = res.body as string;
      const type = String(res.headers['content-type'] ?? '');
      const lines = type.includes('ndjson') ? text.trim().split('\n').map((l) => JSON.parse(l)) : [];
      return Object.assign(res, { body: type.includes('json') && !type.includes('ndjson') ? JSON.parse(text) : text, lines });
    });
}
const check = (w: World, who: Who, csv: string, options?: object) => send(w, who, '/check', csv, options);
const run = (w: World, who: Who, csv: string, options?: object) => send(w, who, '', csv, options);

async function counts(collectionId: string) {
  const db = testDb();
  const count = async (table: typeof plants | typeof leads | typeof measurements | typeof bloomRecords) =>
    (await db.select({ n: sql<number>`count(*)::int` }).from(table).where(eq(table.collectionId, collectionId)))[0].n;
  return { plants: await count(plants), leads: await count(leads), measurements: await count(measurements), blooms: await count(bloomRecords) };
}

describe('the messy sample spreadsheet', () => {
  it('gets its exact report row by row in the dry run, and the import refuses it, writing nothing', async () => {
    const w = await collectionWorld(server);
    const res = await check(w, 'grower', fixture('messy.csv'));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.ready).toBe(false);
    expect(res.body.issues).toEqual([
      { row: 4, column: 'Sheath', reason: '"open" is not a sheath state; use none, forming, empty, budded or dry' },
      { row: 7, column: 'Date', reason: 'Row 6 already has lead 2024-B of SYM-002 on 2024-04-02' },
      { row: 10, column: 'Date', reason: '"2024-13-02" is not a real date' },
      { row: 12, column: 'Grex / Species', reason: 'Plant SYM-004 is new: enter its grex or species' },
      { row: 12, column: 'Height (cm)', reason: '3000 mm is above 1500 mm, which is not plausible' },
    ]);
    expect(res.body.issueCount).toBe(5);
    expect(res.body.mapping).toMatchObject({ tag: 'Plant Tag', height_mm: 'Height (cm)', root_tips: 'New roots' });
    expect(res.body.heightUnit).toEqual({ fromHeader: 'cm', used: 'cm', needed: false });

    const refused = await run(w, 'grower', fixture('messy.csv'));
    expectRefused(refused, 400, 'rows.4.Sheath', /not a sheath state/);
    expect(refused.body.error.details).toHaveLength(5);
    expect(await counts(w.collectionId)).toEqual({ plants: 0, leads: 0, measurements: 0, blooms: 0 });
  });
});

describe('the fixed spreadsheet', () => {
  it('previews, imports exactly once with progress, and a second import adds nothing', async () => {
    const w = await collectionWorld(server);
    const dry = await check(w, 'grower', fixture('fixed.csv'));
    expect(dry.status, JSON.stringify(dry.body)).toBe(200);
    expect(dry.body).toMatchObject({ ready: true, issues: [], dateOrder: { detected: 'dmy', used: 'dmy', needed: false } });
    expect(dry.body.preview[1]).toMatchObject({ row: 3, tag: 'SYM-001', date: '2024-04-12', heightMm: 62, sheath: 'forming', measurement: 'new' });
    expect(await counts(w.collectionId)).toEqual({ plants: 0, leads: 0, measurements: 0, blooms: 0 });

    const first = await run(w, 'grower', fixture('fixed.csv'));
    expect(first.status, JSON.stringify(first.body)).toBe(200);
    expect(first.lines[0]).toEqual({ phase: 'writing', done: 0, total: 4 + 4 + 8 + 2 });
    expect(first.lines.at(-2)).toEqual({ phase: 'writing', done: 18, total: 18 });
    expect(first.lines.at(-1)).toMatchObject({ phase: 'done', counts: { plants: { added: 4 }, leads: { added: 4 }, measurements: { added: 8, already: 0 }, blooms: { added: 2 } } });
    expect(await counts(w.collectionId)).toEqual({ plants: 4, leads: 4, measurements: 8, blooms: 2 });

    const [stored] = await testDb()
      .select({ heightMm: measurements.heightMm, sheath: measurements.sheath, createdBy: measurements.createdBy })
      .from(measurements)
      .innerJoin(leads, eq(leads.id, measurements.leadId))
      .innerJoin(plants, eq(plants.id, leads.plantId))
      .where(and(eq(plants.collectionId, w.collectionId), eq(plants.tag, 'SYM-002'), eq(measurements.measuredOn, '2024-04-30')));
    // 3 in × 25.4 mm (the inch of the 1959 international agreement).
    expect(stored).toEqual({ heightMm: 76.2, sheath: 'budded', createdBy: w.people.grower.id });

    const again = await run(w, 'owner', fixture('fixed.csv'));
    expect(again.status, JSON.stringify(again.body)).toBe(200);
    expect(again.lines.at(-1)).toEqual({
      phase: 'done',
      counts: {
        rows: 8,
        blankRows: 2,
        plants: { added: 0, matched: 4 },
        leads: { added: 0, matched: 4 },
        measurements: { added: 0, already: 8, filled: 0 },
        blooms: { added: 0, filled: 0, already: 2 },
      },
    });
    expect(await counts(w.collectionId)).toEqual({ plants: 4, leads: 4, measurements: 8, blooms: 2 });
  });

  it('writes a file sent twice at the same moment once: the second waits and finds it all there', async () => {
    const w = await collectionWorld(server);
    const [a, b] = await Promise.all([run(w, 'grower', fixture('fixed.csv')), run(w, 'owner', fixture('fixed.csv'))]);
    const added = [a, b].map((r) => r.lines.at(-1)?.counts?.measurements?.added).sort();
    expect(added).toEqual([0, 8]);
    expect(await counts(w.collectionId)).toEqual({ plants: 4, leads: 4, measurements: 8, blooms: 2 });
  });

  it('reports a stored measurement that differs instead of overwriting it', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId, { tag: 'SYM-001', genus: 'C.', epithet: 'Hilltop Ember', clonalName: 'Dune' });
    const lead = await insertLead(testDb(), plant, { label: '2024-A', season: 2024, firstSeen: '2024-03-20' });
    await insertMeasurement(testDb(), lead, { measuredOn: '2024-03-25', heightMm: 41, leafCount: 2, rootTips: 3, sheath: 'none' });
    const res = await check(w, 'grower', fixture('fixed.csv'));
    expect(res.body.issues).toEqual([
      { row: 2, column: 'Height (cm)', reason: 'Stored as 41 mm for lead 2024-A of SYM-001 on 2024-03-25; the file says 45 mm. Correct one of them' },
    ]);
    expectRefused(await run(w, 'grower', fixture('fixed.csv')), 400, 'rows.2.Height (cm)');
    expect(await counts(w.collectionId)).toMatchObject({ plants: 1, measurements: 1 });
  });

  it('refuses rows for a read-only history copy: nothing filled, nothing added', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId, { tag: 'HIST-1', genus: 'C.', epithet: 'Stored Grex', historyOnly: true });
    const lead = await insertLead(testDb(), plant, { label: '2024-A', season: 2024, firstSeen: '2024-03-20' });
    const stored = await insertMeasurement(testDb(), lead, { measuredOn: '2024-03-25', heightMm: 41, leafCount: null, sheath: 'none' });
    const csv = 'tag,lead,date,height_mm,leaves\nHIST-1,2024-A,2024-03-25,41,3\nHIST-1,2024-A,2024-04-10,50,3\n';
    const checked = await check(w, 'grower', csv);
    expect(checked.body.issues.map((i: { row: number; column: string }) => [i.row, i.column])).toEqual([
      [2, 'tag'],
      [3, 'tag'],
    ]);
    expectRefused(await run(w, 'grower', csv), 400, 'rows.2.tag');
    const [row] = await testDb().select().from(measurements).where(eq(measurements.id, stored.id));
    expect(row).toMatchObject({ leafCount: null, version: stored.version });
    expect(await counts(w.collectionId)).toMatchObject({ measurements: 1 });
  });

  it('fills a stored measurement’s empty leaf count and root tips, in place, with its version raised', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId, { tag: 'FILL-1', genus: 'C.', epithet: 'Stored Grex' });
    const lead = await insertLead(testDb(), plant, { label: '2024-A', season: 2024, firstSeen: '2024-03-20' });
    const stored = await insertMeasurement(testDb(), lead, { measuredOn: '2024-03-25', heightMm: 41, leafCount: null, rootTips: null, sheath: 'none' });
    const csv = 'tag,lead,date,height_mm,leaves,root_tips\nFILL-1,2024-A,2024-03-25,41,3,5\n';

    const checked = await check(w, 'grower', csv);
    expect(checked.body.issues).toEqual([]);
    expect(checked.body.counts.measurements).toEqual({ added: 0, already: 0, filled: 1 });
    const done = await run(w, 'grower', csv);
    expect(done.lines.at(-1)).toMatchObject({ phase: 'done', counts: { measurements: { added: 0, already: 0, filled: 1 } } });
    const [row] = await testDb().select().from(measurements).where(eq(measurements.id, stored.id));
    expect(row).toMatchObject({ heightMm: 41, leafCount: 3, rootTips: 5, sheath: 'none', version: stored.version + 1 });
    expect(await counts(w.collectionId)).toMatchObject({ measurements: 1 });

    // Sent again, the counts are there: nothing more to fill.
    const again = await run(w, 'grower', csv);
    expect(again.lines.at(-1)).toMatchObject({ phase: 'done', counts: { measurements: { added: 0, already: 1, filled: 0 } } });
  });
});

describe('mapping', () => {
  it('guesses from the header names, then remembers what the last import used', async () => {
    const w = await collectionWorld(server);
    const headers = ['Tag', 'Lead', 'When', 'Height'];
    const guessed = await supertest(server.url)
      .post(w.at('/imports/mapping'))
      .set('Origin', server.url)
      .set('Cookie', w.people.grower.cookie)
      .send({ headers });
    expect(guessed.status).toBe(200);
    expect(guessed.body).toEqual({ mapping: { tag: 'Tag', lead: 'Lead', height_mm: 'Height' }, source: 'guessed', dateOrder: null, heightUnit: null });

    const csv = 'Tag,Lead,When,Height,Genus,Epithet\nM-1,1,03/04/2024,4,C.,Grex\n';
    const mapping = { tag: 'Tag', lead: 'Lead', date: 'When', height_mm: 'Height', genus: 'Genus', epithet: 'Epithet' };
    const undecided = await check(w, 'grower', csv, { mapping });
    expect(undecided.body).toMatchObject({ ready: false, dateOrder: { needed: true }, heightUnit: { needed: true } });
    expectRefused(await run(w, 'grower', csv, { mapping }), 400, 'dateOrder');
    const done = await run(w, 'grower', csv, { mapping, dateOrder: 'mdy', heightUnit: 'in' });
    expect(done.lines.at(-1)).toMatchObject({ phase: 'done' });
    const [m] = await testDb().select({ on: measurements.measuredOn, mm: measurements.heightMm }).from(measurements).where(eq(measurements.collectionId, w.collectionId));
    expect(m).toEqual({ on: '2024-03-04', mm: 101.6 });

    const remembered = await supertest(server.url)
      .post(w.at('/imports/mapping'))
      .set('Origin', server.url)
      .set('Cookie', w.people.owner.cookie)
      .send({ headers: ['tag', 'LEAD', 'when', 'height', 'genus', 'epithet'] });
    expect(remembered.body).toEqual({
      mapping: { tag: 'tag', lead: 'LEAD', date: 'when', height_mm: 'height', genus: 'genus', epithet: 'epithet' },
      source: 'remembered',
      dateOrder: 'mdy',
      heightUnit: 'in',
    });
    expect(await testDb().select().from(importMappings).where(eq(importMappings.collectionId, w.collectionId))).toHaveLength(1);
  });

  it('refuses a mapping without the tag, naming the field', async () => {
    const w = await collectionWorld(server);
    expectRefused(await check(w, 'grower', 'Tag,Lead\nA,1\n', { mapping: { lead: 'Lead' } }), 400, 'mapping.tag', /plant tag/);
    expectRefused(await check(w, 'grower', 'Tag,Lead\nA,1\n', { mapping: { tag: 'Nope', lead: 'Lead' } }), 400, 'mapping.tag', /no column "Nope"/);
  });
});

describe('refusals', () => {
  it('gives viewers 403 and another collection 404, and writes nothing', async () => {
    const w = await collectionWorld(server);
    expectRefused(await run(w, 'viewer', fixture('fixed.csv')), 403);
    expectRefused(await check(w, 'viewer', fixture('fixed.csv')), 403);
    expectRefused(await send(w, 'grower', '', fixture('fixed.csv'), undefined, w.otherCollectionId), 404);
    expect(await counts(w.collectionId)).toEqual({ plants: 0, leads: 0, measurements: 0, blooms: 0 });
  });

  it('refuses an empty file, a JSON body, bad options and a file over the size limit', async () => {
    const w = await collectionWorld(server);
    expectRefused(await check(w, 'grower', ''), 400, 'file', /no header row/);
    expectRefused(await check(w, 'grower', 'Tag,Lead\n'), 400, 'file');
    expectRefused(await check(w, 'grower', fixture('fixed.csv'), { dateOrder: 'ymd' }), 400, 'query.options.dateOrder');
    const json = await supertest(server.url).post(w.at('/imports/check')).set('Origin', server.url).set('Cookie', w.people.grower.cookie).send({ tag: 'A' });
    expectRefused(json, 415, 'file');
    const big = `tag,lead\n${'A-1,1\n'.repeat(Math.ceil(IMPORT_MAX_BYTES / 6) + 10)}`;
    expectRefused(await check(w, 'grower', big), 413, 'file', /larger than 20 MB/);
  });

  it('reads a gzip- or brotli-compressed upload as the file inside, refuses a broken one (400) and a compressed bomb past the limit (413)', async () => {
    const w = await collectionWorld(server);
    const post = (body: Buffer, encoding: string) =>
      supertest(server.url)
        .post(w.at('/imports/check'))
        .set('Origin', server.url)
        .set('Cookie', w.people.grower.cookie)
        .set('Content-Type', 'text/csv')
        .set('Content-Encoding', encoding)
        .send(body);
    const plain = await check(w, 'grower', fixture('fixed.csv'));
    expect(plain.status).toBe(200);
    for (const [encoding, body] of [['gzip', gzipSync(fixture('fixed.csv'))], ['br', brotliCompressSync(fixture('fixed.csv'))]] as const) {
      const res = await post(body, encoding);
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      expect(res.body.counts).toEqual(plain.body.counts);
    }
    expectRefused(await post(Buffer.from('Plant Tag,Genus\n'), 'gzip'), 400, 'body', /not valid gzip/);
    expectRefused(await post(Buffer.from('Plant Tag,Genus\n'), 'compress'), 415, 'body');
    // 25 MB of rows in a few kB: counted as it inflates, not by the compressed length.
    const line = `A-1,${'1'.repeat(4000)}\n`;
    const bomb = gzipSync(`tag,lead\n${line.repeat(Math.ceil((25 * 1024 * 1024) / line.length))}`);
    expect(bomb.length).toBeLessThan(200_000);
    expectRefused(await post(bomb, 'gzip'), 413, 'file', /larger than 20 MB/);
    expect(await counts(w.collectionId)).toEqual({ plants: 0, leads: 0, measurements: 0, blooms: 0 });
  });
});

describe('file encodings', () => {
  // The text a grower typed, with the accents spreadsheet programs keep in every encoding here.
  const EPITHET = 'Señorita Müller';
  const CLONE = 'Élan d’été';
  const text = (rowsBefore = 0) =>
    `Plant Tag,Genus,Grex / Species,Clone,Lead,Date,Height (mm),Note\r\n` +
    Array.from({ length: rowsBefore }, (_, i) => `PAD-${i},C.,Plain Name,,L-1,2024-03-25,40,${'x'.repeat(60)}\r\n`).join('') +
    `ENC-1,C.,${EPITHET},${CLONE},L-1,2024-03-25,45,naïve €5\r\n`;

  const sendBytes = (w: World, path: string, body: Buffer, options?: object) => {
    let req = supertest(server.url).post(w.at(`/imports${path}`)).set('Origin', server.url).set('Cookie', w.people.grower.cookie).set('Content-Type', 'text/csv');
    if (options) req = req.query({ options: JSON.stringify(options) });
    return req.send(body);
  };
  const utf16be = (t: string) => Buffer.from(t, 'utf16le').swap16();

  it.each([
    ['utf-8', 'no mark', () => Buffer.from(text(), 'utf8')],
    ['utf-8', 'a byte-order mark', () => Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(text(), 'utf8')])],
    ['windows-1252', 'no mark', () => iconv.encode(text(), 'windows-1252')],
    ['utf-16le', 'a byte-order mark', () => Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text(), 'utf16le')])],
    ['utf-16be', 'a byte-order mark', () => Buffer.concat([Buffer.from([0xfe, 0xff]), utf16be(text())])],
    // 200 kB of plain ASCII rows first: the first byte that is not UTF-8 arrives chunks later.
    ['windows-1252', '3,000 ASCII rows first', () => iconv.encode(text(3000), 'windows-1252')],
  ])('reads a file saved as %s (%s), says so, previews and stores the real accents', async (encoding, how, bytes) => {
    const w = await collectionWorld(server);
    const body = bytes();
    const dry = await sendBytes(w, '/check', body);
    expect(dry.status, JSON.stringify(dry.body)).toBe(200);
    expect(dry.body.encoding).toBe(encoding);
    expect(dry.body.headers[0]).toBe('Plant Tag');
    expect(dry.body.ready).toBe(true);
    // The preview shows the first rows only: the padded file's accented row is further on.
    const previewed = (dry.body.preview as { tag: string; name: string }[]).find((p) => p.tag === (how.includes('ASCII rows') ? 'PAD-0' : 'ENC-1'));
    expect(previewed?.name).toBe(how.includes('ASCII rows') ? 'C. Plain Name' : `C. ${EPITHET} '${CLONE}'`);
    const done = await sendBytes(w, '', body);
    expect(done.status, done.text).toBe(200);
    const [plant] = await testDb().select({ epithet: plants.epithet, clonalName: plants.clonalName }).from(plants).where(and(eq(plants.collectionId, w.collectionId), eq(plants.tag, 'ENC-1')));
    expect(plant).toEqual({ epithet: EPITHET, clonalName: CLONE });
  });

  it('keeps a UTF-8 character whole when the upload splits it between chunks', async () => {
    const w = await collectionWorld(server);
    // 3-byte characters throughout 300 kB, so some fall across the socket's chunk boundaries.
    const long = 'ꝏ'.repeat(100);
    const csv = `Plant Tag,Genus,Grex / Species,Lead,Date,Height (mm)\r\n${Array.from({ length: 1000 }, (_, i) => `U-${i},C.,${long},L-1,2024-03-25,40\r\n`).join('')}`;
    const dry = await sendBytes(w, '/check', Buffer.from(csv, 'utf8'));
    expect(dry.status, JSON.stringify(dry.body).slice(0, 300)).toBe(200);
    expect(dry.body.encoding).toBe('utf-8');
    expect(dry.body.issueCount).toBe(0);
    expect(dry.body.preview.every((p: { name: string }) => p.name === `C. ${long}`)).toBe(true);
  });

  it('refuses a file that mixes UTF-8 with another encoding (400), writing nothing', async () => {
    const w = await collectionWorld(server);
    const mixed = Buffer.concat([Buffer.from(text(), 'utf8'), iconv.encode('ENC-2,C.,Café,,L-1,2024-03-25,45,x\r\n', 'windows-1252')]);
    expectRefused(await sendBytes(w, '/check', mixed), 400, 'file', /mixes UTF-8 with another encoding/);
    expectRefused(await sendBytes(w, '', mixed), 400, 'file', /mixes UTF-8/);
    expect(await counts(w.collectionId)).toEqual({ plants: 0, leads: 0, measurements: 0, blooms: 0 });
  });
});

describe('a large file', () => {
  it('imports 50,000 rows in one go with memory bounded', async () => {
    const w = await collectionWorld(server);
    // 2,500 plants × 2 leads × 10 measurements, each lead with a bloom record on its last row.
    const lines = ['tag,genus,epithet,lead,date,height_mm,leaves,sheath,first_open,flowers'];
    for (let p = 0; p < 2500; p++) {
      for (let l = 0; l < 2; l++) {
        for (let m = 0; m < 10; m++) {
          const date = `2024-${String(3 + m).padStart(2, '0')}-${String(1 + l * 10 + (p % 9)).padStart(2, '0')}`;
          const last = m === 9;
          lines.push(`BIG-${p},Den.,Generated ${p % 37},2024-${'AB'[l]},${date},${10 + m * 8 + (p % 5)},${1 + (m >> 2)},${last ? 'budded' : 'none'},${last ? '2025-01-15' : ''},${last ? 4 : ''}`);
        }
      }
    }
    const csv = `${lines.join('\n')}\n`;
    lines.length = 0;
    const heapBefore = process.memoryUsage().heapUsed;
    let heapPeak = heapBefore;
    const sampler = setInterval(() => (heapPeak = Math.max(heapPeak, process.memoryUsage().heapUsed)), 25);
    try {
      const res = await run(w, 'grower', csv);
      expect(res.status, JSON.stringify(res.body).slice(0, 500)).toBe(200);
      expect(res.lines.at(-1)).toMatchObject({ phase: 'done', counts: { rows: 50_000, plants: { added: 2500 }, leads: { added: 5000 }, measurements: { added: 50_000 }, blooms: { added: 5000 } } });
      // Batches of 1,000 rows: many progress lines, counting up to the total.
      const writing = res.lines.filter((l) => l.phase === 'writing');
      expect(writing.length).toBeGreaterThan(60);
      expect(writing.at(-1)).toEqual({ phase: 'writing', done: 62_500, total: 62_500 });
    } finally {
      clearInterval(sampler);
    }
    const growthMb = (heapPeak - heapBefore) / 1024 / 1024;
    console.info(`50,000-row import: heap grew by at most ${growthMb.toFixed(0)} MB`);
    // Generous: the file is about 4 MB; holding it many times over would exceed this.
    expect(growthMb).toBeLessThan(250);
    expect(await counts(w.collectionId)).toEqual({ plants: 2500, leads: 5000, measurements: 50_000, blooms: 5000 });
  }, 120_000);
});
