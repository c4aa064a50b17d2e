import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { escapeFormula, exportFileName, slugify, toCsv, UTF8_BOM } from '../../../server/services/export';

// The characters are OWASP's list for CSV injection: =, +, -, @, tab (0x09), carriage return (0x0D).
describe('escapeFormula', () => {
  it.each([
    ['=HYPERLINK("http://evil.example/","click")', `'=HYPERLINK("http://evil.example/","click")`],
    ['+1', "'+1"],
    ['-2+3', "'-2+3"],
    ['@SUM(A1:A2)', "'@SUM(A1:A2)"],
    ['\tcmd', "'\tcmd"],
    ['\r=1+1', "'\r=1+1"],
    // A formula on the first line of a note with more lines is still caught.
    ['=1+1\nsecond line', "'=1+1\nsecond line"],
    // Full-width forms, which some spreadsheet programs treat as formulas too.
    ['＝HYPERLINK("http://evil.example/")', `'＝HYPERLINK("http://evil.example/")`],
    ['＋1', "'＋1"],
    ['－2', "'－2"],
    ['＠SUM(A1)', "'＠SUM(A1)"],
  ])('puts a single quote before %j', (input, expected) => {
    expect(escapeFormula(input)).toBe(expected);
  });

  it.each(['plain note', '', 'a=b', 'C. Quiet Meadow', "'already quoted", ' =not first', '2026-A', '12 leaves'])('leaves %j as it is', (input) => {
    expect(escapeFormula(input)).toBe(input);
  });
});

describe('toCsv', () => {
  const columns = ['tag', 'height_mm', 'min_night_temp_c', 'note', 'indoors', 'missing'];

  it('starts with a UTF-8 byte-order mark, quotes text cells, and ends rows with CRLF', () => {
    const csv = toCsv(columns, [{ tag: 'A-1', height_mm: 41.5, min_night_temp_c: -2, note: 'says "hello", twice', indoors: false, missing: null }]);
    expect(csv.startsWith(UTF8_BOM)).toBe(true);
    expect(csv).toBe(`${UTF8_BOM}"tag","height_mm","min_night_temp_c","note","indoors","missing"\r\n"A-1",41.5,-2,"says ""hello"", twice",false,\r\n`);
  });

  it('writes numbers as numbers: a negative one is data, not escaped and not quoted', () => {
    const csv = toCsv(['a', 'b', 'c'], [{ a: -2, b: -0.5, c: 0 }]);
    expect(csv.split('\r\n')[1]).toBe('-2,-0.5,0');
  });

  it('escapes formula-like text, and a spreadsheet import reads back the escaped text unchanged', () => {
    const notes = ['=HYPERLINK("http://evil.example/","x")', '＝1+1', '+1', '-2+3', '@SUM(A1)', '\tcmd', '\r=1', '=1\nline two', 'plain, with a comma'];
    const csv = toCsv(['note', 'height_mm'], notes.map((note, i) => ({ note, height_mm: -i })));
    const parsed = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual(['note', 'height_mm']);
    expect(parsed.data.map((r) => r.note)).toEqual(notes.map((n) => (/^[=+\-@\t\r＝＋－＠]/.test(n) ? `'${n}` : n)));
    expect(parsed.data.map((r) => r.height_mm)).toEqual(notes.map((_, i) => String(-i)));
  });

  it('keeps a header row for an empty table', () => {
    expect(toCsv(['id', 'name'], [])).toBe(`${UTF8_BOM}"id","name"\r\n`);
  });
});

describe('export file names', () => {
  const now = new Date('2026-12-02T10:00:00Z');
  it.each([
    ['Saltmarsh Lane shade house', 'sympodia-saltmarsh-lane-shade-house-2026-12-02.zip'],
    ['Café "Orquídeas" / bench #2', 'sympodia-cafe-orquideas-bench-2-2026-12-02.zip'],
    ['../../etc/passwd', 'sympodia-etc-passwd-2026-12-02.zip'],
    ['蘭', 'sympodia-collection-2026-12-02.zip'],
  ])('%j → %s', (name, expected) => {
    expect(exportFileName(name, now, 'zip')).toBe(expected);
  });

  it('keeps a slug to 60 characters without a dangling dash', () => {
    const slug = slugify(`${'a'.repeat(59)} bench`);
    expect(slug).toBe('a'.repeat(59));
  });
});
