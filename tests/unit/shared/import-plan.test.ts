import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { guessMapping } from '@/shared/import/fields';
import { type ExistingRecords, ImportReader, type ImportOptions, mappingProblems, planImport, planIsReady, unescapeFormula } from '@/shared/import/plan';

const fixture = (name: string) => readFileSync(join(__dirname, '..', '..', 'fixtures', 'import', name), 'utf8');
const NOTHING: ExistingRecords = { plants: [], leads: [], measurements: [], blooms: [] };
const CONTEXT = { seasonStartMonth: 3, latestDate: '2026-12-03', today: '2026-12-02' };

function read(csv: string, options: Partial<ImportOptions> = {}) {
  const [headers, ...rows] = Papa.parse<string[]>(csv, { header: false, skipEmptyLines: false }).data;
  const mapping = options.mapping ?? guessMapping(headers);
  const reader = new ImportReader(headers, mapping);
  for (const row of rows) reader.add(row);
  return { reader, options: { ...options, mapping } };
}

function planOf(csv: string, existing = NOTHING, options: Partial<ImportOptions> = {}) {
  const { reader, options: o } = read(csv, options);
  return planImport(reader, o, existing, CONTEXT);
}

describe('the messy sample spreadsheet', () => {
  it('maps its own header names', () => {
    const { options } = read(fixture('messy.csv'));
    expect(options.mapping).toEqual({
      tag: 'Plant Tag',
      genus: 'Genus',
      epithet: 'Grex / Species',
      clonal_name: 'Clone',
      lead: 'Lead',
      date: 'Date',
      height_mm: 'Height (cm)',
      leaves: 'Leaves',
      sheath: 'Sheath',
      root_tips: 'New roots',
      buds_seen: 'Buds seen',
      first_open: 'First open',
      flowers: 'Flowers',
    });
  });

  it('reports every problem by spreadsheet row, column and reason', () => {
    const plan = planOf(fixture('messy.csv'));
    expect(plan.issues).toEqual([
      { row: 4, column: 'Sheath', reason: '"open" is not a sheath state; use none, forming, empty, budded or dry' },
      { row: 7, column: 'Date', reason: 'Row 6 already has lead 2024-B of SYM-002 on 2024-04-02' },
      { row: 10, column: 'Date', reason: '"2024-13-02" is not a real date' },
      { row: 12, column: 'Grex / Species', reason: 'Plant SYM-004 is new: enter its grex or species' },
      { row: 12, column: 'Height (cm)', reason: '3000 mm is above 1500 mm, which is not plausible' },
    ]);
    expect(planIsReady(plan)).toBe(false);
    expect(plan.counts.blankRows).toBe(2);
    expect(plan.dateOrder).toEqual({ detected: 'dmy', used: 'dmy' });
  });
});

describe('the fixed spreadsheet', () => {
  const plan = planOf(fixture('fixed.csv'));

  it('is ready, with every record new', () => {
    expect(plan.issues).toEqual([]);
    expect(planIsReady(plan)).toBe(true);
    expect(plan.counts).toEqual({
      rows: 8,
      blankRows: 2,
      plants: { added: 4, matched: 0 },
      leads: { added: 4, matched: 0 },
      measurements: { added: 8, already: 0, filled: 0 },
      blooms: { added: 2, filled: 0, already: 0 },
    });
  });

  it('converts each height by its cell unit, else the header unit (cm), 1 in = 25.4 mm', () => {
    expect(plan.measurements.map((m) => [m.measuredOn, m.heightMm])).toEqual([
      ['2024-03-25', 45],
      ['2024-04-12', 62],
      ['2024-04-25', 72],
      ['2024-04-02', 63.5],
      ['2024-04-30', 76.2],
      ['2024-04-13', 50],
      ['2024-05-20', 55],
      ['2024-06-01', 300],
    ]);
  });

  it('names new plants with quotes stripped, and dates new leads from their earliest row', () => {
    expect(plan.plants).toContainEqual({ tag: 'SYM-003', genus: 'Rlc.', epithet: 'Copper Lantern', clonalName: 'Sunny' });
    // Season starts in March: a lead first seen 2024-03-25 is of season 2024.
    expect(plan.leads).toContainEqual({ tag: 'SYM-001', label: '2024-A', season: 2024, firstSeen: '2024-03-25', status: 'mature' });
    expect(plan.blooms).toContainEqual(expect.objectContaining({ budsSeenOn: '2024-05-05', firstOpenOn: null }));
    expect(plan.preview[0]).toMatchObject({ row: 2, tag: 'SYM-001', plant: 'new', name: "C. Hilltop Ember 'Dune'", lead: '2024-A', leadStatus: 'new', season: 2024, heightMm: 45, measurement: 'new' });
  });
});

describe('against stored records', () => {
  const csv = 'tag,lead,date,height_mm,leaves,sheath,first_open,flowers\nA-1,2024-A,2024-05-01,40,2,none,2024-09-01,5\nA-1,2024-A,2024-05-08,44,2,none,,\n';
  const stored = (height: number, flowers: number | null): ExistingRecords => ({
    plants: [{ id: 'p1', tag: 'A-1', genus: 'C.', epithet: 'Stored Grex', clonalName: null, historyOnly: false }],
    leads: [{ id: 'l1', plantId: 'p1', label: '2024-A', season: 2024, firstSeen: '2024-04-01' }],
    measurements: [{ id: 'm1', leadId: 'l1', measuredOn: '2024-05-01', heightMm: height, leafCount: 2, sheath: 'none', rootTips: null }],
    blooms: [{ leadId: 'l1', budsSeenOn: null, firstOpenOn: '2024-09-01', lastFadedOn: null, flowerCount: flowers, spikeCount: null }],
  });

  it('matches the plant, the lead and an identical measurement, adds the rest, fills empty bloom fields', () => {
    const plan = planOf(csv, stored(40.000001, null));
    expect(plan.issues).toEqual([]);
    expect(plan.counts.plants).toEqual({ added: 0, matched: 1 });
    expect(plan.counts.measurements).toEqual({ added: 1, already: 1, filled: 0 });
    expect(plan.measurementFills).toEqual([]);
    expect(plan.measurements).toEqual([{ leadKey: 'l1', measuredOn: '2024-05-08', heightMm: 44, leafCount: 2, sheath: 'none', rootTips: null }]);
    expect(plan.bloomFills).toEqual([{ leadId: 'l1', flowerCount: 5 }]);
  });

  it('reports a different stored height and flower count instead of overwriting them', () => {
    const plan = planOf(csv, stored(38, 7));
    expect(plan.issues).toEqual([
      { row: 2, column: 'height_mm', reason: 'Stored as 38 mm for lead 2024-A of A-1 on 2024-05-01; the file says 40 mm. Correct one of them' },
      { row: 2, column: 'flowers', reason: 'The bloom record of lead 2024-A of A-1 has 7; the file says 5. Correct one of them' },
    ]);
  });

  it('fills a stored measurement’s empty leaf count and root tips, and reports counts that disagree', () => {
    const existing = (leafCount: number | null, rootTips: number | null): ExistingRecords => ({
      ...stored(40, null),
      measurements: [{ id: 'm1', leadId: 'l1', measuredOn: '2024-05-01', heightMm: 40, leafCount, sheath: 'none', rootTips }],
    });
    const file = 'tag,lead,date,height_mm,leaves,root_tips\nA-1,2024-A,2024-05-01,40,3,4\n';

    const empty = planOf(file, existing(null, null));
    expect(empty.issues).toEqual([]);
    expect(empty.measurementFills).toEqual([{ measurementId: 'm1', leafCount: 3, rootTips: 4 }]);
    expect(empty.counts.measurements).toEqual({ added: 0, already: 0, filled: 1 });
    expect(empty.preview[0].measurement).toBe('filled');

    const half = planOf(file, existing(3, null));
    expect(half.measurementFills).toEqual([{ measurementId: 'm1', rootTips: 4 }]);

    const same = planOf(file, existing(3, 4));
    expect(same.measurementFills).toEqual([]);
    expect(same.counts.measurements).toEqual({ added: 0, already: 1, filled: 0 });

    const other = planOf(file, existing(2, null));
    expect(other.issues).toEqual([{ row: 2, column: 'leaves', reason: 'Stored as 2 leaves for lead 2024-A of A-1 on 2024-05-01; the file says 3. Correct one of them' }]);
    // A row with a disagreement fills nothing, even where its other count is empty.
    expect(other.measurementFills).toEqual([]);
  });

  it('refuses every row for a read-only history copy, filling and adding nothing', () => {
    const existing: ExistingRecords = { ...stored(40, null), plants: [{ id: 'p1', tag: 'A-1', genus: 'C.', epithet: 'Stored Grex', clonalName: null, historyOnly: true }] };
    const plan = planOf(csv, existing);
    expect(plan.issues.map((i) => [i.row, i.column])).toEqual([
      [2, 'tag'],
      [3, 'tag'],
    ]);
    expect(plan.issues[0].reason).toContain('read-only copy');
    expect(planIsReady(plan)).toBe(false);
    expect(plan.measurements).toEqual([]);
    expect(plan.measurementFills).toEqual([]);
    expect(plan.bloomFills).toEqual([]);
    expect(plan.preview[0]).toMatchObject({ tag: 'A-1', plant: 'matched' });
  });

  it('refuses a measurement before the stored lead was first seen, and a different genus', () => {
    const plan = planOf('tag,genus,lead,date,height_mm\nA-1,Den.,2024-A,2024-03-01,40\n', stored(40, null));
    expect(plan.issues).toEqual([
      { row: 2, column: 'genus', reason: 'Plant A-1 is stored with C. as the genus; the file says Den.' },
      { row: 2, column: 'date', reason: '2024-03-01 is before lead 2024-A was first seen (2024-04-01)' },
    ]);
  });
});

describe('choices and row rules', () => {
  it('asks for the date order when every date reads both ways, and reads them once chosen', () => {
    const csv = 'tag,genus,epithet,lead,date,height_mm\nB-1,C.,Grex,1,03/04/2024,40\nB-1,C.,Grex,1,05/06/2024,41\n';
    const undecided = planOf(csv);
    expect(undecided.needs).toEqual({ dateOrder: true, heightUnit: false });
    expect(undecided.issues).toEqual([]);
    expect(planIsReady(undecided)).toBe(false);
    const chosen = planOf(csv, NOTHING, { dateOrder: 'mdy' });
    expect(planIsReady(chosen)).toBe(true);
    expect(chosen.measurements.map((m) => m.measuredOn)).toEqual(['2024-03-04', '2024-05-06']);
  });

  it('asks for the height unit when the header names none, and applies the choice', () => {
    const csv = 'tag,genus,epithet,lead,date,Height\nB-1,C.,Grex,1,2024-04-03,4\nB-1,C.,Grex,1,2024-04-10,2 in\n';
    expect(planOf(csv).needs.heightUnit).toBe(true);
    expect(planOf(csv, NOTHING, { heightUnit: 'cm' }).measurements.map((m) => m.heightMm)).toEqual([40, 50.8]);
  });

  it.each([
    ['tag,lead,date,height_mm\n,1,2024-04-01,4\n', [{ row: 2, column: 'tag', reason: 'Enter the plant tag' }]],
    ['tag,genus,epithet,lead,date,height_mm\nB,C.,G,1,2024-04-01,\n', [{ row: 2, column: 'height_mm', reason: 'Enter the height measured on this date' }]],
    ['tag,genus,epithet,lead,date,height_mm,leaves\nB,C.,G,1,2024-04-01,4,\nB,C.,G,1,,,3\n', [{ row: 3, column: 'date', reason: 'Enter the date these readings were taken' }]],
    ['tag,genus,epithet,lead\nB,C.,G,1\n', [{ row: 2, column: 'date', reason: 'Lead 1 of B is new: give a measurement or bloom date, so its first-seen day is known' }]],
    ['tag,genus,epithet,lead,season\nB,C.,G,1,2027\n', [{ row: 2, column: 'season', reason: 'Season 2027 has not started yet; give the lead a date' }]],
    ['tag,genus,epithet,lead,date,height_mm\nB,C.,G,1,2026-12-25,4\n', [{ row: 2, column: 'date', reason: '2026-12-25 is in the future; record what has happened, up to today' }]],
    ['tag,genus,epithet,lead,date,height_mm\nB,cattleya,G,1,2024-04-01,4\n', [{ row: 2, column: 'genus', reason: '"cattleya" is not a genus; write it or its abbreviation, e.g. C., Rlc., Den.' }, { row: 2, column: 'genus', reason: 'Plant B is new: enter its genus' }]],
    ['tag,genus,epithet,lead,season,date,height_mm\nB,C.,G,1,2024,2024-04-01,4\nB,L.,G,1,2023,2024-04-08,5\n', [
      { row: 3, column: 'genus', reason: 'Row 2 gives C. as the genus of this plant; the file says L. here' },
      { row: 3, column: 'season', reason: 'Row 2 gives 2024 as the season of this lead; the file says 2023 here' },
    ]],
  ])('reports %j', (csv, issues) => {
    expect(planOf(csv).issues).toEqual(issues);
  });

  it('takes an unmeasured lead with only its season (as the export writes one) as first seen on the season start', () => {
    const plan = planOf('tag,genus,epithet,lead,season\nB,C.,G,2025-A,2025\n');
    expect(plan.issues).toEqual([]);
    expect(plan.leads).toEqual([{ tag: 'B', label: '2025-A', season: 2025, firstSeen: '2025-03-01', status: 'mature' }]);
  });

  it('stores leads of earlier growth years as mature and this growth year\'s as growing', () => {
    // Season starts in March and the latest date is 3 Dec 2026, so growth year 2026 is current.
    const plan = planOf('tag,genus,epithet,lead,date,height_mm\nB,C.,G,2025-A,2025-04-01,40\nB,C.,G,2025-B,2026-01-10,20\nB,C.,G,2026-A,2026-04-01,35\n');
    expect(plan.issues).toEqual([]);
    expect(plan.leads.map((l) => [l.label, l.season, l.status])).toEqual([
      ['2025-A', 2025, 'mature'],
      // January 2026 is still growth year 2025 when the year starts in March.
      ['2025-B', 2025, 'mature'],
      ['2026-A', 2026, 'growing'],
    ]);
  });

  it("on a growth year's last day, its leads still come in growing (the tolerance day ahead is the next year)", () => {
    // Today 28 February 2027, the last day of growth year 2026 when the year starts in March; the
    // latest date accepted is already 1 March, a day of growth year 2027.
    const { reader, options } = read('tag,genus,epithet,lead,date,height_mm\nB,C.,G,2026-A,2026-04-01,35\nB,C.,G,2025-A,2025-04-01,40\n');
    const plan = planImport(reader, options, NOTHING, { seasonStartMonth: 3, latestDate: '2027-03-01', today: '2027-02-28' });
    expect(plan.leads.map((l) => [l.label, l.status])).toEqual([
      ['2026-A', 'growing'],
      ['2025-A', 'mature'],
    ]);
  });

  it.each([
    ["'-A1", '-A1'],
    ["'=SUM(A1)", '=SUM(A1)'],
    ["'+1", '+1'],
    ["'@x", '@x'],
    ["'＝SUM(A1)", '＝SUM(A1)'],
    ["'－A1", '－A1'],
    ["'tis", "'tis"],
    ["'", "'"],
    ['-2', '-2'],
  ])('reads the escaped cell %j back as %j', (cell, text) => {
    expect(unescapeFormula(cell)).toBe(text);
  });

  it('maps and plans a records.csv written with our own field names', () => {
    const csv = [
      'tag,genus,epithet,clonal_name,lead,season,date,height_mm,leaves,sheath,root_tips,buds_seen,first_open,last_faded,flowers,spikes',
      'E-1,Den.,Kingianum,Snow,2024-A,2024,2024-04-02,57.15,3,none,2,2024-08-01,2024-09-01,,12,2',
      'E-1,Den.,Kingianum,Snow,2024-A,2024,2024-05-02,80,4,budded,,2024-08-01,2024-09-01,,12,2',
    ].join('\n');
    const plan = planOf(csv);
    expect(plan.issues).toEqual([]);
    expect(plan.needs).toEqual({ dateOrder: false, heightUnit: false });
    expect(plan.measurements.map((m) => m.heightMm)).toEqual([57.15, 80]);
    expect(plan.blooms).toEqual([{ leadKey: 'new:E-1\u00002024-A', budsSeenOn: '2024-08-01', firstOpenOn: '2024-09-01', lastFadedOn: null, flowerCount: 12, spikeCount: 2 }]);
  });

  it('refuses a mapping that leaves out the tag or names a missing column', () => {
    expect(mappingProblems(['Tag', 'Lead'], { lead: 'Lead', date: 'When' })).toEqual([
      { field: 'tag', reason: 'Choose the column that holds the plant tag' },
      { field: 'date', reason: 'The file has no column "When"' },
    ]);
    expect(mappingProblems(['Tag', 'Lead'], { tag: 'Tag', lead: 'Tag' })).toEqual([{ field: 'lead', reason: '"Tag" is already used for plant tag' }]);
  });
});
