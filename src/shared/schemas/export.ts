import { z } from 'zod';
import { unitsSchema } from './collections';
import { calendarDateSchema } from './common';
import {
  careKinds,
  damageKinds,
  leadStatusSchema,
  MAX_BULB_WIDTH_MM,
  MAX_FLOWER_COUNT,
  MAX_HEIGHT_MM,
  MAX_LEAF_COUNT,
  MAX_ROOT_TIPS,
  MAX_SPIKE_COUNT,
  sheathSchema,
} from './records';

/**
 * Sympodia's own backup document: a whole collection as one JSON file. Records refer to each
 * other by the `id`s inside the document only; a restore gives every record a fresh id and
 * rewrites the references. Account ids, row versions and timestamps are not part of it.
 */
export const EXPORT_FORMAT = 'sympodia-export';
export const EXPORT_VERSION = 1;

/** The largest export file a restore accepts (about 150,000 measurements fit). */
export const RESTORE_MAX_BYTES = 64 * 1024 * 1024;

/** A record's reference inside the document (the exporting server writes its uuids). */
const refSchema = z.string({ error: 'Expected the id of a record in this file' }).min(1, 'An id cannot be empty').max(64, 'An id has at most 64 characters');
const nullableRef = refSchema.nullish().transform((v) => v ?? null);

const requiredText = (max: number, what: string) =>
  z.string({ error: `Expected ${what}` }).min(1, `${what} cannot be empty`).max(max, `At most ${max} characters`);
const nullableText = (max: number) =>
  z
    .string({ error: 'Expected text or null' })
    .max(max, `At most ${max} characters`)
    .nullish()
    .transform((v) => v ?? null);
const nullableDate = calendarDateSchema.nullish().transform((v) => v ?? null);
const nullableCount = (max: number) =>
  z
    .number({ error: 'Expected a whole number or null' })
    .int('Expected a whole number')
    .min(0, 'Cannot be negative')
    .max(max, `Above ${max} is not plausible`)
    .nullish()
    .transform((v) => v ?? null);
const flag = z.boolean({ error: 'Expected true or false' }).default(false);

export const exportCollectionSchema = z.object({
  name: requiredText(120, 'the collection name'),
  seasonStartMonth: z.number({ error: 'Expected a month 1 to 12' }).int().min(1, 'Month 1 to 12').max(12, 'Month 1 to 12'),
  units: unitsSchema,
  latitude: z.number().min(-90).max(90).nullish().transform((v) => v ?? null),
  longitude: z.number().min(-180).max(180).nullish().transform((v) => v ?? null),
});

export const exportAreaSchema = z.object({
  id: refSchema,
  name: requiredText(80, 'the area name'),
  indoors: flag,
  position: z.number().int().min(0).max(100_000).default(0),
  notes: nullableText(2000),
});

export const exportPlantSchema = z.object({
  id: refSchema,
  tag: requiredText(40, 'the tag'),
  genus: z.string({ error: 'Expected the genus' }).regex(/^[A-Z][A-Za-z]{0,15}\.?$/, 'Write the genus or its abbreviation, e.g. C., Rlc., Den.'),
  epithet: requiredText(120, 'the grex or species'),
  isSpecies: flag,
  /** Without the single quotes. */
  clonalName: nullableText(80),
  source: nullableText(200),
  acquiredOn: nullableDate,
  areaId: nullableRef,
  medium: nullableText(60),
  notes: nullableText(4000),
  parentPlantId: nullableRef,
  dividedOn: nullableDate,
  roundPosition: z.number().int().min(0).max(1_000_000).nullish().transform((v) => v ?? null),
  /** °C; null uses the genus default. */
  minNightTempC: z.number().min(-20, 'At least -20 °C').max(35, 'At most 35 °C').nullish().transform((v) => v ?? null),
  historyOnly: flag,
  givenAwayOn: nullableDate,
  givenTo: nullableText(200),
  receivedFrom: nullableText(200),
});

export const exportLeadSchema = z.object({
  id: refSchema,
  plantId: refSchema,
  season: z.number({ error: 'Expected the season (a year)' }).int().min(1900, 'Season is a year').max(2200, 'Season is a year'),
  label: requiredText(20, 'the lead label'),
  firstSeen: calendarDateSchema,
  parentLeadId: nullableRef,
  status: leadStatusSchema.default('growing'),
  fromBackBulb: flag,
});

export const exportMeasurementSchema = z.object({
  id: refSchema,
  leadId: refSchema,
  date: calendarDateSchema,
  /** Millimetres, always. */
  heightMm: z.number({ error: 'Expected the height in mm' }).min(0, 'Height cannot be negative').max(MAX_HEIGHT_MM, `Above ${MAX_HEIGHT_MM} mm is not plausible`),
  leafCount: nullableCount(MAX_LEAF_COUNT),
  sheath: sheathSchema.default('none'),
  rootTips: nullableCount(MAX_ROOT_TIPS),
  bulbWidthMm: z.number().min(0).max(MAX_BULB_WIDTH_MM).nullish().transform((v) => v ?? null),
  note: nullableText(2000),
});

export const exportBloomSchema = z.object({
  id: refSchema,
  leadId: refSchema,
  budsSeenOn: nullableDate,
  firstOpenOn: nullableDate,
  lastFadedOn: nullableDate,
  flowerCount: nullableCount(MAX_FLOWER_COUNT),
  spikeCount: nullableCount(MAX_SPIKE_COUNT),
  note: nullableText(2000),
});

export const exportCareSchema = z.object({
  id: refSchema,
  plantId: nullableRef,
  areaId: nullableRef,
  kind: z.enum(careKinds, { error: 'Kind is one of water, feed, repot, treat, move, damage, note' }),
  occurredOn: calendarDateSchema,
  withCalcium: z.boolean().nullish().transform((v) => v ?? null),
  newMedium: nullableText(60),
  product: nullableText(120),
  target: nullableText(120),
  toAreaId: nullableRef,
  damageKind: z.enum(damageKinds).nullish().transform((v) => v ?? null),
  note: nullableText(2000),
});

/** A photo's description; the picture itself travels only in the zip export (`file`). */
export const exportPhotoSchema = z.object({
  id: refSchema,
  plantId: refSchema,
  leadId: nullableRef,
  measurementId: nullableRef,
  takenOn: calendarDateSchema,
  width: z.number().int().min(0),
  height: z.number().int().min(0),
  caption: nullableText(200),
  /** The display file's name inside the zip export ("photos/<id>.webp"). */
  file: z.string().max(200),
});

/** The document's fields other than its lists of records. */
export const exportHeaderSchema = z.object({
  format: z.literal(EXPORT_FORMAT, { error: `Not a Sympodia export (expected format "${EXPORT_FORMAT}")` }),
  version: z.literal(EXPORT_VERSION, { error: `This server reads export version ${EXPORT_VERSION}` }),
  exportedAt: z.iso.datetime({ offset: true, error: 'Expected the export time as an ISO date-time' }),
  collection: exportCollectionSchema,
});

/** Each list of records and the schema of one of its records; a restore reads them one record at a time. */
export const EXPORT_LISTS = {
  areas: exportAreaSchema,
  plants: exportPlantSchema,
  leads: exportLeadSchema,
  measurements: exportMeasurementSchema,
  bloomRecords: exportBloomSchema,
  careEntries: exportCareSchema,
  photos: exportPhotoSchema,
} as const;
export type ExportListName = keyof typeof EXPORT_LISTS;
/** Lists a document may leave out (older exports had no photos). */
export const OPTIONAL_EXPORT_LISTS: ReadonlySet<ExportListName> = new Set(['photos']);

const documentShape = exportHeaderSchema.extend({
  areas: z.array(exportAreaSchema),
  plants: z.array(exportPlantSchema),
  leads: z.array(exportLeadSchema),
  measurements: z.array(exportMeasurementSchema),
  bloomRecords: z.array(exportBloomSchema),
  careEntries: z.array(exportCareSchema),
  photos: z.array(exportPhotoSchema).default([]),
});

type Shape = z.infer<typeof documentShape>;
type Issue = { path: Array<string | number>; message: string };

/** Ids unique within their list. */
function uniqueIds(list: ReadonlyArray<{ id: string }>, key: string, issues: Issue[]): Set<string> {
  const seen = new Set<string>();
  list.forEach((row, i) => {
    if (seen.has(row.id)) issues.push({ path: [key, i, 'id'], message: `The id "${row.id}" appears twice in ${key}` });
    seen.add(row.id);
  });
  return seen;
}

/** A chain of parents (divisions, or leads broken from leads) that comes back to itself. */
function cycleMembers(rows: ReadonlyArray<{ id: string; parent: string | null }>): Set<string> {
  const parentOf = new Map(rows.map((r) => [r.id, r.parent]));
  const inCycle = new Set<string>();
  for (const row of rows) {
    const path = new Set<string>();
    let at: string | null | undefined = row.id;
    while (at && parentOf.has(at) && !path.has(at)) {
      path.add(at);
      at = parentOf.get(at);
    }
    if (at && path.has(at)) inCycle.add(row.id);
  }
  return inCycle;
}

/** What the database and the product's rules need between records, checked before anything is written. */
function checkReferences(doc: Shape, issues: Issue[]): void {
  const areaIds = uniqueIds(doc.areas, 'areas', issues);
  const plantIds = uniqueIds(doc.plants, 'plants', issues);
  const leadIds = uniqueIds(doc.leads, 'leads', issues);
  const measurementIds = uniqueIds(doc.measurements, 'measurements', issues);
  uniqueIds(doc.bloomRecords, 'bloomRecords', issues);
  uniqueIds(doc.careEntries, 'careEntries', issues);
  uniqueIds(doc.photos, 'photos', issues);
  const missing = (path: Issue['path'], what: string, id: string) => issues.push({ path, message: `No ${what} with the id "${id}" in this file` });

  const areaNames = new Set<string>();
  doc.areas.forEach((area, i) => {
    if (areaNames.has(area.name)) issues.push({ path: ['areas', i, 'name'], message: `Two areas are called "${area.name}"` });
    areaNames.add(area.name);
  });

  const tags = new Set<string>();
  const inCyclePlants = cycleMembers(doc.plants.map((p) => ({ id: p.id, parent: p.parentPlantId })));
  doc.plants.forEach((plant, i) => {
    if (tags.has(plant.tag)) issues.push({ path: ['plants', i, 'tag'], message: `Two plants have the tag "${plant.tag}"` });
    tags.add(plant.tag);
    if (plant.areaId && !areaIds.has(plant.areaId)) missing(['plants', i, 'areaId'], 'area', plant.areaId);
    if (plant.parentPlantId && !plantIds.has(plant.parentPlantId)) missing(['plants', i, 'parentPlantId'], 'plant', plant.parentPlantId);
    if (plant.parentPlantId && !plant.dividedOn) issues.push({ path: ['plants', i, 'dividedOn'], message: 'A division needs the date it was divided' });
    if (inCyclePlants.has(plant.id)) issues.push({ path: ['plants', i, 'parentPlantId'], message: 'A plant cannot be a division of itself or of its own divisions' });
  });

  const leadPlant = new Map<string, string>();
  const labels = new Set<string>();
  const inCycleLeads = cycleMembers(doc.leads.map((l) => ({ id: l.id, parent: l.parentLeadId })));
  doc.leads.forEach((lead, i) => {
    leadPlant.set(lead.id, lead.plantId);
    if (!plantIds.has(lead.plantId)) missing(['leads', i, 'plantId'], 'plant', lead.plantId);
    const key = `${lead.plantId}\u0000${lead.label}`;
    if (labels.has(key)) issues.push({ path: ['leads', i, 'label'], message: `The plant already has a lead labelled "${lead.label}"` });
    labels.add(key);
    if (lead.parentLeadId && !leadIds.has(lead.parentLeadId)) missing(['leads', i, 'parentLeadId'], 'lead', lead.parentLeadId);
    if (inCycleLeads.has(lead.id)) issues.push({ path: ['leads', i, 'parentLeadId'], message: 'A lead cannot break from itself or from a lead that broke from it' });
  });

  const measurementLead = new Map<string, string>();
  doc.measurements.forEach((m, i) => {
    measurementLead.set(m.id, m.leadId);
    if (!leadIds.has(m.leadId)) missing(['measurements', i, 'leadId'], 'lead', m.leadId);
  });

  const bloomLeads = new Set<string>();
  doc.bloomRecords.forEach((b, i) => {
    if (!leadIds.has(b.leadId)) missing(['bloomRecords', i, 'leadId'], 'lead', b.leadId);
    if (bloomLeads.has(b.leadId)) issues.push({ path: ['bloomRecords', i, 'leadId'], message: 'A lead has one bloom record' });
    bloomLeads.add(b.leadId);
  });

  doc.careEntries.forEach((c, i) => {
    if ((c.plantId === null) === (c.areaId === null)) {
      issues.push({ path: ['careEntries', i, 'plantId'], message: 'A care entry is for exactly one plant or one area' });
    }
    if (c.plantId && !plantIds.has(c.plantId)) missing(['careEntries', i, 'plantId'], 'plant', c.plantId);
    if (c.areaId && !areaIds.has(c.areaId)) missing(['careEntries', i, 'areaId'], 'area', c.areaId);
    if (c.toAreaId && !areaIds.has(c.toAreaId)) missing(['careEntries', i, 'toAreaId'], 'area', c.toAreaId);
  });

  doc.photos.forEach((p, i) => {
    if (!plantIds.has(p.plantId)) missing(['photos', i, 'plantId'], 'plant', p.plantId);
    if (p.leadId && leadPlant.has(p.leadId) && leadPlant.get(p.leadId) !== p.plantId) {
      issues.push({ path: ['photos', i, 'leadId'], message: 'The lead belongs to another plant' });
    }
    if (p.leadId && !leadIds.has(p.leadId)) missing(['photos', i, 'leadId'], 'lead', p.leadId);
    if (p.measurementId && !measurementIds.has(p.measurementId)) missing(['photos', i, 'measurementId'], 'measurement', p.measurementId);
  });
}

/** The most reference problems reported at once; a file that breaks more is broken throughout. */
const MAX_REFERENCE_ISSUES = 20;

/** The references between a document's records that break a rule, at most 20, as paths and messages. */
export function exportReferenceIssues(doc: z.output<typeof documentShape>): Issue[] {
  const issues: Issue[] = [];
  checkReferences(doc, issues);
  return issues.slice(0, MAX_REFERENCE_ISSUES);
}

/** The whole export document: field rules per record, then the references between records. */
export const exportDocumentSchema = documentShape.superRefine((doc, ctx) => {
  for (const issue of exportReferenceIssues(doc)) ctx.addIssue({ code: 'custom', path: issue.path, message: issue.message });
});

/** Query of the zip export: the photos' display files go in unless asked to leave them out. */
export const exportZipQuerySchema = z.object({
  photos: z.enum(['yes', 'no'], { error: 'photos is yes or no' }).default('yes'),
});

export const restoreResultSchema = z.object({
  restored: z.object({
    areas: z.number().int(),
    plants: z.number().int(),
    leads: z.number().int(),
    measurements: z.number().int(),
    bloomRecords: z.number().int(),
    careEntries: z.number().int(),
  }),
  /** Photo rows in the file that were not restored: the JSON holds no picture files. */
  photosSkipped: z.number().int(),
  /** The settings taken over from the file; the collection keeps its own name. */
  settings: exportCollectionSchema.omit({ name: true }),
  /** The name of the collection the file was exported from. */
  exportedFrom: z.string(),
});

export type ExportDocument = z.infer<typeof exportDocumentSchema>;
export type ExportDocumentInput = z.input<typeof exportDocumentSchema>;
export type ExportPlant = z.infer<typeof exportPlantSchema>;
export type RestoreResult = z.infer<typeof restoreResultSchema>;
