import { z } from 'zod';
import { calendarDateSchema, idSchema, optionalText, pageSchema, paginationQuerySchema, versionSchema } from './common';

// ── Limits the server enforces (each refusal is a 400 naming the field) ────────────────

/** Taller than any pseudobulb of the genera served (large Dendrobium canes reach ~1 m). */
export const MAX_HEIGHT_MM = 1500;
export const MAX_LEAF_COUNT = 30;
export const MAX_ROOT_TIPS = 500;
export const MAX_BULB_WIDTH_MM = 300;
export const MAX_FLOWER_COUNT = 500;
export const MAX_SPIKE_COUNT = 50;
/** A date "in the future" is one past tomorrow in UTC: a grower east of UTC is a day ahead. */
export const FUTURE_DATE_TOLERANCE_DAYS = 1;

export const sheathStates = ['none', 'forming', 'empty', 'budded', 'dry'] as const;
export const sheathSchema = z.enum(sheathStates, { error: 'Sheath is one of none, forming, empty, budded, dry' });
export const leadStatuses = ['growing', 'mature', 'dried_off', 'rotted', 'removed'] as const;
export const leadStatusSchema = z.enum(leadStatuses, { error: 'Status is one of growing, mature, dried_off, rotted, removed' });

// ── Areas ─────────────────────────────────────────────────────────────────────────────

export const areaInputSchema = z.object({
  name: z.string({ error: 'Enter a name' }).trim().min(1, 'Enter a name').max(80, 'At most 80 characters'),
  indoors: z.boolean().default(false),
  notes: optionalText(2000),
});
export const updateAreaInputSchema = areaInputSchema.partial().extend({
  version: versionSchema,
  /** The area's place in the walking order (Rounds sorts unordered plants by it). */
  position: z.number({ error: 'Position is a whole number' }).int('Position is a whole number').min(0, 'Position cannot be negative').max(100_000).optional(),
});

export const areaSchema = z.object({
  id: idSchema,
  collectionId: idSchema,
  name: z.string(),
  indoors: z.boolean(),
  position: z.number().int(),
  notes: z.string().nullable(),
  version: z.number().int(),
});

// ── Plants ────────────────────────────────────────────────────────────────────────────

/** A plant's own night limit, °C: the range the database accepts (plants_min_night_temp_range). */
export const MIN_NIGHT_TEMP_RANGE_C = { min: -20, max: 35 } as const;

const plantFields = {
  tag: z.string({ error: 'Enter the tag' }).trim().min(1, 'Enter the tag').max(40, 'At most 40 characters'),
  genus: z
    .string({ error: 'Enter the genus abbreviation' })
    .trim()
    .regex(/^[A-Z][A-Za-z]{0,15}\.?$/, 'Write the genus or its abbreviation, e.g. C., Rlc., Den.'),
  epithet: z
    .string({ error: 'Enter the grex or species' })
    .trim()
    .min(1, 'Enter the grex or species')
    .max(120, 'At most 120 characters'),
  isSpecies: z.boolean().default(false),
  /** Stored without the single quotes; they are added when the name is shown. */
  clonalName: optionalText(80).transform((v) => (v ? v.replace(/^['‘’"]+|['‘’"]+$/g, '').trim() || null : null)),
  source: optionalText(200),
  acquiredOn: calendarDateSchema.nullish().transform((v) => v ?? null),
  areaId: idSchema.nullish().transform((v) => v ?? null),
  medium: optionalText(60),
  notes: optionalText(4000),
  /** The grower's own minimum night temperature for this plant, °C; null uses the genus default. */
  minNightTempC: z
    .number({ error: 'Minimum night temperature is a number of °C' })
    .min(MIN_NIGHT_TEMP_RANGE_C.min, `Minimum night temperature is between ${MIN_NIGHT_TEMP_RANGE_C.min} and ${MIN_NIGHT_TEMP_RANGE_C.max} °C`)
    .max(MIN_NIGHT_TEMP_RANGE_C.max, `Minimum night temperature is between ${MIN_NIGHT_TEMP_RANGE_C.min} and ${MIN_NIGHT_TEMP_RANGE_C.max} °C`)
    .nullish()
    .transform((v) => v ?? null),
};

export const plantInputSchema = z.object(plantFields);
export const updatePlantInputSchema = z.object(plantFields).partial().extend({ version: versionSchema });

export const plantSchema = z.object({
  id: idSchema,
  collectionId: idSchema,
  tag: z.string(),
  genus: z.string(),
  epithet: z.string(),
  isSpecies: z.boolean(),
  clonalName: z.string().nullable(),
  source: z.string().nullable(),
  acquiredOn: calendarDateSchema.nullable(),
  areaId: idSchema.nullable(),
  medium: z.string().nullable(),
  notes: z.string().nullable(),
  parentPlantId: idSchema.nullable(),
  dividedOn: calendarDateSchema.nullable(),
  /** The grower's own minimum night temperature, °C; null uses the genus default. */
  minNightTempC: z.number().nullable(),
  /** A read-only copy of another grower's plant, brought in with a division handed over. */
  historyOnly: z.boolean(),
  /** Set when the plant was handed to someone else: the day, and to whom. */
  givenAwayOn: calendarDateSchema.nullable(),
  givenTo: z.string().nullable(),
  /** Who handed this plant (or this history) over. */
  receivedFrom: z.string().nullable(),
  version: z.number().int(),
});

export const plantSortSchema = z.enum(['tag', 'name', 'updated', 'acquired']);

export const plantListQuerySchema = paginationQuerySchema.extend({
  q: z.string().trim().max(100, 'At most 100 characters').optional(),
  genus: z.string().trim().max(20).optional(),
  areaId: idSchema.optional(),
  leadStatus: leadStatusSchema.optional(),
  sort: plantSortSchema.default('tag'),
  order: z.enum(['asc', 'desc']).default('asc'),
});

// ── Leads ─────────────────────────────────────────────────────────────────────────────

const leadFields = {
  season: z.number({ error: 'Enter the season (growth year)' }).int().min(1900, 'Season is a year').max(2200, 'Season is a year'),
  label: z
    .string({ error: 'Enter a label' })
    .trim()
    .min(1, 'Enter a label')
    .max(20, 'At most 20 characters'),
  firstSeen: calendarDateSchema,
  parentLeadId: idSchema.nullish().transform((v) => v ?? null),
  status: leadStatusSchema.default('growing'),
  fromBackBulb: z.boolean().default(false),
};

export const leadInputSchema = z.object(leadFields);
export const updateLeadInputSchema = z.object(leadFields).partial().extend({ version: versionSchema });

export const leadSchema = z.object({
  id: idSchema,
  plantId: idSchema,
  season: z.number().int(),
  label: z.string(),
  firstSeen: calendarDateSchema,
  parentLeadId: idSchema.nullable(),
  status: leadStatusSchema,
  fromBackBulb: z.boolean(),
  version: z.number().int(),
});

// ── Measurements ──────────────────────────────────────────────────────────────────────

const nullableCount = (max: number, what: string) =>
  z
    .number({ error: `${what} is a whole number` })
    .int(`${what} is a whole number`)
    .min(0, `${what} cannot be negative`)
    .max(max, `${what} above ${max} is not plausible`)
    .nullish()
    .transform((v) => v ?? null);

const heightSchema = z
  .number({ error: 'Enter the pseudobulb height' })
  .min(0, 'Height cannot be negative')
  .max(MAX_HEIGHT_MM, `A height above ${MAX_HEIGHT_MM} mm is not plausible`);

export const measurementInputSchema = z.object({
  date: calendarDateSchema,
  heightMm: heightSchema,
  leafCount: nullableCount(MAX_LEAF_COUNT, 'Leaf count'),
  sheath: sheathSchema.default('none'),
  rootTips: nullableCount(MAX_ROOT_TIPS, 'Root tips'),
  bulbWidthMm: z
    .number()
    .min(0, 'Width cannot be negative')
    .max(MAX_BULB_WIDTH_MM, `A width above ${MAX_BULB_WIDTH_MM} mm is not plausible`)
    .nullish()
    .transform((v) => v ?? null),
  note: optionalText(2000),
  /** A fresh uuid per entry, made by the client; a repeat with the same key is stored once. */
  clientKey: z.uuid().optional(),
});
export const updateMeasurementInputSchema = measurementInputSchema.omit({ clientKey: true }).partial().extend({ version: versionSchema });

/**
 * A sheath mark: on a day with a look, it sets that look's sheath; on a new day it is a new look
 * and needs the bulb's height that day (no height is carried forward).
 */
export const sheathMarkInputSchema = z.object({
  date: calendarDateSchema,
  sheath: sheathSchema,
  heightMm: heightSchema.optional(),
  clientKey: z.uuid().optional(),
});

export const measurementSchema = z.object({
  id: idSchema,
  leadId: idSchema,
  date: calendarDateSchema,
  heightMm: z.number(),
  leafCount: z.number().int().nullable(),
  sheath: sheathSchema,
  rootTips: z.number().int().nullable(),
  bulbWidthMm: z.number().nullable(),
  note: z.string().nullable(),
  createdBy: z.string().nullable(),
  version: z.number().int(),
});

// ── Bloom records ─────────────────────────────────────────────────────────────────────

const optionalDate = calendarDateSchema.nullish().transform((v) => v ?? null);

export const bloomInputSchema = z
  .object({
    budsSeenOn: optionalDate,
    firstOpenOn: optionalDate,
    lastFadedOn: optionalDate,
    flowerCount: nullableCount(MAX_FLOWER_COUNT, 'Flower count'),
    spikeCount: nullableCount(MAX_SPIKE_COUNT, 'Spike count'),
    note: optionalText(2000),
    /** Absent when creating the lead's first bloom record. */
    version: versionSchema.optional(),
  })
  .superRefine((value, ctx) => {
    const order: Array<[keyof typeof value, keyof typeof value, string]> = [
      ['budsSeenOn', 'firstOpenOn', 'The first flower opens after the buds are seen'],
      ['firstOpenOn', 'lastFadedOn', 'The last flower fades after the first opens'],
      ['budsSeenOn', 'lastFadedOn', 'The last flower fades after the buds are seen'],
    ];
    for (const [earlier, later, message] of order) {
      const a = value[earlier];
      const b = value[later];
      if (typeof a === 'string' && typeof b === 'string' && b < a) ctx.addIssue({ code: 'custom', path: [later], message });
    }
  });

export const bloomRecordSchema = z.object({
  id: idSchema,
  leadId: idSchema,
  budsSeenOn: calendarDateSchema.nullable(),
  firstOpenOn: calendarDateSchema.nullable(),
  lastFadedOn: calendarDateSchema.nullable(),
  flowerCount: z.number().int().nullable(),
  spikeCount: z.number().int().nullable(),
  note: z.string().nullable(),
  version: z.number().int(),
});

// ── Care entries ──────────────────────────────────────────────────────────────────────

export const careKinds = ['water', 'feed', 'repot', 'treat', 'move', 'damage', 'note'] as const;
export const damageKinds = ['sunburn', 'cold', 'rot', 'mechanical', 'pest', 'other'] as const;

const careBase = { occurredOn: calendarDateSchema, note: optionalText(2000) };

export const careInputSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('water'), ...careBase }),
    z.object({ kind: z.literal('feed'), withCalcium: z.boolean({ error: 'Say whether the feed had calcium' }), ...careBase }),
    z.object({ kind: z.literal('repot'), newMedium: z.string({ error: 'Enter the new medium' }).trim().min(1, 'Enter the new medium').max(60), ...careBase }),
    z.object({
      kind: z.literal('treat'),
      product: z.string({ error: 'Enter the product' }).trim().min(1, 'Enter the product').max(120),
      target: z.string({ error: 'Enter the pest or disease' }).trim().min(1, 'Enter the pest or disease').max(120),
      ...careBase,
    }),
    z.object({ kind: z.literal('move'), toAreaId: idSchema, ...careBase }),
    z.object({ kind: z.literal('damage'), damageKind: z.enum(damageKinds, { error: 'Choose the kind of damage' }), ...careBase }),
    z.object({ kind: z.literal('note'), ...careBase, note: z.string({ error: 'Write the note' }).trim().min(1, 'Write the note').max(2000) }),
  ],
  { error: 'Kind is one of water, feed, repot, treat, move, damage, note' },
);

export const careEntrySchema = z.object({
  id: idSchema,
  plantId: idSchema.nullable(),
  areaId: idSchema.nullable(),
  kind: z.enum(careKinds),
  occurredOn: calendarDateSchema,
  withCalcium: z.boolean().nullable(),
  newMedium: z.string().nullable(),
  product: z.string().nullable(),
  target: z.string().nullable(),
  toAreaId: idSchema.nullable(),
  damageKind: z.enum(damageKinds).nullable(),
  note: z.string().nullable(),
  createdBy: z.string().nullable(),
});

// ── Divisions ─────────────────────────────────────────────────────────────────────────

/** Common practice: a division of fewer than three pseudobulbs with a lead is weak to re-establish. */
export const MIN_BULBS_PER_DIVISION = 3;

export const divideInputSchema = z.object({
  dividedOn: calendarDateSchema,
  pieces: z
    .array(
      z.object({
        tag: plantFields.tag,
        leadIds: z.array(idSchema).max(50).default([]),
        bulbCount: z.number().int().min(1, 'A piece has at least one bulb').max(100).nullish().transform((v) => v ?? null),
        areaId: idSchema.nullish().transform((v) => v ?? null),
        medium: optionalText(60),
      }),
    )
    .min(1, 'Add at least one piece')
    .max(20, 'At most 20 pieces at once'),
});

export const divideResultSchema = z.object({
  plants: z.array(plantSchema),
  /** Common-practice warnings (small pieces, a piece with no lead); the division still happened. */
  warnings: z.array(z.object({ piece: z.number().int(), message: z.string() })),
});

// ── Composite read models ─────────────────────────────────────────────────────────────

export const leadSummarySchema = leadSchema.extend({ latest: measurementSchema.nullable() });

export const plantListItemSchema = plantSchema.extend({
  areaName: z.string().nullable(),
  /** Leads of the plant's latest season, each with its latest measurement. */
  currentLeads: z.array(leadSummarySchema),
});
export const plantPageSchema = pageSchema(plantListItemSchema);

export const plantRefSchema = z.object({ id: idSchema, tag: z.string(), genus: z.string(), epithet: z.string(), isSpecies: z.boolean(), clonalName: z.string().nullable(), dividedOn: calendarDateSchema.nullable(), historyOnly: z.boolean() });

export const plantDetailSchema = plantSchema.extend({
  areaName: z.string().nullable(),
  leads: z.array(leadSummarySchema),
  lineage: z.object({
    parent: plantRefSchema.nullable(),
    siblings: z.array(plantRefSchema),
    children: z.array(plantRefSchema),
  }),
  care: z.array(careEntrySchema),
});

export const leadDetailSchema = leadSchema.extend({
  plant: plantRefSchema,
  measurements: z.array(measurementSchema),
  bloom: bloomRecordSchema.nullable(),
});

export const roundsOrderInputSchema = z.object({ plantIds: z.array(idSchema).max(5000) });

export const roundStopSchema = z.object({
  plant: plantRefSchema.extend({ areaName: z.string().nullable() }),
  leads: z.array(leadSummarySchema),
});
export const roundsSchema = z.object({ stops: z.array(roundStopSchema) });

export type Area = z.infer<typeof areaSchema>;
export type Plant = z.infer<typeof plantSchema>;
export type PlantInput = z.input<typeof plantInputSchema>;
export type PlantListItem = z.infer<typeof plantListItemSchema>;
export type PlantDetail = z.infer<typeof plantDetailSchema>;
export type PlantRef = z.infer<typeof plantRefSchema>;
export type Lead = z.infer<typeof leadSchema>;
export type LeadSummary = z.infer<typeof leadSummarySchema>;
export type LeadDetail = z.infer<typeof leadDetailSchema>;
export type Measurement = z.infer<typeof measurementSchema>;
export type MeasurementInput = z.input<typeof measurementInputSchema>;
export type BloomRecord = z.infer<typeof bloomRecordSchema>;
export type CareEntry = z.infer<typeof careEntrySchema>;
export type CareInput = z.input<typeof careInputSchema>;
export type SheathState = (typeof sheathStates)[number];
export type LeadStatus = (typeof leadStatuses)[number];
export type RoundStop = z.infer<typeof roundStopSchema>;
