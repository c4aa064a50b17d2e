import { describe, expect, it } from 'vitest';
import { guessMapping, headerSignature, normaliseHeader, splitHeaderUnit, fieldForHeader, IMPORT_FIELDS } from '@/shared/import/fields';
import {
  fullYear,
  MM_PER_INCH,
  noEvidence,
  parseCount,
  parseLength,
  parseSheath,
  parseSheetDate,
  resolveDateOrder,
  weighDateOrder,
} from '@/shared/import/values';

describe('header names', () => {
  it.each([
    ['  Plant_Tag ', 'plant tag'],
    ['\uFEFFTag', 'tag'],
    ['Höhe', 'hohe'],
    ['Root-Tips (new)', 'root tips new'],
    ['Height (")', 'height in'],
  ])('normalises %j to %j', (header, expected) => {
    expect(normaliseHeader(header)).toBe(expected);
  });

  it.each([
    ['Height (cm)', 'height', 'cm'],
    ['height_mm', 'height', 'mm'],
    ['Height in inches', 'height', 'in'],
    ['Height in cm', 'height', 'cm'],
    ['Height (")', 'height', 'in'],
    ['Bulb height [millimetres]', 'bulb height', 'mm'],
    ['Height', 'height', null],
    ['in', 'in', null],
  ])('splits %j into %j with unit %j', (header, base, unit) => {
    expect(splitHeaderUnit(header)).toEqual({ base, unit });
  });

  it.each([
    ['Plant Tag', 'tag'],
    ['TAG #', 'tag'],
    ['Grex / Species', 'epithet'],
    ['Clone', 'clonal_name'],
    ['Lead label', 'lead'],
    ['Growth year', 'season'],
    ['Date measured', 'date'],
    ['Pseudobulb height (cm)', 'height_mm'],
    ['No. of leaves', 'leaves'],
    ['Sheath state', 'sheath'],
    ['New roots', 'root_tips'],
    ['Buds first seen', 'buds_seen'],
    ['First flower open', 'first_open'],
    ['Bloom end', 'last_faded'],
    ['Flower count', 'flowers'],
    ['Spikes', 'spikes'],
    ['Notes', null],
    ['Leaves (cm)', null],
  ])('reads %j as %j', (header, field) => {
    expect(fieldForHeader(header)).toBe(field);
  });

  it('maps our own export headers to themselves, every one', () => {
    expect(guessMapping([...IMPORT_FIELDS])).toEqual(Object.fromEntries(IMPORT_FIELDS.map((f) => [f, f])));
  });

  it('gives each field one column: the exact name first, then the closer synonym, then the leftmost', () => {
    expect(guessMapping(['Plant', 'tag', 'Species', 'Grex', 'Height', 'Height (cm)', 'Notes', ''])).toEqual({
      tag: 'tag',
      epithet: 'Grex',
      height_mm: 'Height',
    });
  });

  it('signs the header row by normalised names in order', () => {
    expect(headerSignature(['Tag ', 'LEAD'])).toBe(headerSignature(['tag', 'Lead']));
    expect(headerSignature(['Tag', 'Lead'])).not.toBe(headerSignature(['Lead', 'Tag']));
  });
});

describe('dates', () => {
  it.each([
    ['2024-03-25', null, '2024-03-25'],
    ['2024/3/5', null, '2024-03-05'],
    ['2024-03-25 00:00:00', null, '2024-03-25'],
    ['25/03/2024', null, '2024-03-25'],
    ['03/25/2024', null, '2024-03-25'],
    ['05/05/24', null, '2024-05-05'],
    ['03/04/2024', 'dmy', '2024-04-03'],
    ['03/04/2024', 'mdy', '2024-03-04'],
    ['3.4.98', 'dmy', '1998-04-03'],
    ['29/02/2024', 'dmy', '2024-02-29'],
  ] as const)('reads %j (%s) as %s', (text, order, expected) => {
    expect(parseSheetDate(text, order, 2026)).toEqual({ ok: true, value: expected });
  });

  it.each([
    ['03/04/2024', null, /could be day\/month or month\/day/],
    ['29/02/2023', 'dmy', /not a real date/],
    ['2024-13-02', null, /"2024-13-02" is not a real date/],
    ['25/03/2024', 'mdy', /not a real date as month\/day\/year/],
    ['March 3rd', null, /is not a date/],
  ] as const)('refuses %j (%s)', (text, order, reason) => {
    const read = parseSheetDate(text, order, 2026);
    expect(read.ok).toBe(false);
    if (!read.ok) expect(read.reason).toMatch(reason);
  });

  it.each([
    [24, 2026, 2024],
    [26, 2026, 2026],
    [27, 2026, 1927],
    [98, 2026, 1998],
  ])('reads the two-digit year %i (latest %i) as %i', (yy, latest, year) => {
    expect(fullYear(yy, latest)).toBe(year);
  });

  const evidenceOf = (dates: string[]) => {
    const e = noEvidence();
    for (const d of dates) weighDateOrder(e, d);
    return e;
  };

  it.each([
    [['2024-03-25', '2024-04-01'], null, { order: null, detected: null, needsChoice: false }],
    [['25/03/2024', '03/04/2024'], null, { order: 'dmy', detected: 'dmy', needsChoice: false }],
    [['03/25/2024', '03/04/2024'], null, { order: 'mdy', detected: 'mdy', needsChoice: false }],
    [['03/04/2024', '05/06/2024'], null, { order: null, detected: null, needsChoice: true }],
    [['05/05/2024', '2024-01-02'], null, { order: null, detected: null, needsChoice: false }],
    [['25/03/2024', '03/25/2024'], null, { order: null, detected: null, needsChoice: true }],
    [['03/04/2024'], 'mdy', { order: 'mdy', detected: null, needsChoice: false }],
  ] as const)('decides the order of %j (chosen %s)', (dates, chosen, expected) => {
    expect(resolveDateOrder(evidenceOf([...dates]), chosen)).toEqual(expected);
  });
});

describe('lengths, counts and sheath states', () => {
  it('uses the exact inch: 25.4 mm (international yard and pound agreement, 1959)', () => {
    expect(MM_PER_INCH).toBe(25.4);
  });

  it.each([
    ['45', 'mm', 45],
    ['4.5', 'cm', 45],
    ['4,5', 'cm', 45],
    ['2.5', 'in', 63.5],
    ['2.1 in', null, 53.34],
    ['3"', 'cm', 76.2],
    ['72 mm', 'cm', 72],
    ['5.5cm', 'mm', 55],
    ['.5 cm', null, 5],
    ['0', 'cm', 0],
  ] as const)('reads %j with unit %s as %f mm', (text, unit, mm) => {
    expect(parseLength(text, unit)).toEqual({ ok: true, value: mm });
  });

  it('asks for the unit when neither the cell nor the column names one', () => {
    expect(parseLength('45', null)).toMatchObject({ ok: false, needsUnit: true });
  });

  it.each(['tall', '-4', '1,200', '4 ft', ''])('refuses %j as a length', (text) => {
    expect(parseLength(text, 'mm')).toMatchObject({ ok: false });
    expect(parseLength(text, 'mm')).not.toHaveProperty('needsUnit');
  });

  it.each([
    ['3', 3],
    ['3.0', 3],
    [' 30 ', 30],
  ])('reads the count %j as %i', (text, n) => {
    expect(parseCount(text, 'Leaf count', 30)).toEqual({ ok: true, value: n });
  });

  it.each([
    ['2.5', /whole number/],
    ['-1', /cannot be negative/],
    ['31', /above 30 is not plausible/],
    ['three', /whole number/],
  ])('refuses the count %j', (text, reason) => {
    const read = parseCount(text, 'Leaf count', 30);
    expect(read.ok).toBe(false);
    if (!read.ok) expect(read.reason).toMatch(reason);
  });

  it.each(['none', 'Forming', ' EMPTY ', 'budded', 'dry'])('reads the sheath %j', (text) => {
    expect(parseSheath(text)).toEqual({ ok: true, value: text.trim().toLowerCase() });
  });

  it('refuses a sheath state that is not one of the five', () => {
    expect(parseSheath('open')).toEqual({ ok: false, reason: '"open" is not a sheath state; use none, forming, empty, budded or dry' });
  });
});
