import { z } from 'zod';
import { FILE_ENCODINGS } from '../import/encoding';
import { IMPORT_FIELDS, LENGTH_UNITS } from '../import/fields';

/** The largest spreadsheet accepted, in bytes (413 beyond). */
export const IMPORT_MAX_BYTES = 20 * 1024 * 1024;
/** At most this many issues travel in a report; `issueCount` gives the total. */
export const IMPORT_MAX_ISSUES = 500;

export const importFieldSchema = z.enum(IMPORT_FIELDS);
export const dateOrderSchema = z.enum(['dmy', 'mdy'], { error: 'Date order is dmy (day first) or mdy (month first)' });
export const lengthUnitSchema = z.enum(LENGTH_UNITS as [string, ...string[]] as ['mm', 'cm', 'in'], { error: 'Height unit is mm, cm or in' });

const columnName = z.string().max(200, 'At most 200 characters');
export const columnMappingSchema = z.partialRecord(importFieldSchema, columnName);

/** Sent with the file (as the `options` query parameter, JSON). Without a mapping, it is guessed. */
export const importOptionsSchema = z.object({
  mapping: columnMappingSchema.optional(),
  dateOrder: dateOrderSchema.nullish(),
  heightUnit: lengthUnitSchema.nullish(),
});

export const mappingRequestSchema = z.object({
  headers: z.array(z.string().max(200, 'At most 200 characters')).min(1, 'Send the header row').max(200, 'At most 200 columns'),
});

export const mappingAnswerSchema = z.object({
  mapping: columnMappingSchema,
  /** remembered: this collection imported a file with the same header row before. */
  source: z.enum(['remembered', 'guessed']),
  dateOrder: dateOrderSchema.nullable(),
  heightUnit: lengthUnitSchema.nullable(),
});

export const importIssueSchema = z.object({ row: z.number().int(), column: z.string(), reason: z.string() });

const status = z.enum(['new', 'matched']);
export const previewRowSchema = z.object({
  row: z.number().int(),
  tag: z.string(),
  plant: status,
  name: z.string(),
  lead: z.string(),
  leadStatus: status,
  season: z.number().int().nullable(),
  date: z.string().nullable(),
  heightMm: z.number().nullable(),
  leafCount: z.number().int().nullable(),
  sheath: z.string().nullable(),
  rootTips: z.number().int().nullable(),
  measurement: z.enum(['new', 'already', 'filled', 'none']),
});

export const importCountsSchema = z.object({
  rows: z.number().int(),
  blankRows: z.number().int(),
  plants: z.object({ added: z.number().int(), matched: z.number().int() }),
  leads: z.object({ added: z.number().int(), matched: z.number().int() }),
  measurements: z.object({ added: z.number().int(), already: z.number().int(), filled: z.number().int() }),
  blooms: z.object({ added: z.number().int(), filled: z.number().int(), already: z.number().int() }),
});

/** The dry run: what the import would write, and every reason it cannot yet. Nothing is stored. */
export const importCheckSchema = z.object({
  /** The character encoding the file was read in (src/shared/import/encoding.ts). */
  encoding: z.enum(FILE_ENCODINGS),
  headers: z.array(z.string()),
  mapping: columnMappingSchema,
  dateOrder: z.object({ detected: dateOrderSchema.nullable(), used: dateOrderSchema.nullable(), needed: z.boolean() }),
  heightUnit: z.object({ fromHeader: lengthUnitSchema.nullable(), used: lengthUnitSchema.nullable(), needed: z.boolean() }),
  counts: importCountsSchema,
  preview: z.array(previewRowSchema),
  issues: z.array(importIssueSchema),
  issueCount: z.number().int(),
  ready: z.boolean(),
});

/** One line of the import's NDJSON answer. */
export const importProgressLineSchema = z.discriminatedUnion('phase', [
  z.object({ phase: z.literal('writing'), done: z.number().int(), total: z.number().int() }),
  z.object({ phase: z.literal('done'), counts: importCountsSchema }),
  z.object({ phase: z.literal('failed'), error: z.object({ code: z.string(), message: z.string() }) }),
]);

export type ColumnMappingInput = z.infer<typeof columnMappingSchema>;
export type ImportOptionsInput = z.infer<typeof importOptionsSchema>;
export type MappingAnswer = z.infer<typeof mappingAnswerSchema>;
export type ImportCheck = z.infer<typeof importCheckSchema>;
export type ImportProgressLine = z.infer<typeof importProgressLineSchema>;
