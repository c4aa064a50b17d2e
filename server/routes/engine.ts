import { Router, type Request, type Response } from 'express';
import type { z } from 'zod';
import {
  addDays,
  attentionList,
  backtestBloomForecasts,
  summarizeBacktest,
  compareGroups,
  daysBetween,
  earlierLeadShapes,
  expectedSmaller,
  forecastLead,
  genusDefaultsFor,
  isIsoDate,
  lineageRoot,
  leadFlags,
  matureSizeTrend,
  maturedOn,
  type BacktestRow,
  type BloomHistory,
  type ComparePlant,
  type IsoDate,
  plantTrust,
  storyOf,
  trustSentence,
  type LeadForecast,
  type LeadShape,
  type LeadStory,
} from '@/domain';
import {
  attentionListSchema,
  attentionQuerySchema,
  backtestSchema,
  bloomCalendarSchema,
  calendarQuerySchema,
  comparisonSchema,
  compareQuerySchema,
  DEFAULT_CALENDAR_SPAN_DAYS,
  leadForecastSchema,
  leadStoriesSchema,
  MAX_CALENDAR_SPAN_DAYS,
  plantTrendSchema,
  type AttentionListResponse,
  type BacktestResponse,
  type BloomCalendarResponse,
  type ComparisonResponse,
  type PlantTrendResponse,
} from '@/shared/schemas/engine';
import type { AppContext } from '../context';
import { fieldError, notFound } from '../errors';
import { requireRole } from '../middleware/access';
import {
  areaNames,
  EngineCache,
  PreparedAnswer,
  ShapeCache,
  loadCollectionEngineData,
  loadPlantEngineData,
  plantIdOfLead,
  type EngineData,
  type EnginePlant,
} from '../services/engine-data';
import { pathId } from '../services/records-support';
import { parse } from '../validate';

const base = '/collections/:collectionId';

/**
 * Checks an answer against its contract before it is sent. A mismatch (say, a NaN from the
 * engine) is the server's fault: it becomes a logged 500, not the 400 a ZodError would give.
 */
export function checked<S extends z.ZodType>(schema: S, value: unknown): z.infer<S> {
  const result = schema.safeParse(value);
  if (!result.success) throw new Error(`engine answer breaks its contract: ${result.error.message}`);
  return result.data;
}

/** Today's calendar date in UTC: the one place the engine's `today` is read from the clock. */
export function todayUtc(now = new Date()): IsoDate {
  return now.toISOString().slice(0, 10);
}

/**
 * The plant's current leads on `today`: its own leads first seen by then, not removed, of its
 * latest own season or still growing (the set the attention list considers).
 */
export function currentLeads(p: EnginePlant, today: IsoDate): BloomHistory[] {
  const visible = p.ownLeads.filter((h) => h.lead.firstSeen <= today && h.lead.status !== 'removed');
  if (visible.length === 0) return [];
  const latest = Math.max(...visible.map((h) => h.lead.season));
  return visible.filter((h) => h.lead.season === latest || h.lead.status === 'growing');
}

/** Earlier-lead shapes of a plant per season: from `shapes` when given, else fitted once per call. */
function shapesOf(p: EnginePlant, today: IsoDate, shapes?: ShapeCache): (season: number) => readonly LeadShape[] {
  if (shapes) return (season) => shapes.get(p, season, today);
  const genus = genusDefaultsFor(p.plant.genus);
  const memo = new Map<number, readonly LeadShape[]>();
  return (season) => {
    let found = memo.get(season);
    if (!found) {
      found = earlierLeadShapes(p.leads, genus, season, today);
      memo.set(season, found);
    }
    return found;
  };
}

/** A current lead's forecast with its story, as every screen shows it. */
export interface CurrentForecast {
  p: EnginePlant;
  h: BloomHistory;
  f: LeadForecast;
  story: LeadStory;
}

/** Forecasts and stories of every current lead of the data, as the lead page would show them. */
export function currentForecasts(data: EngineData, today: IsoDate, shapeCache?: ShapeCache): CurrentForecast[] {
  const out: CurrentForecast[] = [];
  for (const p of data.plants) {
    if (!p.active) continue;
    const shapes = shapesOf(p, today, shapeCache);
    const leads = currentLeads(p, today);
    if (leads.length === 0) continue;
    for (const h of leads) {
      const f = forecastLead({
        plant: p.plant,
        leads: p.leads,
        leadId: h.lead.id,
        today,
        priorShapes: shapes(h.lead.season),
        seasonStartMonth: data.seasonStartMonth,
      });
      if (f) out.push({ p, h, f, story: storyOf(h, f, today, data.units) });
    }
  }
  return out;
}

/**
 * Leave-one-season-out figures over the data: each plant is tested with its inherited history
 * (a division's forecasts use its parent's seasons), but only on its own leads, so a parent's
 * season is never counted twice. Summary as in `backtestBloomForecasts`.
 */
export function collectionBacktest(data: EngineData): BacktestResponse {
  const rows: BacktestRow[] = [];
  for (const p of data.plants) {
    const own = new Set(p.ownLeads.map((h) => h.lead.id));
    for (const row of backtestBloomForecasts([{ plant: p.plant, leads: p.leads }]).rows) if (own.has(row.leadId)) rows.push(row);
  }
  return summarizeBacktest(rows);
}

/**
 * Flags a plant's own leads carried over time: each lead is replayed as of each of its
 * measurement dates (as a growing lead, up to its maturity for a lead now mature), and the
 * grower's dried-off / rotted mark is added as of `today`. One entry per lead and flag kind.
 */
export function flagHistory(p: EnginePlant, today: IsoDate, shapeCache?: ShapeCache): PlantTrendResponse['flagHistory'] {
  const genus = genusDefaultsFor(p.plant.genus);
  const shapes = shapesOf(p, today, shapeCache);
  const entries = new Map<string, PlantTrendResponse['flagHistory'][number]>();
  const record = (h: BloomHistory, on: IsoDate, flags: ReturnType<typeof leadFlags>) => {
    for (const flag of flags) {
      const key = `${h.lead.id}:${flag.kind}`;
      const prev = entries.get(key);
      entries.set(key, {
        leadId: h.lead.id,
        season: h.lead.season,
        leadLabel: h.lead.label,
        kind: flag.kind,
        severity: flag.severity,
        firstFlaggedOn: prev?.firstFlaggedOn ?? on,
        lastFlaggedOn: on,
        reason: flag.reason,
      });
    }
  };
  for (const h of p.ownLeads) {
    if (h.lead.status === 'removed') continue;
    const until = h.lead.status === 'mature' ? maturedOn(h, genus, today) : today;
    const asGrowing: BloomHistory = { ...h, lead: { ...h.lead, status: 'growing' } };
    const dates = [...new Set(h.measurements.map((m) => m.date))].filter((d) => d <= today && (until === null || d < until)).sort();
    for (const d of dates) {
      record(h, d, leadFlags({ current: asGrowing, plantLeads: p.leads, plant: p.plant, genusDefaults: genus, priorShapes: shapes(h.lead.season), today: d }));
    }
    if (h.lead.status === 'dried_off' || h.lead.status === 'rotted') {
      record(h, today, leadFlags({ current: h, plantLeads: p.leads, plant: p.plant, genusDefaults: genus, priorShapes: shapes(h.lead.season), today }));
    }
  }
  return [...entries.values()].sort((a, b) => (a.firstFlaggedOn < b.firstFlaggedOn ? -1 : a.firstFlaggedOn > b.firstFlaggedOn ? 1 : a.leadId.localeCompare(b.leadId)));
}

export function plantTrend(p: EnginePlant, today: IsoDate, shapeCache?: ShapeCache): PlantTrendResponse {
  const trend = matureSizeTrend({ plant: p.plant, plantLeads: p.leads, today });
  const allLeads = p.leads.map((h) => h.lead);
  const leadOf = new Map(p.leads.map((h) => [h.lead.id, h.lead]));
  const seasons = trend.seasons.map((s) => {
    const excluded = trend.excludedSeasons.includes(s.season);
    const lead = leadOf.get(s.leadId);
    return { ...s, excluded, note: excluded && lead ? expectedSmaller(lead, p.plant, allLeads) : null };
  });
  const notes: string[] = [];
  for (const s of seasons) if (s.note) notes.push(`season ${s.season} left out of the trend: ${s.note}`);
  if (trend.slopeMmPerSeason === null) notes.push('fewer than two comparable seasons: no trend yet');
  const own = new Set(p.ownLeads.map((h) => h.lead.id));
  const inherited = trend.seasons.filter((s) => !own.has(s.leadId)).map((s) => s.season);
  if (inherited.length) {
    notes.push(`${inherited.length === 1 ? 'season' : 'seasons'} ${inherited.join(', ')} ${inherited.length === 1 ? 'is' : 'are'} the parent plant's, before the division`);
  }
  return {
    plantId: p.plant.id,
    today,
    seasons,
    slopeMmPerSeason: trend.slopeMmPerSeason,
    rSquared: trend.rSquared,
    residualSdMm: trend.residualSdMm,
    excludedSeasons: trend.excludedSeasons,
    notes,
    flagHistory: flagHistory(p, today, shapeCache),
  };
}

/** The days a forecast lead may be in flower: earliest first flower to latest likely fade. */
function flowerSpan(f: LeadForecast): { start: IsoDate; end: IsoDate } | null {
  const w = f.bloom.firstOpen;
  if (!w) return null;
  const likelyDays = f.bloom.lastFadedLikely ? Math.max(0, daysBetween(w.p50, f.bloom.lastFadedLikely)) : 0;
  const end = addDays(w.p90, likelyDays);
  return { start: w.p10, end: f.bloom.lastFadedLikely && f.bloom.lastFadedLikely > end ? f.bloom.lastFadedLikely : end };
}

export function bloomCalendar(
  data: EngineData,
  today: IsoDate,
  from: IsoDate,
  to: IsoDate,
  on: IsoDate | null,
  shapeCache?: ShapeCache,
): BloomCalendarResponse {
  const windows: BloomCalendarResponse['windows'] = [];
  const inFlower: NonNullable<BloomCalendarResponse['inFlowerOn']> = [];
  for (const { p, h, f, story } of currentForecasts(data, today, shapeCache)) {
    const span = flowerSpan(f);
    if (!span || !f.bloom.firstOpen || f.bloom.stage === 'lost') continue;
    const ref = { plantId: p.plant.id, leadId: h.lead.id, plantTag: p.tag, leadLabel: h.lead.label };
    if (span.start <= to && span.end >= from) {
      windows.push({
        ...ref,
        season: h.lead.season,
        stage: f.bloom.stage,
        firstOpen: f.bloom.firstOpen,
        lastFadedLikely: f.bloom.lastFadedLikely,
        span,
        chance: f.bloom.chance,
        expectedFlowers: f.bloom.expectedFlowers.count,
        story,
      });
    }
    if (on && span.start <= on && on <= span.end) {
      const likelyEnd = f.bloom.lastFadedLikely ?? f.bloom.firstOpen.p90;
      inFlower.push({
        ...ref,
        chance: f.bloom.chance,
        likely: f.bloom.firstOpen.p50 <= on && on <= likelyEnd,
        firstOpen: f.bloom.firstOpen,
        lastFadedLikely: f.bloom.lastFadedLikely,
      });
    }
  }
  windows.sort((a, b) => (a.firstOpen.p50 < b.firstOpen.p50 ? -1 : a.firstOpen.p50 > b.firstOpen.p50 ? 1 : a.plantTag.localeCompare(b.plantTag)));
  inFlower.sort((a, b) => Number(b.likely) - Number(a.likely) || b.chance - a.chance || a.plantTag.localeCompare(b.plantTag));
  return { today, from, to, windows, on, inFlowerOn: on ? inFlower : null };
}

const clampShare = (v: number) => Math.min(1, Math.max(0, v));

export function compareBy(
  data: EngineData,
  by: 'family' | 'medium' | 'area',
  plantId: string | null,
  today: IsoDate,
  areaName: Map<string, string>,
): ComparisonResponse {
  const entry = (p: EnginePlant): ComparePlant => ({ plant: p.plant, leads: p.ownLeads });
  let groups: Array<{ name: string; members: EnginePlant[] }>;
  if (by === 'family') {
    const all = data.plants.map((p) => p.plant);
    const root = lineageRoot(plantId!, all);
    const family = data.plants
      .filter((p) => lineageRoot(p.plant.id, all) === root)
      .sort((a, b) => Number(b.plant.id === root) - Number(a.plant.id === root) || (a.plant.dividedOn ?? '').localeCompare(b.plant.dividedOn ?? '') || a.tag.localeCompare(b.tag));
    groups = family.map((p) => ({ name: p.tag, members: [p] }));
  } else {
    const named = new Map<string, EnginePlant[]>();
    for (const p of data.plants) {
      const name = by === 'medium' ? (p.plant.medium ?? 'no medium recorded') : ((p.plant.areaId && areaName.get(p.plant.areaId)) ?? 'no area');
      named.set(name, [...(named.get(name) ?? []), p]);
    }
    groups = [...named.entries()].map(([name, members]) => ({ name, members })).sort((a, b) => b.members.length - a.members.length || a.name.localeCompare(b.name));
  }
  const result = compareGroups({ groups: groups.map((g) => ({ name: g.name, plants: g.members.map(entry) })), today });
  return {
    today,
    by,
    plantId,
    groups: result.groups.map((g) => ({
      ...g,
      plants: g.plants.map((x) => ({ ...x, plantTag: data.plantById.get(x.plantId)?.tag ?? '' })),
    })),
    difference:
      result.difference && groups.length >= 2
        ? {
            between: [result.groups[0].name, result.groups[1].name],
            // p-values clamped to [0, 1] against rounding in the incomplete beta.
            welch: result.difference.welch && { ...result.difference.welch, pValue: clampShare(result.difference.welch.pValue) },
            rank: result.difference.rank && { ...result.difference.rank, pValue: clampShare(result.difference.rank.pValue) },
          }
        : null,
    warnings: result.warnings,
  };
}

/**
 * The single season whose earlier-lead shapes `attentionList` would fit for this plant on
 * `date` (it considers the leads first seen by then, not removed, of the latest season or still
 * growing); null when it would fit more than one, so the shapes cannot be handed in.
 */
function attentionSeason(p: EnginePlant, date: IsoDate): number | null {
  const visible = p.leads.filter((h) => isIsoDate(h.lead.firstSeen) && h.lead.firstSeen <= date);
  if (visible.length === 0) return null;
  const latest = Math.max(...visible.map((h) => h.lead.season));
  const seasons = new Set(visible.filter((h) => h.lead.status !== 'removed' && (h.lead.season === latest || h.lead.status === 'growing')).map((h) => h.lead.season));
  return seasons.size === 1 ? [...seasons][0] : null;
}

/**
 * The attention list with names for display. Inherited leads are history only: an item is kept
 * only when it links to the plant that owns the lead. With `shapeCache`, earlier-lead shapes
 * are handed in where that cannot change the answer (one season's shapes per plant).
 */
export function attentionItems(data: EngineData, date: IsoDate, shapeCache?: ShapeCache): AttentionListResponse['items'] {
  return attentionList(
    data.plants.filter((p) => p.active).map((p) => {
      const season = shapeCache ? attentionSeason(p, date) : null;
      return { plant: p.plant, leads: p.leads, priorShapes: season === null ? undefined : shapeCache!.get(p, season, date) };
    }),
    date,
    { seasonStartMonth: data.seasonStartMonth, units: data.units },
  )
    .filter((item) => data.leadById.get(item.target.leadId)?.plantId === item.target.plantId)
    .map((item) => ({
      kind: item.kind,
      target: item.target,
      reason: item.reason,
      date: item.date,
      flag: item.flag ?? null,
      plantTag: data.plantById.get(item.target.plantId)!.tag,
      leadLabel: data.leadById.get(item.target.leadId)!.history.lead.label,
      story: item.story,
    }));
}

export function engineRoutes({ db, fingerprints }: AppContext): Router {
  const router = Router();
  const viewer = requireRole(db, 'viewer');
  const cache = new EngineCache();
  const shapeCache = new ShapeCache();

  /**
   * A whole-collection answer, recomputed only when the collection's records changed; kept as
   * the JSON text sent (null when `compute` found nothing to answer).
   */
  async function collectionAnswer(collectionId: string, key: string, compute: (data: EngineData) => unknown): Promise<PreparedAnswer | null> {
    const fingerprint = await fingerprints.get(collectionId);
    return cache.get(`${collectionId}|${key}`, fingerprint, async () => {
      const body = await compute(await loadCollectionEngineData(db, collectionId));
      return body === null ? null : new PreparedAnswer(JSON.stringify(body));
    });
  }
  /**
   * Sends a prepared answer: 304 when the client's If-None-Match holds its ETag (Express checks
   * freshness in `send`), else the bytes, gzipped from the cache when the client takes gzip (the
   * compression middleware leaves a response that already has a Content-Encoding alone).
   */
  const sendJson = (req: Request, res: Response, answer: PreparedAnswer) => {
    res.type('application/json').set('ETag', answer.etag).vary('Accept-Encoding');
    if (req.acceptsEncodings('gzip', 'identity') === 'gzip') res.set('Content-Encoding', 'gzip').send(answer.gzip);
    else res.send(answer.body);
  };

  router.get(`${base}/leads/:leadId/forecast`, viewer, async (req, res) => {
    const { collectionId } = res.locals.membership!;
    const leadId = pathId(req.params.leadId, 'That lead');
    const plantId = await plantIdOfLead(db, collectionId, leadId);
    const loaded = plantId ? await loadPlantEngineData(db, collectionId, plantId) : null;
    if (!loaded) throw notFound('That lead');
    const today = todayUtc();
    const p = loaded.plant;
    const own = p.ownLeads.find((h) => h.lead.id === leadId);
    if (!own) throw notFound('That lead');
    const { lead } = own;
    const f = forecastLead({
      plant: p.plant,
      leads: p.leads,
      leadId,
      today,
      priorShapes: shapeCache.get(p, lead.season, today),
      seasonStartMonth: loaded.data.seasonStartMonth,
    })!;
    const trust = plantTrust(p.plant, p.leads);
    res.json(
      checked(leadForecastSchema, {
        today,
        lead: { id: lead.id, plantId: lead.plantId, season: lead.season, label: lead.label, firstSeen: lead.firstSeen, status: lead.status },
        fit: f.fit,
        priorYears: f.priorYears,
        flags: f.flags,
        bloom: f.bloom,
        story: storyOf(own, f, today, loaded.data.units),
        trust,
        trustSentence: trustSentence(f, trust),
      }),
    );
  });

  router.get(`${base}/plants/:plantId/trend`, viewer, async (req, res) => {
    const plantId = pathId(req.params.plantId, 'That plant');
    const loaded = await loadPlantEngineData(db, res.locals.membership!.collectionId, plantId);
    if (!loaded) throw notFound('That plant');
    res.json(checked(plantTrendSchema, plantTrend(loaded.plant, todayUtc(), shapeCache)));
  });

  router.get(`${base}/attention`, viewer, async (req, res) => {
    const query = parse(attentionQuerySchema, req.query, 'query');
    const date = query.date ?? todayUtc();
    const body = await collectionAnswer(res.locals.membership!.collectionId, `attention|${date}`, (data) =>
      checked(attentionListSchema, { date, items: attentionItems(data, date, shapeCache) }),
    );
    sendJson(req, res, body!);
  });

  router.get(`${base}/calendar`, viewer, async (req, res) => {
    const query = parse(calendarQuerySchema, req.query, 'query');
    const today = todayUtc();
    const from = query.from ?? today;
    const to = query.to ?? addDays(from, DEFAULT_CALENDAR_SPAN_DAYS);
    if (to < from) throw fieldError('query.to', 'The end date comes on or after the start date');
    if (daysBetween(from, to) > MAX_CALENDAR_SPAN_DAYS) throw fieldError('query.to', `At most ${MAX_CALENDAR_SPAN_DAYS} days from the start date`);
    const on = query.on ?? null;
    const body = await collectionAnswer(res.locals.membership!.collectionId, `calendar|${today}|${from}|${to}|${on}`, (data) =>
      checked(bloomCalendarSchema, bloomCalendar(data, today, from, to, on, shapeCache)),
    );
    sendJson(req, res, body!);
  });

  router.get(`${base}/lead-stories`, viewer, async (req, res) => {
    const today = todayUtc();
    const body = await collectionAnswer(res.locals.membership!.collectionId, `stories|${today}`, (data) =>
      checked(leadStoriesSchema, {
        today,
        stories: currentForecasts(data, today, shapeCache).map(({ p, h, story }) => ({ plantId: p.plant.id, leadId: h.lead.id, story })),
      }),
    );
    sendJson(req, res, body!);
  });

  router.get(`${base}/backtest`, viewer, async (req, res) => {
    const body = await collectionAnswer(res.locals.membership!.collectionId, 'backtest', (data) => checked(backtestSchema, collectionBacktest(data)));
    sendJson(req, res, body!);
  });

  router.get(`${base}/compare`, viewer, async (req, res) => {
    const query = parse(compareQuerySchema, req.query, 'query');
    const { collectionId } = res.locals.membership!;
    const today = todayUtc();
    const plantId = query.plantId ?? null;
    const body = await collectionAnswer(collectionId, `compare|${today}|${query.by}|${plantId}`, async (data) => {
      if (plantId && !data.plantById.has(plantId)) return null;
      const names = query.by === 'area' ? await areaNames(db, collectionId) : new Map<string, string>();
      return checked(comparisonSchema, compareBy(data, query.by, plantId, today, names));
    });
    if (!body) throw notFound('That plant');
    sendJson(req, res, body);
  });

  return router;
}
