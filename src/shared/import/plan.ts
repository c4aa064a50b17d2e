/**
 * From spreadsheet rows to what an import will write. `ImportReader` takes the header row and
 * then the data rows one at a time, keeping only the mapped cells; `planImport` reads them
 * against what the collection already holds and answers the validation report (row, column,
 * reason) and the new and matched records. Pure: no I/O, no clock (`latestDate` is passed in),
 * no ids (new records are named by tag and lead label; the caller gives them ids).
 */
import {
  MAX_FLOWER_COUNT,
  MAX_HEIGHT_MM,
  MAX_LEAF_COUNT,
  MAX_ROOT_TIPS,
  MAX_SPIKE_COUNT,
} from '../schemas/records';
import { type ColumnMapping, FIELD_LABELS, IMPORT_FIELDS, type ImportField, type LengthUnit, REQUIRED_FIELDS, splitHeaderUnit } from './fields';
import {
  type DateOrder,
  type DateOrderEvidence,
  noEvidence,
  parseCount,
  parseLength,
  parseSheath,
  parseSheetDate,
  resolveDateOrder,
  type SheathState,
  weighDateOrder,
} from './values';

export interface ImportIssue {
  /** The row as the grower sees it in the spreadsheet: the header is row 1. */
  row: number;
  /** The spreadsheet's column header (or our field name when the field has no column). */
  column: string;
  reason: string;
}

export interface ImportOptions {
  mapping: ColumnMapping;
  /** The grower's answer when a file's dates could be day- or month-first. */
  dateOrder?: DateOrder | null;
  /** The unit of heights written without one, when the height header names none. */
  heightUnit?: LengthUnit | null;
}

const DATE_FIELDS = ['date', 'buds_seen', 'first_open', 'last_faded'] as const satisfies ReadonlyArray<ImportField>;

/** A mapping that names columns missing from the file, or leaves out a required field. */
export function mappingProblems(headers: ReadonlyArray<string>, mapping: ColumnMapping): Array<{ field: ImportField; reason: string }> {
  const problems: Array<{ field: ImportField; reason: string }> = [];
  const used = new Map<string, ImportField>();
  for (const field of IMPORT_FIELDS) {
    const column = mapping[field];
    if (column === undefined) {
      if (REQUIRED_FIELDS.includes(field)) problems.push({ field, reason: `Choose the column that holds the ${FIELD_LABELS[field].toLowerCase()}` });
      continue;
    }
    if (!headers.includes(column)) problems.push({ field, reason: `The file has no column "${column}"` });
    else if (used.has(column)) problems.push({ field, reason: `"${column}" is already used for ${FIELD_LABELS[used.get(column)!].toLowerCase()}` });
    else used.set(column, field);
  }
  return problems;
}

/**
 * Collects a file's rows as they stream in, keeping only the mapped cells (trimmed) and the
 * evidence for the date order. Blank rows are counted and dropped; row numbers still count them.
 */
/**
 * Sympodia's own export (and other careful exporters, after OWASP's CSV-injection advice) puts a
 * single quote before a text cell that starts with = + - @ tab or carriage return (or their
 * full-width forms ＝ ＋ － ＠), so a spreadsheet shows it as text. Reading such a cell back drops
 * that quote: "'-A1" is the tag "-A1".
 */
export function unescapeFormula(cell: string): string {
  return cell.length > 1 && cell[0] === "'" && '=+-@\t\r\uFF1D\uFF0B\uFF0D\uFF20'.includes(cell[1]) ? cell.slice(1) : cell;
}

export class ImportReader {
  readonly fields: ImportField[];
  private readonly indexes: number[];
  readonly rows: Array<{ row: number; cells: string[] }> = [];
  readonly evidence: DateOrderEvidence = noEvidence();
  /** Blank rows between records, skipped without a report. */
  blankRows = 0;
  private pendingBlank = 0;
  private nextRow = 2;

  constructor(
    readonly headers: ReadonlyArray<string>,
    readonly mapping: ColumnMapping,
  ) {
    this.fields = IMPORT_FIELDS.filter((f) => mapping[f] !== undefined && headers.includes(mapping[f]!));
    this.indexes = this.fields.map((f) => headers.indexOf(mapping[f]!));
  }

  /** One data row, in file order (its row number is counted here). */
  add(cells: ReadonlyArray<string>): void {
    const row = this.nextRow++;
    const kept = this.indexes.map((i) => unescapeFormula((cells[i] ?? '').trim()));
    if (kept.every((c) => c === '') && cells.every((c) => (c ?? '').trim() === '')) {
      // Counted once a record follows: the line break that ends a file is no blank row.
      this.pendingBlank += 1;
      return;
    }
    this.blankRows += this.pendingBlank;
    this.pendingBlank = 0;
    this.fields.forEach((field, i) => {
      if ((DATE_FIELDS as ReadonlyArray<string>).includes(field) && kept[i]) weighDateOrder(this.evidence, kept[i]);
    });
    this.rows.push({ row, cells: kept });
  }

  get rowCount(): number {
    return this.rows.length;
  }
}

// ── What the collection already holds ────────────────────────────────────────────────

export interface ExistingPlant {
  id: string;
  tag: string;
  genus: string;
  epithet: string;
  clonalName: string | null;
  /** A read-only copy of another grower's record, brought in with a division: it takes no records. */
  historyOnly: boolean;
}
export interface ExistingLead {
  id: string;
  plantId: string;
  label: string;
  season: number;
  firstSeen: string;
}
export interface ExistingMeasurement {
  id: string;
  leadId: string;
  measuredOn: string;
  heightMm: number;
  leafCount: number | null;
  sheath: SheathState;
  rootTips: number | null;
}
export interface ExistingBloom {
  leadId: string;
  budsSeenOn: string | null;
  firstOpenOn: string | null;
  lastFadedOn: string | null;
  flowerCount: number | null;
  spikeCount: number | null;
}
export interface ExistingRecords {
  plants: ExistingPlant[];
  leads: ExistingLead[];
  measurements: ExistingMeasurement[];
  blooms: ExistingBloom[];
}

// ── The plan ─────────────────────────────────────────────────────────────────────────

export interface PlantDraft {
  tag: string;
  genus: string;
  epithet: string;
  clonalName: string | null;
}
export interface LeadDraft {
  tag: string;
  label: string;
  season: number;
  firstSeen: string;
  /**
   * A lead of an earlier growth year than the current one has finished growing, so it is stored
   * as mature (it would otherwise read as a stalled lead on Today); this year's leads as growing.
   */
  status: 'growing' | 'mature';
}
/** `leadKey` names the lead: an existing lead's id, or `new:` + tag + NUL + label. */
export interface MeasurementDraft {
  leadKey: string;
  measuredOn: string;
  heightMm: number;
  leafCount: number | null;
  sheath: SheathState;
  rootTips: number | null;
}
export interface BloomDraft {
  leadKey: string;
  budsSeenOn: string | null;
  firstOpenOn: string | null;
  lastFadedOn: string | null;
  flowerCount: number | null;
  spikeCount: number | null;
}

export type Status = 'new' | 'matched';
export interface PreviewRow {
  row: number;
  tag: string;
  plant: Status;
  name: string;
  lead: string;
  leadStatus: Status;
  season: number | null;
  date: string | null;
  heightMm: number | null;
  leafCount: number | null;
  sheath: SheathState | null;
  rootTips: number | null;
  /** What happens to the row's measurement: added, already there, or none on this row. */
  measurement: 'new' | 'already' | 'filled' | 'none';
}

export interface ImportCounts {
  rows: number;
  blankRows: number;
  plants: { added: number; matched: number };
  leads: { added: number; matched: number };
  /** `filled`: stored measurements whose empty leaf count or root tips the file supplies. */
  measurements: { added: number; already: number; filled: number };
  blooms: { added: number; filled: number; already: number };
}

export interface ImportPlan {
  issues: ImportIssue[];
  /** Choices the grower must make before the file can be read in full. */
  needs: { dateOrder: boolean; heightUnit: boolean };
  dateOrder: { detected: DateOrder | null; used: DateOrder | null };
  /** The height unit applied to cells without one: the header's, else the grower's choice. */
  heightUnit: LengthUnit | null;
  counts: ImportCounts;
  preview: PreviewRow[];
  plants: PlantDraft[];
  leads: LeadDraft[];
  measurements: MeasurementDraft[];
  blooms: BloomDraft[];
  /** Empty leaf counts and root tips of stored measurements to fill, by measurement id. */
  measurementFills: Array<{ measurementId: string; leafCount?: number; rootTips?: number }>;
  /** Empty fields of stored bloom records to fill, by lead id. */
  bloomFills: Array<{ leadId: string } & Partial<Omit<BloomDraft, 'leadKey'>>>;
}

export interface PlanContext {
  seasonStartMonth: number;
  /** The last date accepted (today plus the tolerance for growers east of UTC). */
  latestDate: string;
  /**
   * Today (the server's, UTC): the growth year it falls in is the current one, whose leads come in
   * growing. Not `latestDate`, which on a season's last day already lies in the next season.
   */
  today: string;
  /** How many rows the preview shows (default 10). */
  previewRows?: number;
}

const GENUS = /^[A-Z][A-Za-z]{0,15}\.?$/;
const BLOOM_KEYS = ['budsSeenOn', 'firstOpenOn', 'lastFadedOn', 'flowerCount', 'spikeCount'] as const;
type BloomKey = (typeof BLOOM_KEYS)[number];
const BLOOM_FIELD: Record<BloomKey, ImportField> = {
  budsSeenOn: 'buds_seen',
  firstOpenOn: 'first_open',
  lastFadedOn: 'last_faded',
  flowerCount: 'flowers',
  spikeCount: 'spikes',
};
/** Two heights within this are the same reading (the column is single precision). */
const SAME_HEIGHT_MM = 0.05;

const leadKeyOf = (tag: string, label: string) => `new:${tag}\u0000${label}`;
const stripQuotes = (s: string) => s.replace(/^['‘’"]+|['‘’"]+$/g, '').trim();
const seasonOf = (date: string, startMonth: number) => {
  const [y, m] = date.split('-').map(Number);
  return m >= startMonth ? y : y - 1;
};
const mm = (n: number) => `${Number(n.toFixed(2))} mm`;

interface RowValues {
  row: number;
  tag: string;
  genus: string | null;
  epithet: string | null;
  clonalName: string | null;
  lead: string;
  season: number | null;
  date: string | null;
  heightMm: number | null;
  leafCount: number | null;
  sheath: SheathState | null;
  rootTips: number | null;
  bloom: Partial<Record<BloomKey, string | number>>;
  /** Whether any date cell was filled in, readable or not. */
  datesWritten: boolean;
}

/**
 * Reads every row against the collection's records. Checks each cell (a reason per bad cell),
 * the rows against each other (one plant has one genus; one lead one season; a lead and date
 * appear once) and against what is stored (a stored measurement on the same lead and date must
 * agree; a stored bloom record's filled fields must agree, its empty ones are filled). Nothing
 * should be written while `issues` is not empty or `needs` asks for a choice.
 */
export function planImport(reader: ImportReader, options: ImportOptions, existing: ExistingRecords, context: PlanContext): ImportPlan {
  const issues: ImportIssue[] = [];
  const latestYear = Number(context.latestDate.slice(0, 4));
  const currentSeason = seasonOf(context.today, context.seasonStartMonth);
  const statusOf = (season: number): LeadDraft['status'] => (season < currentSeason ? 'mature' : 'growing');
  const columnOf = (field: ImportField) => options.mapping[field] ?? field;
  // Cells that cannot be stored (PostgreSQL text takes no NUL) are reported once and read as empty.
  let unstorable = new Set<ImportField>();
  const issue = (row: number, field: ImportField, reason: string) => {
    if (!unstorable.has(field)) issues.push({ row, column: columnOf(field), reason });
  };

  const resolved = resolveDateOrder(reader.evidence, options.dateOrder);
  const headerUnit = options.mapping.height_mm ? splitHeaderUnit(options.mapping.height_mm).unit : null;
  const heightUnit = headerUnit ?? options.heightUnit ?? null;
  let needsHeightUnit = false;
  const at = new Map(reader.fields.map((f, i) => [f, i]));
  const cell = (cells: string[], field: ImportField) => {
    const i = at.get(field);
    return i === undefined ? '' : cells[i];
  };

  // ── 1. Each row on its own ──
  const values: RowValues[] = [];
  for (const { row, cells } of reader.rows) {
    unstorable = new Set();
    for (const field of reader.fields) {
      if (cell(cells, field).includes('\u0000')) {
        issue(row, field, 'Contains a NUL character, which cannot be stored; remove it from the cell');
        unstorable.add(field);
      }
    }
    const text = (field: ImportField) => (unstorable.has(field) ? '' : cell(cells, field));
    const dateOf = (field: ImportField): string | null => {
      const t = text(field);
      if (!t) return null;
      const read = parseSheetDate(t, resolved.order, latestYear);
      if (!read.ok) {
        // An undecided file order is asked once for the whole file, not on every row.
        if (!(resolved.needsChoice && /choose the file's date order/.test(read.reason))) issue(row, field, read.reason);
        return null;
      }
      if (read.value > context.latestDate) {
        issue(row, field, `${read.value} is in the future; record what has happened, up to today`);
        return null;
      }
      return read.value;
    };
    const countOf = (field: ImportField, what: string, max: number): number | null => {
      const t = text(field);
      if (!t) return null;
      const read = parseCount(t, what, max);
      if (!read.ok) issue(row, field, read.reason);
      return read.ok ? read.value : null;
    };
    const textOf = (field: ImportField, max: number): string | null => {
      const t = text(field);
      if (!t) return null;
      if (t.length > max) {
        issue(row, field, `At most ${max} characters`);
        return null;
      }
      return t;
    };

    const tag = textOf('tag', 40);
    if (!text('tag')) issue(row, 'tag', 'Enter the plant tag');
    let genus = textOf('genus', 17);
    if (genus && !GENUS.test(genus)) {
      issue(row, 'genus', `"${genus}" is not a genus; write it or its abbreviation, e.g. C., Rlc., Den.`);
      genus = null;
    }
    const epithet = textOf('epithet', 120);
    const clonal = textOf('clonal_name', 82);
    const clonalName = clonal ? stripQuotes(clonal) || null : null;
    const lead = textOf('lead', 20);
    if (!text('lead')) issue(row, 'lead', 'Enter the lead label');
    let season: number | null = null;
    if (text('season')) {
      const read = parseCount(text('season'), 'Season', 2200);
      if (!read.ok || read.value < 1900) issue(row, 'season', `Season is a year, such as 2024, not "${text('season')}"`);
      else season = read.value;
    }
    const date = dateOf('date');
    let heightMm: number | null = null;
    if (text('height_mm')) {
      const read = parseLength(text('height_mm'), heightUnit);
      if (read.ok) {
        if (read.value > MAX_HEIGHT_MM) issue(row, 'height_mm', `${mm(read.value)} is above ${MAX_HEIGHT_MM} mm, which is not plausible`);
        else heightMm = read.value;
      } else if (read.needsUnit) needsHeightUnit = true;
      else issue(row, 'height_mm', read.reason);
    }
    const leafCount = countOf('leaves', 'Leaf count', MAX_LEAF_COUNT);
    let sheath: SheathState | null = null;
    if (text('sheath')) {
      const read = parseSheath(text('sheath'));
      if (read.ok) sheath = read.value;
      else issue(row, 'sheath', read.reason);
    }
    const rootTips = countOf('root_tips', 'Root tips', MAX_ROOT_TIPS);
    const bloom: RowValues['bloom'] = {};
    const budsSeenOn = dateOf('buds_seen');
    const firstOpenOn = dateOf('first_open');
    const lastFadedOn = dateOf('last_faded');
    const flowerCount = countOf('flowers', 'Flower count', MAX_FLOWER_COUNT);
    const spikeCount = countOf('spikes', 'Spike count', MAX_SPIKE_COUNT);
    if (budsSeenOn) bloom.budsSeenOn = budsSeenOn;
    if (firstOpenOn) bloom.firstOpenOn = firstOpenOn;
    if (lastFadedOn) bloom.lastFadedOn = lastFadedOn;
    if (flowerCount !== null) bloom.flowerCount = flowerCount;
    if (spikeCount !== null) bloom.spikeCount = spikeCount;

    // A measurement needs both its date and its height; the other readings need the date.
    const hasReadings = text('height_mm') !== '' || text('leaves') !== '' || text('sheath') !== '' || text('root_tips') !== '';
    if (text('date') && !text('height_mm')) issue(row, 'height_mm', 'Enter the height measured on this date');
    else if (!text('date') && hasReadings) issue(row, 'date', 'Enter the date these readings were taken');

    const datesWritten = DATE_FIELDS.some((f) => text(f) !== '');
    if (tag && lead) values.push({ row, tag, genus, epithet, clonalName, lead, season, date, heightMm, leafCount, sheath, rootTips, bloom, datesWritten });
  }

  // ── 2. Rows against each other and against the collection ──
  const storedPlants = new Map(existing.plants.map((p) => [p.tag, p]));
  const storedLeads = new Map(existing.leads.map((l) => [`${l.plantId}\u0000${l.label}`, l]));
  const storedMeasurements = new Map(existing.measurements.map((m) => [`${m.leadId}\u0000${m.measuredOn}`, m]));
  const storedBlooms = new Map(existing.blooms.map((b) => [b.leadId, b]));

  interface PlantSeen {
    first: number;
    stored?: ExistingPlant;
    genus?: { value: string; row: number };
    epithet?: { value: string; row: number };
    clonalName?: { value: string; row: number };
  }
  interface LeadSeen {
    key: string;
    tag: string;
    label: string;
    first: number;
    stored?: ExistingLead;
    season?: { value: number; row: number };
    earliest: string | null;
    datesWritten: boolean;
    bloom: Partial<Record<BloomKey, { value: string | number; row: number }>>;
  }
  const plantsSeen = new Map<string, PlantSeen>();
  const leadsSeen = new Map<string, LeadSeen>();
  const measurementRows = new Map<string, number>();
  const measurements: MeasurementDraft[] = [];
  const measurementState = new Map<number, PreviewRow['measurement']>();
  const measurementFills: ImportPlan['measurementFills'] = [];
  let already = 0;

  const agree = <T extends string | number>(
    seen: { value: T; row: number } | undefined,
    value: T | null,
    row: number,
    field: ImportField,
    what: string,
  ): { value: T; row: number } | undefined => {
    if (value === null) return seen;
    if (!seen) return { value, row };
    if (seen.value !== value) issue(row, field, `Row ${seen.row} gives ${seen.value} as the ${what} of this ${field === 'season' ? 'lead' : 'plant'}; the file says ${value} here`);
    return seen;
  };

  for (const v of values) {
    let plant = plantsSeen.get(v.tag);
    if (!plant) {
      plant = { first: v.row, stored: storedPlants.get(v.tag) };
      plantsSeen.set(v.tag, plant);
    }
    const stored = plant.stored;
    if (stored?.historyOnly) {
      issue(v.row, 'tag', `Plant ${v.tag} is a read-only copy of another grower's record, brought in with a division; records cannot be added to it`);
      continue;
    }
    const checkStored = (field: ImportField, value: string | null, storedValue: string | null | undefined, what: string) => {
      if (stored && value !== null && storedValue !== value) {
        issue(v.row, field, `Plant ${v.tag} is stored with ${storedValue ? `${storedValue} as the ${what}` : `no ${what}`}; the file says ${value}`);
        return false;
      }
      return true;
    };
    if (checkStored('genus', v.genus, stored?.genus, 'genus')) plant.genus = agree(plant.genus, v.genus, v.row, 'genus', 'genus');
    if (checkStored('epithet', v.epithet, stored?.epithet, 'grex or species')) plant.epithet = agree(plant.epithet, v.epithet, v.row, 'epithet', 'grex or species');
    if (checkStored('clonal_name', v.clonalName, stored?.clonalName, 'clonal name')) plant.clonalName = agree(plant.clonalName, v.clonalName, v.row, 'clonal_name', 'clonal name');

    const storedLead = stored ? storedLeads.get(`${stored.id}\u0000${v.lead}`) : undefined;
    const key = storedLead ? storedLead.id : leadKeyOf(v.tag, v.lead);
    let lead = leadsSeen.get(key);
    if (!lead) {
      lead = { key, tag: v.tag, label: v.lead, first: v.row, stored: storedLead, earliest: null, datesWritten: false, bloom: {} };
      leadsSeen.set(key, lead);
    }
    if (storedLead && v.season !== null && v.season !== storedLead.season) {
      issue(v.row, 'season', `Lead ${v.lead} of ${v.tag} is stored in season ${storedLead.season}; the file says ${v.season}`);
    } else lead.season = agree(lead.season, v.season, v.row, 'season', 'season');

    lead.datesWritten ||= v.datesWritten;
    const dates = [v.date, v.bloom.budsSeenOn, v.bloom.firstOpenOn, v.bloom.lastFadedOn].filter((d): d is string => typeof d === 'string');
    for (const d of dates) if (!lead.earliest || d < lead.earliest) lead.earliest = d;
    if (storedLead) {
      const before = (field: ImportField, d: string | null | undefined) => {
        if (typeof d === 'string' && d < storedLead.firstSeen) issue(v.row, field, `${d} is before lead ${v.lead} was first seen (${storedLead.firstSeen})`);
        return typeof d === 'string' && d < storedLead.firstSeen;
      };
      if (before('date', v.date)) v.date = null;
      before('buds_seen', v.bloom.budsSeenOn as string | undefined);
      before('first_open', v.bloom.firstOpenOn as string | undefined);
      before('last_faded', v.bloom.lastFadedOn as string | undefined);
    }

    for (const k of BLOOM_KEYS) {
      const value = v.bloom[k];
      if (value === undefined) continue;
      const seen = lead.bloom[k];
      if (!seen) lead.bloom[k] = { value, row: v.row };
      else if (seen.value !== value) issue(v.row, BLOOM_FIELD[k], `Row ${seen.row} gives ${seen.value} for this lead; one lead has one bloom record`);
    }

    measurementState.set(v.row, 'none');
    if (v.date && v.heightMm !== null) {
      const mKey = `${key}\u0000${v.date}`;
      const earlier = measurementRows.get(mKey);
      if (earlier !== undefined) {
        issue(v.row, 'date', `Row ${earlier} already has lead ${v.lead} of ${v.tag} on ${v.date}`);
        continue;
      }
      measurementRows.set(mKey, v.row);
      const storedM = storedLead ? storedMeasurements.get(`${storedLead.id}\u0000${v.date}`) : undefined;
      if (storedM) {
        let same = true;
        const differ = (field: ImportField, storedText: string, fileText: string) => {
          same = false;
          issue(v.row, field, `Stored as ${storedText} for lead ${v.lead} of ${v.tag} on ${v.date}; the file says ${fileText}. Correct one of them`);
        };
        // A count left empty when the measurement was stored is filled in, as bloom records
        // are; a stored count that disagrees is reported. A sheath is never empty ("none" is
        // a state the grower saw), so a different one is always reported.
        const fill: { leafCount?: number; rootTips?: number } = {};
        if (Math.abs(storedM.heightMm - v.heightMm) > SAME_HEIGHT_MM) differ('height_mm', mm(storedM.heightMm), mm(v.heightMm));
        if (v.leafCount !== null && storedM.leafCount === null) fill.leafCount = v.leafCount;
        else if (v.leafCount !== null && storedM.leafCount !== v.leafCount) differ('leaves', `${storedM.leafCount} leaves`, `${v.leafCount}`);
        if (v.sheath !== null && storedM.sheath !== v.sheath) differ('sheath', `sheath ${storedM.sheath}`, v.sheath);
        if (v.rootTips !== null && storedM.rootTips === null) fill.rootTips = v.rootTips;
        else if (v.rootTips !== null && storedM.rootTips !== v.rootTips) differ('root_tips', `${storedM.rootTips} root tips`, `${v.rootTips}`);
        if (same && Object.keys(fill).length > 0) {
          measurementFills.push({ measurementId: storedM.id, ...fill });
          measurementState.set(v.row, 'filled');
        } else if (same) {
          already += 1;
          measurementState.set(v.row, 'already');
        }
      } else {
        measurements.push({ leadKey: key, measuredOn: v.date, heightMm: v.heightMm, leafCount: v.leafCount, sheath: v.sheath ?? 'none', rootTips: v.rootTips });
        measurementState.set(v.row, 'new');
      }
    }
  }

  // ── 3. New plants and leads need what the database requires ──
  const plants: PlantDraft[] = [];
  let plantsMatched = 0;
  for (const [tag, p] of plantsSeen) {
    if (p.stored) {
      plantsMatched += 1;
      continue;
    }
    if (!p.genus) issue(p.first, 'genus', `Plant ${tag} is new: enter its genus`);
    if (!p.epithet) issue(p.first, 'epithet', `Plant ${tag} is new: enter its grex or species`);
    if (p.genus && p.epithet) plants.push({ tag, genus: p.genus.value, epithet: p.epithet.value, clonalName: p.clonalName?.value ?? null });
  }
  const leads: LeadDraft[] = [];
  const blooms: BloomDraft[] = [];
  const bloomFills: ImportPlan['bloomFills'] = [];
  let leadsMatched = 0;
  let bloomsAlready = 0;
  const newSeason = new Map<string, number>();
  for (const lead of leadsSeen.values()) {
    if (lead.stored) leadsMatched += 1;
    else if (!lead.earliest && lead.season) {
      // A lead not yet measured (the export writes it as a row with only its season): first
      // seen on the first day of that growth year, unless that day is still to come.
      const firstSeen = `${lead.season.value}-${String(context.seasonStartMonth).padStart(2, '0')}-01`;
      if (firstSeen > context.latestDate) issue(lead.season.row, 'season', `Season ${lead.season.value} has not started yet; give the lead a date`);
      else {
        newSeason.set(lead.key, lead.season.value);
        leads.push({ tag: lead.tag, label: lead.label, season: lead.season.value, firstSeen, status: statusOf(lead.season.value) });
      }
    } else if (!lead.earliest) {
      // A lead whose dates were all refused already has those reasons in the report.
      if (!lead.datesWritten) issue(lead.first, 'date', `Lead ${lead.label} of ${lead.tag} is new: give a measurement or bloom date, so its first-seen day is known`);
    } else {
      const earliest = lead.earliest!;
      const season = lead.season?.value ?? seasonOf(earliest, context.seasonStartMonth);
      newSeason.set(lead.key, season);
      leads.push({ tag: lead.tag, label: lead.label, season, firstSeen: earliest, status: statusOf(season) });
    }
    const given = BLOOM_KEYS.filter((k) => lead.bloom[k]);
    if (given.length === 0) continue;
    const storedBloom = lead.stored ? storedBlooms.get(lead.stored.id) : undefined;
    if (!storedBloom) {
      const draft: BloomDraft = { leadKey: lead.key, budsSeenOn: null, firstOpenOn: null, lastFadedOn: null, flowerCount: null, spikeCount: null };
      for (const k of given) (draft as unknown as Record<string, unknown>)[k] = lead.bloom[k]!.value;
      blooms.push(draft);
      continue;
    }
    const fill: Record<string, unknown> = {};
    for (const k of given) {
      const { value, row } = lead.bloom[k]!;
      const storedValue = storedBloom[k];
      if (storedValue === null) fill[k] = value;
      else if (storedValue !== value) issue(row, BLOOM_FIELD[k], `The bloom record of lead ${lead.label} of ${lead.tag} has ${storedValue}; the file says ${value}. Correct one of them`);
    }
    if (Object.keys(fill).length > 0) bloomFills.push({ leadId: lead.stored!.id, ...fill });
    else bloomsAlready += 1;
  }

  issues.sort((a, b) => a.row - b.row || columnRank(a.column, options.mapping) - columnRank(b.column, options.mapping));

  const previewCount = context.previewRows ?? 10;
  const preview: PreviewRow[] = values.slice(0, previewCount).map((v) => {
    const plant = plantsSeen.get(v.tag)!;
    const storedPlant = plant.stored;
    const leadKey = storedPlant && storedLeads.get(`${storedPlant.id}\u0000${v.lead}`);
    // Undefined for a row refused before its lead was read (a read-only plant).
    const lead = leadsSeen.get(leadKey ? leadKey.id : leadKeyOf(v.tag, v.lead));
    const genus = storedPlant?.genus ?? plant.genus?.value ?? '';
    const epithet = storedPlant?.epithet ?? plant.epithet?.value ?? '';
    const clonal = storedPlant?.clonalName ?? plant.clonalName?.value;
    return {
      row: v.row,
      tag: v.tag,
      plant: storedPlant ? 'matched' : 'new',
      name: `${genus} ${epithet}${clonal ? ` '${clonal}'` : ''}`.trim(),
      lead: v.lead,
      leadStatus: lead?.stored ? 'matched' : 'new',
      season: lead?.stored?.season ?? (lead ? newSeason.get(lead.key) : undefined) ?? null,
      date: v.date,
      heightMm: v.heightMm,
      leafCount: v.leafCount,
      sheath: v.date && v.heightMm !== null ? (v.sheath ?? 'none') : v.sheath,
      rootTips: v.rootTips,
      measurement: measurementState.get(v.row) ?? 'none',
    };
  });

  return {
    issues,
    needs: { dateOrder: resolved.needsChoice, heightUnit: needsHeightUnit },
    dateOrder: { detected: resolved.detected, used: resolved.order },
    heightUnit,
    counts: {
      rows: reader.rowCount,
      blankRows: reader.blankRows,
      plants: { added: plants.length, matched: plantsMatched },
      leads: { added: leads.length, matched: leadsMatched },
      measurements: { added: measurements.length, already, filled: measurementFills.length },
      blooms: { added: blooms.length, filled: bloomFills.length, already: bloomsAlready },
    },
    preview,
    plants,
    leads,
    measurements,
    measurementFills,
    blooms,
    bloomFills,
  };
}

function columnRank(column: string, mapping: ColumnMapping): number {
  const index = IMPORT_FIELDS.findIndex((f) => (mapping[f] ?? f) === column);
  return index === -1 ? IMPORT_FIELDS.length : index;
}

/** Whether a plan may be written: no issues and no choice left to make. */
export function planIsReady(plan: ImportPlan): boolean {
  return plan.issues.length === 0 && !plan.needs.dateOrder && !plan.needs.heightUnit;
}

export { leadKeyOf };
