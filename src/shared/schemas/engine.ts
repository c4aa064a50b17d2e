import { z } from 'zod';
import { calendarDateSchema, idSchema } from './common';
import { leadStatusSchema } from './records';

/*
 * Contracts of the growth-engine routes (forecast, trend, attention, calendar, backtest,
 * compare). Plain JSON only: calendar dates 'YYYY-MM-DD', lengths in mm, shares and chances as
 * 0–1 fractions. zod 4's z.number() refuses NaN and ±Infinity, so a non-finite figure from the
 * engine fails the server's own parse (a 500) instead of reaching the client.
 */

const num = z.number();
const int = z.number().int();
const share = z.number().min(0).max(1);
const date = calendarDateSchema;

// ── Query input ───────────────────────────────────────────────────────────────────────

/** Longest calendar span one request may ask for, days (two years of bloom windows). */
export const MAX_CALENDAR_SPAN_DAYS = 731;
/** Calendar span when `to` is not given, days. */
export const DEFAULT_CALENDAR_SPAN_DAYS = 180;

export const attentionQuerySchema = z.object({ date: date.optional() });

export const calendarQuerySchema = z
  .object({ from: date.optional(), to: date.optional(), on: date.optional() })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'The end date comes on or after the start date' })
  .refine(
    (q) => !q.from || !q.to || (Date.parse(q.to) - Date.parse(q.from)) / 86_400_000 <= MAX_CALENDAR_SPAN_DAYS,
    { path: ['to'], message: `At most ${MAX_CALENDAR_SPAN_DAYS} days from the start date` },
  );

export const compareGroupings = ['family', 'medium', 'area'] as const;
export const compareQuerySchema = z
  .object({
    by: z.enum(compareGroupings, { error: 'Compare by family, medium or area' }),
    plantId: idSchema.optional(),
  })
  .refine((q) => q.by !== 'family' || q.plantId !== undefined, {
    path: ['plantId'],
    message: 'Choose a plant of the division family to compare',
  });

export type CalendarQuery = z.infer<typeof calendarQuerySchema>;
export type CompareQuery = z.infer<typeof compareQuerySchema>;

// ── Pieces ────────────────────────────────────────────────────────────────────────────

export const fitMethods = ['free', 'scale-only-plant-shape', 'scale-only-genus-shape', 'insufficient'] as const;
export const fitQualities = ['good', 'fair', 'poor', 'none'] as const;

export const leadCurveFitSchema = z
  .object({
    method: z.enum(fitMethods),
    matureHeightMm: num.min(0),
    interval80: z.object({ lowMm: num.min(0), highMm: num.min(0) }),
    standardErrorMm: num.min(0).nullable(),
    midpointDays: num,
    scaleDays: num,
    maturityDays: num,
    maturityDate: date,
    residualSdMm: num.min(0).nullable(),
    n: int.min(0),
    degreesOfFreedom: num.min(0),
    rSquared: num.nullable(),
    quality: z.enum(fitQualities),
    ageDaysToday: int,
    expectedHeightTodayMm: num.min(0),
    notes: z.array(z.string()),
  })
  .refine((f) => f.interval80.lowMm <= f.matureHeightMm && f.matureHeightMm <= f.interval80.highMm, {
    path: ['interval80'],
    message: 'the interval must hold its own estimate',
  });

export const priorLeadComparisonSchema = z.object({
  leadId: idSchema,
  season: int,
  heightAtSameAgeMm: num.nullable(),
  sizeRatio: num.nullable(),
  daysAhead: int.nullable(),
  finalHeightMm: num.nullable(),
});

export const priorYearVerdicts = ['ahead', 'level', 'behind', 'expected_smaller', 'no_history'] as const;
export const priorYearsComparisonSchema = z.object({
  ageDays: int.nullable(),
  heightMm: num.nullable(),
  lastSeason: priorLeadComparisonSchema.nullable(),
  earlier: z.array(priorLeadComparisonSchema),
  verdict: z.enum(priorYearVerdicts),
  shareOfLastSeasonFinal: num.nullable(),
  notes: z.array(z.string()),
});

export const flagKinds = ['stalled', 'aborted'] as const;
export const flagSeverities = ['warning', 'alert'] as const;
export const leadFlagSchema = z.object({
  kind: z.enum(flagKinds),
  severity: z.enum(flagSeverities),
  reason: z.string(),
  plantId: idSchema,
  leadId: idSchema,
  stalledSince: date.nullable(),
  stallDays: int.nullable(),
  shareOfReference: num.nullable(),
});

export const dateWindowSchema = z
  .object({ p10: date, p50: date, p90: date })
  .refine((w) => w.p10 <= w.p50 && w.p50 <= w.p90, { message: 'percentile dates must be in order' });

export const bloomStages = [
  'growing',
  'bulb_mature',
  'sheath_forming',
  'sheath_empty',
  'sheath_dry',
  'buds_in_sheath',
  'buds_visible',
  'in_flower',
  'faded',
  'lost',
] as const;
export const bloomTimings = ['record', 'forecast', 'late', 'unlikely', 'none'] as const;
export const bloomForecastSchema = z.object({
  leadId: idSchema,
  stage: z.enum(bloomStages),
  stageDate: date.nullable(),
  timing: z.enum(bloomTimings),
  firstOpen: dateWindowSchema.nullable(),
  late: z.object({ likelyWas: date, daysLate: int.min(1) }).nullable(),
  latestPlausible: date.nullable(),
  lastFadedLikely: date.nullable(),
  mode: z.enum(['days', 'degree-days']),
  chance: share,
  chanceReasons: z.array(z.string()),
  expectedFlowers: z.object({
    count: int.min(0),
    perSpike: num.min(0),
    spikes: int.min(0),
    basis: z.enum(['plant-by-size', 'plant-mean', 'genus']),
  }),
  history: z.object({ seasons: int.min(0), weight: share }),
  shareGone: share,
  heldOutHalfWidthDays: num.min(0).nullable(),
  notes: z.array(z.string()),
});

export const chanceLevels = ['almost_certain', 'likely', 'possible', 'unlikely', 'very_unlikely'] as const;
export const chipTones = ['ok', 'warning', 'alert', 'neutral', 'bloom'] as const;

/** A lead's story (`leadStory`): the sentences every screen and mail shows for it. */
export const leadStorySchema = z.object({
  leadId: idSchema,
  chip: z.object({ label: z.string(), tone: z.enum(chipTones) }),
  stage: z.enum(bloomStages),
  stageLabel: z.string(),
  size: z.string().nullable(),
  growth: z.string().nullable(),
  flag: z.string().nullable(),
  bloom: z.string(),
  chance: z.object({ value: share, level: z.enum(chanceLevels), word: z.string(), dots: z.string() }).nullable(),
  figures: z.object({
    ageDays: int.nullable(),
    heightMm: num.nullable(),
    ofLastSeasonAtSameAge: num.nullable(),
    ofLastSeasonFinal: num.nullable(),
    lastSeasonFinalMm: num.nullable(),
    daysAhead: int.nullable(),
    timing: z.enum(bloomTimings),
    uncertain: z.boolean(),
  }),
});

export const forecastStages = ['growing', 'mature', 'sheath', 'buds'] as const;

const figures = z.object({
  n: int.min(0),
  medianAbsErrorDays: num.min(0).nullable(),
  shareInside80: share.nullable(),
  naive: z.object({ n: int.min(0), medianAbsErrorDays: num.min(0).nullable() }),
  beatsNaive: z.boolean().nullable(),
});

/**
 * Leave-one-season-out figures without the per-lead rows: the headline ones (forecasts made on
 * the day the lead matured) and the same by the stage the lead was at when forecast.
 */
export const backtestFiguresSchema = figures.extend({
  byStage: z.object({ growing: figures, mature: figures, sheath: figures, buds: figures }),
});

export const backtestRowSchema = z.object({
  plantId: idSchema,
  leadId: idSchema,
  season: int,
  stage: z.enum(forecastStages),
  atMaturity: z.boolean(),
  asOf: date,
  actual: date,
  forecast: dateWindowSchema,
  signedErrorDays: int,
  errorDays: int.min(0),
  inside80: z.boolean(),
  naive: date.nullable(),
  naiveErrorDays: int.min(0).nullable(),
});

const leadRefFields = {
  plantId: idSchema,
  leadId: idSchema,
  plantTag: z.string(),
  leadLabel: z.string(),
};

// ── GET /leads/:leadId/forecast ───────────────────────────────────────────────────────

export const leadForecastSchema = z.object({
  today: date,
  lead: z.object({
    id: idSchema,
    plantId: idSchema,
    season: int,
    label: z.string(),
    firstSeen: date,
    status: leadStatusSchema,
  }),
  fit: leadCurveFitSchema,
  priorYears: priorYearsComparisonSchema,
  flags: z.array(leadFlagSchema),
  bloom: bloomForecastSchema,
  story: leadStorySchema,
  /** How far this plant's own bloom forecasts were off in earlier seasons (inherited seasons included). */
  trust: backtestFiguresSchema,
  /** The same at the lead's stage, in words. */
  trustSentence: z.string(),
});

// ── GET /lead-stories ─────────────────────────────────────────────────────────────────

/** The story of every current lead of the collection's plants (what Plants, a plant and Rounds show beside each lead). */
export const leadStoriesSchema = z.object({
  today: date,
  stories: z.array(z.object({ plantId: idSchema, leadId: idSchema, story: leadStorySchema })),
});

// ── GET /plants/:plantId/trend ────────────────────────────────────────────────────────

export const flagHistoryEntrySchema = z.object({
  leadId: idSchema,
  season: int,
  leadLabel: z.string(),
  kind: z.enum(flagKinds),
  severity: z.enum(flagSeverities),
  /** First date (a measurement date, or today for a grower's mark) on which the flag stood. */
  firstFlaggedOn: date,
  /** The reason as it read on the last date the flag stood. */
  reason: z.string(),
  lastFlaggedOn: date,
});

export const plantTrendSchema = z.object({
  plantId: idSchema,
  today: date,
  seasons: z.array(
    z.object({
      season: int,
      matureHeightMm: num.min(0),
      leadId: idSchema,
      /** Kept out of the line: this season's lead was expected to be smaller. */
      excluded: z.boolean(),
      /** Why, when excluded (first lead after a division, back bulb). */
      note: z.string().nullable(),
    }),
  ),
  slopeMmPerSeason: num.nullable(),
  rSquared: num.nullable(),
  residualSdMm: num.nullable(),
  excludedSeasons: z.array(int),
  notes: z.array(z.string()),
  flagHistory: z.array(flagHistoryEntrySchema),
});

// ── GET /attention ────────────────────────────────────────────────────────────────────

export const attentionKinds = ['aborted', 'stalled', 'sheath', 'bloom', 'measure'] as const;
export const attentionItemSchema = z.object({
  kind: z.enum(attentionKinds),
  target: z.object({ plantId: idSchema, leadId: idSchema }),
  reason: z.string(),
  date: date.nullable(),
  flag: leadFlagSchema.nullable(),
  plantTag: z.string(),
  leadLabel: z.string(),
  story: leadStorySchema,
});
export const attentionListSchema = z.object({ date, items: z.array(attentionItemSchema) });

// ── GET /calendar ─────────────────────────────────────────────────────────────────────

export const calendarWindowSchema = z.object({
  ...leadRefFields,
  season: int,
  stage: z.enum(bloomStages),
  firstOpen: dateWindowSchema,
  lastFadedLikely: date.nullable(),
  /** From the earliest first flower to the latest likely fade: the days the lead may be in flower. */
  span: z.object({ start: date, end: date }),
  chance: share,
  expectedFlowers: int.min(0),
  story: leadStorySchema,
});

export const inFlowerOnSchema = z.object({
  ...leadRefFields,
  chance: share,
  /** The day falls between the likely first flower (50th percentile) and the likely fade. */
  likely: z.boolean(),
  firstOpen: dateWindowSchema,
  lastFadedLikely: date.nullable(),
});

export const bloomCalendarSchema = z.object({
  today: date,
  from: date,
  to: date,
  windows: z.array(calendarWindowSchema),
  on: date.nullable(),
  /** With `on`: leads whose span covers that day, likeliest first; null without it. */
  inFlowerOn: z.array(inFlowerOnSchema).nullable(),
});

// ── GET /backtest ─────────────────────────────────────────────────────────────────────

export const backtestSchema = backtestFiguresSchema.extend({ rows: z.array(backtestRowSchema) });

// ── GET /compare ──────────────────────────────────────────────────────────────────────

export const welchTTestSchema = z.object({ meanA: num, meanB: num, difference: num, t: num, df: num.min(0), pValue: share });
export const rankTestSchema = z.object({ u: num, z: num, pValue: share });

export const compareGroupSchema = z.object({
  name: z.string(),
  plants: z.array(
    z.object({
      plantId: idSchema,
      plantTag: z.string(),
      firstSeason: int.nullable(),
      seasons: z.array(z.object({ season: int, matureHeightMm: num.min(0), relative: num.min(0) })),
      meanAfterFirst: num.nullable(),
    }),
  ),
  plantsCompared: int.min(0),
  bySeason: z.array(z.object({ season: int, meanRelative: num, plants: int.min(0) })),
});

export const comparisonSchema = z.object({
  today: date,
  by: z.enum(compareGroupings),
  plantId: idSchema.nullable(),
  groups: z.array(compareGroupSchema),
  /** Between the first two groups (the tests need two). */
  difference: z
    .object({ between: z.tuple([z.string(), z.string()]), welch: welchTTestSchema.nullable(), rank: rankTestSchema.nullable() })
    .nullable(),
  warnings: z.array(z.string()),
});

export type LeadStoryResponse = z.infer<typeof leadStorySchema>;
export type LeadStoriesResponse = z.infer<typeof leadStoriesSchema>;
export type LeadForecastResponse = z.infer<typeof leadForecastSchema>;
export type PlantTrendResponse = z.infer<typeof plantTrendSchema>;
export type AttentionListResponse = z.infer<typeof attentionListSchema>;
export type BloomCalendarResponse = z.infer<typeof bloomCalendarSchema>;
export type BacktestResponse = z.infer<typeof backtestSchema>;
export type ComparisonResponse = z.infer<typeof comparisonSchema>;
