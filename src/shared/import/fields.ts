/**
 * The spreadsheet columns Sympodia knows, and the guesser that maps a grower's header row to
 * them. The field names double as the headers of the export's flat `records.csv`, so an
 * exported file maps itself on re-import.
 */

export const IMPORT_FIELDS = [
  'tag',
  'genus',
  'epithet',
  'clonal_name',
  'lead',
  'season',
  'date',
  'height_mm',
  'leaves',
  'sheath',
  'root_tips',
  'buds_seen',
  'first_open',
  'last_faded',
  'flowers',
  'spikes',
] as const;
export type ImportField = (typeof IMPORT_FIELDS)[number];

/** Fields without which no row can be placed: the plant and its lead. */
export const REQUIRED_FIELDS: ReadonlyArray<ImportField> = ['tag', 'lead'];

/** How each field is named on the Import screen. */
export const FIELD_LABELS: Record<ImportField, string> = {
  tag: 'Plant tag',
  genus: 'Genus',
  epithet: 'Grex or species',
  clonal_name: 'Clonal name',
  lead: 'Lead label',
  season: 'Season',
  date: 'Date measured',
  height_mm: 'Height',
  leaves: 'Leaf count',
  sheath: 'Sheath state',
  root_tips: 'Root tips',
  buds_seen: 'Buds seen',
  first_open: 'First flower open',
  last_faded: 'Last flower faded',
  flowers: 'Flower count',
  spikes: 'Spike count',
};

export type LengthUnit = 'mm' | 'cm' | 'in';
export const LENGTH_UNITS: ReadonlyArray<LengthUnit> = ['mm', 'cm', 'in'];

/** Our field → the spreadsheet's column header, as written in the file. */
export type ColumnMapping = Partial<Record<ImportField, string>>;

/** Header words that name a length unit (after normalisation). */
const UNIT_WORDS: Record<string, LengthUnit> = {
  mm: 'mm',
  millimetre: 'mm',
  millimetres: 'mm',
  millimeter: 'mm',
  millimeters: 'mm',
  cm: 'cm',
  centimetre: 'cm',
  centimetres: 'cm',
  centimeter: 'cm',
  centimeters: 'cm',
  in: 'in',
  inch: 'in',
  inches: 'in',
};

/**
 * A header as the guesser compares it: no byte-order mark or accents, lower case, punctuation
 * and underscores as single spaces ("Root_Tips (new)" → "root tips new"). An inch mark (")
 * becomes the word "in".
 */
export function normaliseHeader(header: string): string {
  return header
    .replace(/^\uFEFF/, '')
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/["″]/g, ' in ')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, ' ')
    .trim();
}

/**
 * Splits a header into its name and the length unit it states, if any: "Height (cm)",
 * "height_mm", "Height in inches", 'Height (")' → height with cm, mm, in, in. A unit word
 * only counts at the end, so "inches grown" is not a unit.
 */
export function splitHeaderUnit(header: string): { base: string; unit: LengthUnit | null } {
  const words = normaliseHeader(header).split(' ').filter(Boolean);
  if (words.length < 2) return { base: words.join(' '), unit: null };
  const unit = UNIT_WORDS[words[words.length - 1]];
  if (!unit) return { base: words.join(' '), unit: null };
  words.pop();
  // "height in cm": the "in" before a unit is the preposition.
  if (words.length > 1 && words[words.length - 1] === 'in') words.pop();
  return { base: words.join(' '), unit };
}

/** Names growers give each column, normalised, without units. The first listed is ours. */
const SYNONYMS: Record<ImportField, string[]> = {
  tag: ['tag', 'plant tag', 'tag no', 'tag number', 'tag code', 'plant', 'plant id', 'plant code', 'plant no', 'plant number', 'label code', 'code'],
  genus: ['genus', 'gen', 'genus abbreviation'],
  epithet: ['epithet', 'grex or species', 'grex species', 'species or grex', 'grex', 'species', 'hybrid', 'grex name', 'species name'],
  clonal_name: ['clonal name', 'clonal', 'clone', 'clone name', 'cultivar'],
  lead: ['lead', 'lead label', 'lead name', 'lead id', 'lead code', 'growth', 'new growth', 'growth label'],
  season: ['season', 'growth year', 'growing season', 'season year', 'year'],
  date: ['date', 'measured', 'measured on', 'date measured', 'measurement date', 'measuring date', 'recorded on', 'date recorded', 'day'],
  height_mm: ['height', 'bulb height', 'pseudobulb height', 'pseudobulb', 'pb height', 'lead height', 'growth height', 'length'],
  leaves: ['leaves', 'leaf count', 'leaf', 'number of leaves', 'no of leaves', 'leaves count'],
  sheath: ['sheath', 'sheath state', 'sheath status', 'sheath stage'],
  root_tips: ['root tips', 'roots', 'new roots', 'new root tips', 'root tip', 'root tip count'],
  buds_seen: ['buds seen', 'buds', 'buds first seen', 'buds visible', 'bud date', 'buds seen on', 'budded on'],
  first_open: ['first open', 'first opened', 'first flower', 'first flower open', 'first open on', 'opened', 'open date', 'bloom start', 'flowering start'],
  last_faded: ['last faded', 'last flower faded', 'faded', 'faded on', 'last faded on', 'bloom end', 'flowering end'],
  flowers: ['flowers', 'flower count', 'number of flowers', 'no of flowers', 'blooms'],
  spikes: ['spikes', 'spike count', 'number of spikes', 'no of spikes', 'inflorescences'],
};

const SYNONYM_INDEX = new Map<string, { field: ImportField; rank: number }>();
for (const field of IMPORT_FIELDS) {
  SYNONYMS[field].forEach((name, rank) => {
    if (!SYNONYM_INDEX.has(name)) SYNONYM_INDEX.set(name, { field, rank });
  });
}

/** The field a single header names, or null. "Height (cm)" → height_mm; "Lead label" → lead. */
export function fieldForHeader(header: string): ImportField | null {
  const whole = normaliseHeader(header);
  // Our own names ("height_mm", "clonal_name") first, as the export writes them.
  const own = IMPORT_FIELDS.find((f) => f.replace(/_/g, ' ') === whole);
  if (own) return own;
  const { base, unit } = splitHeaderUnit(header);
  const hit = SYNONYM_INDEX.get(base) ?? SYNONYM_INDEX.get(whole);
  if (!hit) return null;
  // A unit only makes sense on the height column.
  if (unit && hit.field !== 'height_mm') return SYNONYM_INDEX.get(whole)?.field ?? null;
  return hit.field;
}

/**
 * Guesses which column holds each field from the header names alone. Each column serves one
 * field and each field one column; when two columns name the same field, the closer name wins
 * (an exact field name, then the order of SYNONYMS), then the leftmost. Blank headers are skipped.
 */
export function guessMapping(headers: ReadonlyArray<string>): ColumnMapping {
  const best = new Map<ImportField, { header: string; score: number }>();
  headers.forEach((header, index) => {
    if (!header.trim()) return;
    const field = fieldForHeader(header);
    if (!field) return;
    const whole = normaliseHeader(header);
    const exact = field.replace(/_/g, ' ') === whole;
    const rank = SYNONYM_INDEX.get(splitHeaderUnit(header).base)?.rank ?? SYNONYMS[field].length;
    const score = (exact ? 0 : 1 + rank) * 1000 + index;
    const current = best.get(field);
    if (!current || score < current.score) best.set(field, { header, score });
  });
  const mapping: ColumnMapping = {};
  for (const field of IMPORT_FIELDS) {
    const hit = best.get(field);
    if (hit) mapping[field] = hit.header;
  }
  return mapping;
}

/** The header row as one string, for remembering a mapping: normalised names in order. */
export function headerSignature(headers: ReadonlyArray<string>): string {
  return headers.map(normaliseHeader).join('\u001f');
}
