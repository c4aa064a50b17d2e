/**
 * Bloom window of a lead, along the stages of `bloom-stage.ts`: growing → bulb mature (for a
 * sheathed genus, the sheath forming) → buds (in the sheath, or visible) → first flower open →
 * faded, with the empty and dry sheath beside the path.
 *
 * Intervals between stages are modelled as log-normal. The plant's own past intervals (one per
 * season) are shrunk toward the genus default with weight w = n/(n + k) on the log scale,
 * k = BLOOM_SHRINKAGE_K: with three seasons of history the plant and the genus count equally.
 * Once a lead has matured, the plant's own usual first-flower day (its past first-open dates
 * moved to this season) is blended in by precision, and the window is sized from the errors both
 * made on the plant's past seasons (`blendWithSeason`). Time then passes honestly
 * (`bloom-timing.ts`): the window is what is left of that distribution after today, the chance
 * falls as the lead stays closed past its likely day, and past its latest plausible day the lead
 * is probably not flowering this season.
 */
import { mean, median, quantile, sampleVariance } from 'simple-statistics';
import { budsInSheathOn, budsVisibleOn, flowersFromSheath, latestSheath, type BloomStage } from './bloom-stage';
import {
  byQuantiles,
  conditionedDay,
  LATEST_PLAUSIBLE_LEVEL,
  logNormalAfter,
  mixture,
  normalAfter,
  shareBy,
  widened,
  widenWindow,
  WINDOW_Z,
  Z80_HALF,
  type DateWindow,
  type DayDistribution,
  type LogNormal,
} from './bloom-timing';
import { addDays, daysBetween, fromDayNumber, isIsoDate, shiftedDayNumber, toDayNumber } from './dates';
import { countOnOrBefore, datedMeasurements } from './dated-measurements';
import {
  dailyDegreeDays,
  dateReachingDegreeDays,
  DEFAULT_DEGREE_DAY_METHOD,
  ORCHID_BASE_TEMP_C,
  recentDailyDegreeDays,
  sumDegreeDays,
  type DegreeDayOptions,
} from './degree-days';
import { normalQuantile } from './distributions';
import type { LeadFlag } from './flags';
import type { GenusDefaults, StageInterval } from './genus-defaults';
import { fitAsOfLastMeasurement, MIN_POINTS_FREE_FIT, type LeadCurveFit } from './growth-curve';
import { heightAtAge, linearFit, type LeadHistory } from './prior-years';
import type { BloomRecord, IsoDate, Measurement, TemperatureReading } from './types';

/** Pseudo-seasons of genus weight in the shrinkage n/(n + k) (chosen: equal weight at 3 seasons). */
export const BLOOM_SHRINKAGE_K = 3;
/** Share of full height at which a bulb without a sheath counts as mature (matches the curve's 95%). */
export const MATURE_HEIGHT_SHARE = 0.95;
/** Chance factors — common practice (from memory), not measured. */
export const CHANCE_FACTORS = {
  /** Summer bloomers whose sheath dried without buds rarely flower from it. */
  drySheathGreenBloomer: 0.3,
  /** Dry sheath on a plant whose habit is unknown (no dry-sheath bloom in its record). */
  drySheathUnknownHabit: 0.7,
  /** A sheath that looks empty against the light. */
  emptySheath: 0.8,
  /** A mature lead of a sheathed genus that formed no sheath. */
  noSheathOnMatureLead: 0.5,
  /** Lead under 70% of last season's. */
  muchSmallerLead: 0.6,
  /** Lead 70–90% of last season's. */
  smallerLead: 0.85,
} as const;
/**
 * Chance that visible buds open: high but not certain, since buds blast after a chill, a dry
 * spell, a move or ethylene (common practice).
 */
export const BUDS_OPEN_CHANCE = 0.95;
/** Chance is kept within these bounds unless the outcome is already known. */
export const CHANCE_BOUNDS = [0.02, 0.98] as const;
/** Spread (1 SD) of a predicted maturity date, days, before the plant's own leads say otherwise (chosen). */
export const MATURITY_DATE_SD_DAYS = 14;
/**
 * An empty or dry sheath where buds were expected: the rest of the path may still come (some
 * bloom from a dry sheath months later — common practice, REFERENCES.md) or wait for next season,
 * so the spread of the timing is multiplied by this (chosen, not measured).
 */
export const EMPTY_SHEATH_WIDEN = 1.5;
/**
 * Weight of the plant's plain mature → open interval beside the blend with its usual day: some
 * seasons run far from a plant's habit (buds held in the sheath for months — common practice,
 * REFERENCES.md), which a normal blend alone would call impossible after a few weeks (chosen).
 */
export const SEASON_OFF_HABIT_WEIGHT = 0.1;
/**
 * Fewest held-out errors of the plant (each past season forecast from the others, the way this
 * lead's forecast is made) before they set the narrowest window (chosen).
 */
export const MIN_HELD_OUT_ERRORS = 2;

export type { BloomStage } from './bloom-stage';
export type { DateWindow } from './bloom-timing';

/** The stage a forecast was made at, as the self-check reports it. */
export type ForecastStage = 'growing' | 'mature' | 'sheath' | 'buds';

/** The self-check's stage for a lead's bloom stage (null once in flower, faded or lost). */
export function forecastStageOf(stage: BloomStage): ForecastStage | null {
  switch (stage) {
    case 'growing':
      return 'growing';
    case 'bulb_mature':
      return 'mature';
    case 'sheath_forming':
    case 'sheath_empty':
    case 'sheath_dry':
      return 'sheath';
    case 'buds_in_sheath':
    case 'buds_visible':
      return 'buds';
    case 'in_flower':
    case 'faded':
    case 'lost':
      return null;
    default: {
      const unhandled: never = stage;
      return unhandled;
    }
  }
}

/**
 * How the first flower stands on `today`: a recorded date; a forecast still ahead; late (past its
 * likely date and not open); probably not this season (past its latest plausible date); or no
 * forecast at all (lost, a lead of a season long past, or no maturity date yet).
 */
export type BloomTiming = 'record' | 'forecast' | 'late' | 'unlikely' | 'none';

/** A past or current lead with its measurements and bloom record. */
export interface BloomHistory extends LeadHistory {
  bloom: BloomRecord | null;
}

export interface BloomForecast {
  leadId: string;
  stage: BloomStage;
  /** Date the lead reached its stage (first flower, buds, the sheath look, maturity), or null while growing. */
  stageDate: IsoDate | null;
  timing: BloomTiming;
  /**
   * First flower open: earliest (10th), likely (50th) and latest (90th percentile) of what is left
   * after today; the recorded date three times once open; null without a forecast.
   */
  firstOpen: DateWindow | null;
  /** When late: the date its record made likely (the median before today ruled days out), and how far past it today is. */
  late: { likelyWas: IsoDate; daysLate: number } | null;
  /** The last date the plant's record makes plausible for the first flower (LATEST_PLAUSIBLE_LEVEL), when there is a forecast. */
  latestPlausible: IsoDate | null;
  /** Likely date the last flower fades. */
  lastFadedLikely: IsoDate | null;
  mode: 'days' | 'degree-days';
  /** Probability (0–1) that this lead flowers this season, given everything up to today. */
  chance: number;
  chanceReasons: string[];
  expectedFlowers: { count: number; perSpike: number; spikes: number; basis: 'plant-by-size' | 'plant-mean' | 'genus' };
  /** Seasons of the plant's own history behind the interval, and the weight they got. */
  history: { seasons: number; weight: number };
  /**
   * Share (0–1) of the plant's usual timing for this lead that what is known rules out: days gone
   * by without a flower, and days too soon for buds not there at the last look. The chance is
   * conditioned on it.
   */
  shareGone: number;
  /** The narrowest window the plant's held-out errors at this stage allow (half width, days), when it applied. */
  heldOutHalfWidthDays: number | null;
  notes: string[];
}

/** The lead's validly dated measurements on or before `today` (all without), by date. */
function sortedMeasurements(h: LeadHistory, today?: IsoDate): readonly Measurement[] {
  const dated = datedMeasurements(h.measurements, h.lead.id);
  const end = countOnOrBefore(dated, today);
  return end === dated.ms.length ? dated.ms : dated.ms.slice(0, end);
}

function tallestOf(ms: readonly Measurement[]): number | null {
  let best: number | null = null;
  for (const m of ms) if (Number.isFinite(m.heightMm) && m.heightMm >= 0 && (best === null || m.heightMm > best)) best = m.heightMm;
  return best;
}

/**
 * `ms`: the lead's valid measurements up to the date of interest, sorted; `measurementsOf`: the
 * lead's stored list they came from, when given (the growth fit is then shared by list).
 */
function maturedOnSorted(ms: readonly Measurement[], lead: LeadHistory['lead'], genus: GenusDefaults, measurementsOf?: readonly Measurement[]): IsoDate | null {
  if (genus.bloomHabit !== 'no_sheath') {
    const sheathed = ms.find((m) => m.sheath !== 'none');
    if (sheathed) return sheathed.date;
  }
  if (lead.status === 'growing') return null;
  const tallest = tallestOf(ms);
  if (tallest === null || tallest <= 0) return null;
  const byHeight = ms.find((m) => m.heightMm >= MATURE_HEIGHT_SHARE * tallest)?.date ?? null;
  // A bulb keeps adding a few millimetres for months after it has hardened, so "95% of the
  // tallest" read off the measurements can land on a look taken long after growth stopped (the
  // day the buds were seen, say). With a free growth fit, the day its curve reaches 95% of the
  // mature height (the curve's own maturity, MATURITY_FRACTION) decides: the first look on or
  // after it.
  if (ms.length >= MIN_POINTS_FREE_FIT) {
    const fit = fitAsOfLastMeasurement(measurementsOf ?? ms, lead, genus, ms[ms.length - 1].date);
    if (fit && fit.method === 'free') {
      const onFit = ms.find((m) => m.date >= fit.maturityDate)?.date ?? null;
      if (onFit && (byHeight === null || onFit < byHeight)) return onFit;
    }
  }
  return byHeight;
}

/**
 * Maturity dates of finished earlier leads, remembered per measurement list (a growth fit each):
 * the same history is read by every forecast of the plant. Keyed on the list's identity, so a
 * caller that builds new lists gets fresh answers; the value is a pure function of the key.
 */
const maturityMemo = new WeakMap<
  readonly Measurement[],
  Array<{ genus: GenusDefaults; leadId: string; firstSeen: IsoDate; status: LeadHistory['lead']['status']; length: number; value: IsoDate | null }>
>();

function maturedOnCached(h: LeadHistory, ms: readonly Measurement[], genus: GenusDefaults): IsoDate | null {
  let entries = maturityMemo.get(h.measurements);
  if (!entries) {
    entries = [];
    maturityMemo.set(h.measurements, entries);
  }
  const { id, firstSeen, status } = h.lead;
  const length = h.measurements.length;
  const hit = entries.find((e) => e.genus === genus && e.leadId === id && e.firstSeen === firstSeen && e.status === status && e.length === length);
  if (hit) return hit.value;
  const value = maturedOnSorted(ms, h.lead, genus, h.measurements);
  entries.push({ genus, leadId: id, firstSeen, status, length, value });
  return value;
}

/**
 * Date the lead matured: the first measurement showing a sheath (forming, empty, budded, dry);
 * for a genus without a sheath, or a finished lead that never showed one, the first measurement
 * at ≥ 95% of its tallest height — only once the lead is no longer 'growing'. Null otherwise.
 * Measurements after `today` are ignored.
 */
export function maturedOn(h: LeadHistory, genus: GenusDefaults, today?: IsoDate): IsoDate | null {
  return maturedOnSorted(sortedMeasurements(h, today), h.lead, genus, h.measurements);
}

/**
 * Limited translation of the shrinkage (Efron & Morris 1971, "Limiting the risk of Bayes and
 * empirical Bayes estimators — Part I", JASA 66:807–815; Part II 1972, JASA 67:130–139): the
 * shrunk log-mean is moved from the plant's own log-mean toward the genus by at most this many
 * standard errors of the plant's mean. Efron & Morris's worked choice is one standard error.
 * A plant whose own seasons agree with each other but sit far from the genus default (a winter
 * bloomer of a genus that mostly flowers in autumn) keeps its own timing instead of being pulled
 * most of the way to the default; within that band the weight is plain n/(n + k).
 */
export const SHRINKAGE_MAX_SHIFT_SE = 1;

/**
 * Share of a genus default's spread (its log SD, across plants and seasons) that lies within one
 * plant from season to season; the rest is how plants of the genus differ (chosen: half, i.e. a
 * quarter of the variance — a plant keeps its own habit, common practice).
 */
export const WITHIN_PLANT_SPREAD_SHARE = 0.5;

/**
 * Shrinks the plant's own log-intervals toward a genus log-normal: μ = w·mean + (1 − w)·μ_g with
 * w = n/(n + k); σ² = w·s² + (1 − w)·(WITHIN_PLANT_SPREAD_SHARE·σ_g)² with n ≥ 2 seasons of its
 * own, σ_g² with fewer, inflated by
 * (1 + 1/(n + k)) for the uncertainty of μ. Non-positive intervals are dropped. With
 * `maxShiftSe`, the move from the plant's mean toward the genus is limited to that many standard
 * errors √(σ²/n) of the plant's mean (limited translation, SHRINKAGE_MAX_SHIFT_SE); `weight` is
 * then the effective weight of the plant's mean.
 */
export function shrinkLogInterval(
  plantDays: readonly number[],
  genus: LogNormal,
  k = BLOOM_SHRINKAGE_K,
  options: { maxShiftSe?: number } = {},
): LogNormal & { n: number; weight: number } {
  const logs = plantDays.filter((d) => Number.isFinite(d) && d > 0).map((d) => Math.log(d));
  const n = logs.length;
  let w = n / (n + k);
  const plantMean = n > 0 ? mean(logs) : genus.mu;
  let mu = n > 0 ? w * plantMean + (1 - w) * genus.mu : genus.mu;
  // Once the plant has seasons of its own, its season-to-season spread is shrunk toward the part
  // of the genus spread that lies within one plant (the rest is between plants).
  const priorVar = n >= 2 ? (WITHIN_PLANT_SPREAD_SHARE * genus.sigma) ** 2 : genus.sigma ** 2;
  const varPlant = n >= 2 ? sampleVariance(logs) : genus.sigma ** 2;
  const v = w * varPlant + (1 - w) * priorVar;
  if (n > 0 && options.maxShiftSe !== undefined && Number.isFinite(options.maxShiftSe) && options.maxShiftSe >= 0) {
    const maxShift = options.maxShiftSe * Math.sqrt(v / n);
    const shift = mu - plantMean;
    if (Math.abs(shift) > maxShift) {
      mu = plantMean + Math.sign(shift) * maxShift;
      const gap = plantMean - genus.mu;
      w = gap !== 0 ? (mu - genus.mu) / gap : w;
    }
  }
  return { mu, sigma: Math.sqrt(v * (1 + 1 / (n + k))), n, weight: w };
}

function genusLogNormal(i: StageInterval): LogNormal {
  return { mu: Math.log(i.medianDays), sigma: i.logSd };
}

/** Log-normal of the sum of two independent stage intervals, matched on the median and the log spread. */
function chainGenus(a: StageInterval, b: StageInterval): LogNormal {
  const total = a.medianDays + b.medianDays;
  const wa = a.medianDays / total;
  const wb = b.medianDays / total;
  return { mu: Math.log(total), sigma: Math.hypot(wa * a.logSd, wb * b.logSd) };
}

const Z10 = WINDOW_Z.p10;
const Z90 = WINDOW_Z.p90;

/** Past stage intervals of the plant, in days (and degree-days when readings are given). */
export interface PastIntervals {
  season: number;
  leadId: string;
  matureToOpenDays: number | null;
  budsToOpenDays: number | null;
  /** First look that found buds in the sheath → first flower (a sheathed genus only). */
  sheathBudsToOpenDays: number | null;
  openToFadedDays: number | null;
  matureToOpenDegreeDays: number | null;
  budsToOpenDegreeDays: number | null;
  bloomed: boolean;
  /** Bloomed after its sheath had been seen dry. */
  bloomedFromDrySheath: boolean;
  tallestMm: number | null;
  flowerCount: number | null;
  spikeCount: number | null;
  /** Date the lead matured and its first flower opened, when known (for the seasonal prior). */
  maturedOn: IsoDate | null;
  firstOpen: IsoDate | null;
}

/**
 * One row per finished earlier lead of the plant: stage intervals (days; degree-days when
 * readings cover them with no missing day), whether and how it bloomed, its size.
 */
export function pastIntervals(
  history: readonly BloomHistory[],
  genus: GenusDefaults,
  readings?: readonly TemperatureReading[],
  ddOptions?: DegreeDayOptions,
): PastIntervals[] {
  const dd = (from: IsoDate, to: IsoDate): number | null => {
    if (!readings || readings.length === 0 || !ddOptions || to <= from) return null;
    const s = sumDegreeDays(readings, from, to, ddOptions);
    return s.missingDays === 0 ? s.degreeDays : null;
  };
  const noReadings = !readings || readings.length === 0;
  return history.map((h) => {
    if (noReadings) {
      const hit = pastRowMemo.get(h);
      if (hit && hit.genus === genus && hit.lead === h.lead && hit.measurements === h.measurements && hit.count === h.measurements.length && hit.bloom === h.bloom) return hit.row;
    }
    const row = pastRow(h, genus, dd);
    if (noReadings) pastRowMemo.set(h, { genus, lead: h.lead, measurements: h.measurements, count: h.measurements.length, bloom: h.bloom, row });
    return row;
  });
}

/**
 * Rows of `pastIntervals` without temperature readings, remembered per history object: each
 * earlier lead is read by every forecast of the plant (each current lead, its flags, the
 * attention list). A hit needs the same genus and the same lead, measurement list (and length)
 * and bloom record objects, so a caller that builds new records gets a fresh row.
 */
const pastRowMemo = new WeakMap<
  BloomHistory,
  { genus: GenusDefaults; lead: BloomHistory['lead']; measurements: readonly Measurement[]; count: number; bloom: BloomRecord | null; row: PastIntervals }
>();

function pastRow(h: BloomHistory, genus: GenusDefaults, dd: (from: IsoDate, to: IsoDate) => number | null): PastIntervals {
  const ms = sortedMeasurements(h);
  const mature = maturedOnCached(h, ms, genus);
  const b = h.bloom;
  const budsOn = budsVisibleOn(b);
  const buds = budsOn && isIsoDate(budsOn) ? budsOn : null;
  const inSheath = budsInSheathOn(ms, genus);
  const open = b?.firstOpen && isIsoDate(b.firstOpen) ? b.firstOpen : null;
  const faded = b?.lastFaded && isIsoDate(b.lastFaded) ? b.lastFaded : null;
  const drySeen = ms.find((m) => m.sheath === 'dry');
  return {
    season: h.lead.season,
    leadId: h.lead.id,
    matureToOpenDays: mature && open ? daysBetween(mature, open) : null,
    budsToOpenDays: buds && open ? daysBetween(buds, open) : null,
    sheathBudsToOpenDays: inSheath && open && inSheath <= open ? daysBetween(inSheath, open) : null,
    openToFadedDays: open && faded ? daysBetween(open, faded) : null,
    matureToOpenDegreeDays: mature && open ? dd(mature, open) : null,
    budsToOpenDegreeDays: buds && open ? dd(buds, open) : null,
    bloomed: open !== null || (b?.flowerCount ?? 0) > 0,
    bloomedFromDrySheath: drySeen !== undefined && open !== null && drySeen.date <= open,
    tallestMm: tallestOf(ms),
    flowerCount: b?.flowerCount ?? null,
    spikeCount: b?.spikeCount ?? null,
    maturedOn: mature,
    firstOpen: open,
  };
}

export interface BloomForecastInput {
  current: BloomHistory;
  /** The plant's earlier leads (other seasons) with bloom records; the current lead is ignored if present. */
  history: readonly BloomHistory[];
  genusDefaults: GenusDefaults;
  /** The current lead's growth fit (for its maturity date and mature height), if any. */
  fit?: LeadCurveFit | null;
  today: IsoDate;
  /** Daily readings for the plant's area; switches to degree-day mode when they cover the history. */
  readings?: readonly TemperatureReading[];
  /** Degree-day settings; default base ORCHID_BASE_TEMP_C with the 'clamped' method and no cap. */
  degreeDays?: DegreeDayOptions;
  /**
   * The lead's stall/abort flags on `today` (`leadFlags`). An 'aborted' flag makes the lead
   * 'lost' (chance 0, the flag's reason given) unless it already shows buds or flowers.
   */
  flags?: readonly LeadFlag[];
  /**
   * Blend the plant's usual first-flower day into the window of a matured lead (`blendWithSeason`);
   * default true. Degree-day mode runs on the intervals alone.
   */
  seasonalPrior?: boolean;
  /**
   * The collection's growth year on `today` (its season start month applied). A lead two or more
   * seasons older is history: it flowered (a record) or it did not, and gets no forecast.
   */
  currentSeason?: number;
}

/**
 * Offset (days from the start) at standard-normal level z of the log-normal interval, widened on
 * either side of the median by an independent normal spread `extraSdDays` (root sum of squares,
 * as for the 10th/90th percentiles). Increasing in z.
 */
function offsetAtZ(ln: LogNormal, extraSdDays: number, z: number): number {
  return logNormalAfter(0, ln, extraSdDays).dayAt(z);
}

/**
 * Spread (1 SD) of a plant's first-flower day from one season to the next, before its own
 * seasons say otherwise: about three weeks (from memory; growers' records commonly show a plant
 * opening within a few weeks of "its" date). Shrunk toward with the same n/(n + k) weight.
 */
export const SEASONAL_BLOOM_SD_DAYS = 21;

/** The plant's usual first-flower day carried to this season, and the blend with the interval forecast. */
export interface SeasonalBlend {
  /** The blend's 80% window, before today is taken into account. */
  window: DateWindow;
  /** Centre of the blend, days after the start, and its spread (1 SD, days). */
  centreDays: number;
  sdDays: number;
  /** Past first flowers behind the seasonal day, and the weight the seasonal day got (0–1). */
  seasons: number;
  seasonalWeight: number;
  /** The blend's own leave-one-season-out errors on the plant's past seasons (days, forecast minus actual). */
  heldOutErrors: number[];
}

const meanSquare = (xs: readonly number[]) => xs.reduce((a, x) => a + x * x, 0) / xs.length;

/**
 * Blends the stage-interval forecast (start + the shrunk mature → open interval) with the
 * plant's own seasonal first-flower day (its past first-open dates moved to this season, same
 * month and day), weighted by precision, and sizes the window from the spread actually observed.
 *
 * - Each forecast's variance is its leave-one-season-out mean squared error on the plant's past
 *   seasons (m seasons with both a maturity and a first-open date), shrunk toward the model's
 *   own variance with weight m/(m + k), k = BLOOM_SHRINKAGE_K: the interval's model variance is
 *   read off its log-normal 10th–90th percentiles, the seasonal one is the plant's spread of
 *   first-flower days (shrunk toward SEASONAL_BLOOM_SD_DAYS) × (1 + 1/n).
 * - Weights are inverse variances (precision weighting). The window is normal around the blend,
 *   its variance the blend's own leave-one-season-out mean squared error shrunk the same way
 *   toward the combined model variance 1/(1/v_I + 1/v_S), plus the interval's share of
 *   `extraSdDays` (a predicted maturity date), so it is as wide as the plant's record warrants
 *   rather than a stack of worst cases.
 * - Null without a past first flower.
 */
export function blendWithSeason(
  start: IsoDate,
  season: number,
  interval: LogNormal,
  genusInterval: LogNormal,
  past: readonly PastIntervals[],
  extraSdDays = 0,
): SeasonalBlend | null {
  const opened = past.filter((p): p is PastIntervals & { firstOpen: IsoDate } => p.firstOpen !== null);
  const n = opened.length;
  if (n === 0) return null;
  const k = BLOOM_SHRINKAGE_K;
  // The first-open day of `p` moved to season `to` (same month and day), as a day number.
  const moved = (p: PastIntervals & { firstOpen: IsoDate }, to: number) => shiftedDayNumber(p.firstOpen, to - p.season);
  const startDay = toDayNumber(start);
  const offsets = opened.map((p) => moved(p, season) - startDay);
  const seasonalMean = mean(offsets);
  const plantVar = n >= 2 ? sampleVariance(offsets) : SEASONAL_BLOOM_SD_DAYS ** 2;
  const seasonalVarModel = ((n * plantVar + k * SEASONAL_BLOOM_SD_DAYS ** 2) / (n + k)) * (1 + 1 / n);
  const intervalMedian = Math.exp(interval.mu);
  const intervalSd = (offsetAtZ(interval, extraSdDays, Z90) - offsetAtZ(interval, extraSdDays, Z10)) / (Z90 - Z10);
  const intervalVarModel = Math.max(1, intervalSd ** 2);

  // Leave-one-season-out errors of both forecasts on the plant's past seasons.
  const eI: number[] = [];
  const eS: number[] = [];
  for (const p of opened) {
    if (p.maturedOn === null) continue;
    const others = opened.filter((q) => q.season !== p.season);
    if (others.length === 0) continue;
    const intervals: number[] = [];
    let movedSum = 0;
    for (const q of others) {
      if (q.matureToOpenDays !== null) intervals.push(q.matureToOpenDays);
      movedSum += moved(q, p.season);
    }
    const loo = shrinkLogInterval(intervals, genusInterval, k, { maxShiftSe: SHRINKAGE_MAX_SHIFT_SE });
    const openDay = toDayNumber(p.firstOpen);
    eI.push(openDay - toDayNumber(p.maturedOn) - Math.exp(loo.mu));
    eS.push(openDay - movedSum / others.length);
  }
  const m = eI.length;
  const shrunk = (observed: number, model: number) => (m * observed + k * model) / (m + k);
  const vI = m ? shrunk(meanSquare(eI), intervalVarModel) : intervalVarModel;
  const vS = m ? shrunk(meanSquare(eS), seasonalVarModel) : seasonalVarModel;
  const wS = 1 / vS / (1 / vI + 1 / vS);
  const wI = 1 - wS;
  const centre = wI * intervalMedian + wS * seasonalMean;
  const modelVar = 1 / (1 / vI + 1 / vS);
  const blendVar = m ? shrunk(meanSquare(eI.map((e, i) => wI * e + wS * eS[i])), modelVar) : modelVar;
  const sd = Math.sqrt(blendVar + (wI * extraSdDays) ** 2);
  const at = (z: number) => addDays(start, Math.round(centre + sd * z));
  // e are actual minus forecast; held-out errors are kept as forecast minus actual.
  const heldOutErrors = eI.map((e, i) => -(wI * e + wS * eS[i]));
  return { window: { p10: at(Z10), p50: at(0), p90: at(Z90) }, centreDays: centre, sdDays: sd, seasons: n, seasonalWeight: wS, heldOutErrors };
}

const pct = (x: number) => `${Math.round(x * 100)}%`;

/**
 * The day a growing lead is expected to mature as the engine counts maturity (the first sheath for
 * a sheathed genus, else full height), with its spread: the growth curve's date of 95% of its
 * height, moved by how far this plant's finished leads matured from their own curves' date (median,
 * shrunk toward none with weight n/(n + k)) — a sheath often shows well before the bulb reaches
 * full height. The spread is those leads' own scatter about it, shrunk toward
 * MATURITY_DATE_SD_DAYS the same way.
 */
function predictedMaturity(fit: LeadCurveFit | null, history: readonly BloomHistory[], genus: GenusDefaults): { date: IsoDate; sdDays: number } | null {
  if (!fit) return null;
  const lags: number[] = [];
  for (const h of history) {
    if (h.lead.status === 'growing') continue;
    const matured = maturedOnCached(h, sortedMeasurements(h), genus);
    const curve = matured ? fitAsOfLastMeasurement(h.measurements, h.lead, genus) : null;
    if (matured && curve && curve.method === 'free') lags.push(daysBetween(curve.maturityDate, matured));
  }
  const n = lags.length;
  if (n === 0) return { date: fit.maturityDate, sdDays: MATURITY_DATE_SD_DAYS };
  const k = BLOOM_SHRINKAGE_K;
  const lag = median(lags) * (n / (n + k));
  const variance = n >= 2 ? (n * sampleVariance(lags) + k * MATURITY_DATE_SD_DAYS ** 2) / (n + k) : MATURITY_DATE_SD_DAYS ** 2;
  return { date: addDays(fit.maturityDate, Math.round(lag)), sdDays: Math.sqrt(variance) };
}

/**
 * Leave-one-season-out errors (days, forecast minus actual) of the shrunk interval on the plant's
 * own past intervals: each season forecast from the others, as `shrinkLogInterval` would.
 */
function intervalHeldOutErrors(days: readonly number[], genus: LogNormal): number[] {
  if (days.length < 2) return [];
  return days.map((d, i) => {
    const others = days.filter((_, j) => j !== i);
    return Math.exp(shrinkLogInterval(others, genus, BLOOM_SHRINKAGE_K, { maxShiftSe: SHRINKAGE_MAX_SHIFT_SE }).mu) - d;
  });
}

/** Levels at which the time buds still need is averaged over (midpoints of 16 equal shares). */
const BUDS_LEVELS = Array.from({ length: 16 }, (_, k) => normalQuantile((k + 0.5) / 16));

/**
 * The share of `usual` ruled out when the flower cannot open before today nor before buds not yet
 * there have formed and opened (`afterNoBuds`, a distribution of that day): the mean over the
 * buds' time of the share of `usual` before the later of the two.
 */
function meanShareBefore(usual: DayDistribution, afterNoBuds: DayDistribution, todayDay: number): number {
  let sum = 0;
  for (const z of BUDS_LEVELS) sum += shareBy(usual, Math.max(todayDay, afterNoBuds.dayAt(z)) - 0.5);
  return sum / BUDS_LEVELS.length;
}

/** What the engine knows of the lead on `today`: its records, its looks and the stage they put it at. */
interface LeadState {
  open: IsoDate | null;
  faded: IsoDate | null;
  /** Buds visible (recorded), or else buds found in the sheath: the date the buds stage counts from. */
  buds: IsoDate | null;
  /** True when `buds` is the sheath look (buds not out yet). */
  budsInSheath: boolean;
  mature: IsoDate | null;
  sheath: ReturnType<typeof latestSheath>;
  lost: boolean;
  abortFlag: LeadFlag | undefined;
  stage: BloomStage;
  stageDate: IsoDate | null;
  /** Latest look that would have shown buds and did not (a genus without a sheath: any look; else an empty or dry sheath). */
  noBudsOn: IsoDate | null;
}

function leadState(current: BloomHistory, ms: readonly Measurement[], genus: GenusDefaults, today: IsoDate, flags: readonly LeadFlag[] | undefined): LeadState {
  const lead = current.lead;
  const bloom = current.bloom;
  const recorded = (d: IsoDate | null | undefined) => (d && isIsoDate(d) && d <= today ? d : null);
  const open = recorded(bloom?.firstOpen);
  const faded = recorded(bloom?.lastFaded);
  const visible = budsVisibleOn(bloom, today);
  const inSheath = visible ? null : budsInSheathOn(ms, genus, today);
  const buds = visible ?? inSheath;
  const mature = maturedOnSorted(ms, lead, genus);
  const sheath = latestSheath(ms, genus);
  const abortFlag = !open && !buds ? flags?.find((f) => f.kind === 'aborted' && f.leadId === lead.id) : undefined;
  const lost = lead.status === 'dried_off' || lead.status === 'rotted' || lead.status === 'removed' || abortFlag !== undefined;
  let stage: BloomStage;
  let stageDate: IsoDate | null;
  if (lost && !open) [stage, stageDate] = ['lost', null];
  else if (faded) [stage, stageDate] = ['faded', faded];
  else if (open) [stage, stageDate] = ['in_flower', open];
  else if (visible) [stage, stageDate] = ['buds_visible', visible];
  else if (inSheath) [stage, stageDate] = ['buds_in_sheath', inSheath];
  else if (sheath.sheath === 'empty') [stage, stageDate] = ['sheath_empty', sheath.on];
  else if (sheath.sheath === 'dry') [stage, stageDate] = ['sheath_dry', sheath.on];
  else if (sheath.sheath === 'forming') [stage, stageDate] = ['sheath_forming', mature ?? sheath.on];
  else if (mature) [stage, stageDate] = ['bulb_mature', mature];
  else [stage, stageDate] = ['growing', null];
  let noBudsOn: IsoDate | null = null;
  if (!buds && !open) {
    if (!flowersFromSheath(genus)) noBudsOn = ms.length && mature ? ms[ms.length - 1].date : null;
    else if (stage === 'sheath_empty' || stage === 'sheath_dry') noBudsOn = sheath.on;
  }
  return { open, faded, buds, budsInSheath: visible === null && inSheath !== null, mature, sheath, lost, abortFlag, stage, stageDate, noBudsOn };
}

/**
 * Forecasts when (10th/50th/90th percentile dates of the first open flower) and whether the lead
 * blooms, and how many flowers it is likely to carry.
 *
 * The plant's usual timing: from buds (seen, or found in the sheath) + (buds → open); else from
 * the date the lead matured + (mature → open), blended with the plant's usual first-flower day
 * (see `blendWithSeason`); else, while growing, from the growth fit's maturity date (spread
 * MATURITY_DATE_SD_DAYS; today once that date has passed) + (mature → open). Intervals: the
 * plant's own, shrunk toward the genus (see `shrinkLogInterval`). Degree-day mode is used when
 * `readings` give at least one past interval in degree-days; the genus default is then converted
 * with the history's mean daily degree-days, and the dates are projected with the area's recent
 * normal.
 *
 * What is known rules days out: the flower has not opened by today; where a look would have shown
 * buds and did not (a genus without a sheath, or an empty or dry sheath), it cannot open before
 * buds formed after that look have opened; an empty or dry sheath widens the rest by
 * EMPTY_SHEATH_WIDEN. The window is what remains (never before today); past the usual median the
 * lead is late; past LATEST_PLAUSIBLE_LEVEL of the usual timing it is probably not flowering this
 * season (no window). With the plant's held-out errors at this stage, the window is widened to
 * what they support.
 *
 * Chance: the plant's bloom record shrunk toward the genus bloom rate, times the sheath factor
 * (a sheathed genus only: a dry sheath counts against summer, green-sheath bloomers, or mildly
 * when the plant's habit is unknown; an empty one mildly) and the size factor against last
 * season's lead (CHANCE_FACTORS); BUDS_OPEN_CHANCE once in bud. Then conditioned on what has
 * not happened yet: c·S / (c·S + 1 − c), S the share of the usual timing still ahead, so it falls
 * each day a lead stays closed past its time. 1 once open; 0 for a lead dried off, rotted,
 * removed, aborted, or of a season long past without a record.
 *
 * Flowers: flowers per spike against mature bulb height across the plant's history (a line with
 * ≥ 3 seasons of differing size, else their mean, else the genus default) × the usual spike count.
 */
export function forecastBloom(input: BloomForecastInput): BloomForecast {
  const { current, genusDefaults: genus, today } = input;
  const lead = current.lead;
  const notes: string[] = [];
  const history = input.history.filter((h) => h.lead.id !== lead.id && h.lead.season !== lead.season);
  const ddOptions: DegreeDayOptions = input.degreeDays ?? { baseTemp: ORCHID_BASE_TEMP_C, method: DEFAULT_DEGREE_DAY_METHOD };
  const past = pastIntervals(history, genus, input.readings, ddOptions);
  const bloom = current.bloom;
  const currentMs = sortedMeasurements(current, today);
  const currentTallest = tallestOf(currentMs);
  const state = leadState(current, currentMs, genus, today, input.flags);
  const { open, faded, buds, mature, stage } = state;
  const todayDay = toDayNumber(today);
  const pastSeason = !open && input.currentSeason !== undefined && lead.season <= input.currentSeason - 2;

  // Size against last season, like with like: the predicted mature height (growth fit) or, for a
  // finished lead, its tallest height against last season's final height; for a young lead
  // without a usable fit, its height against last season's lead at the same age (the size ratio
  // of `compareWithPriorYears`). The expected mature size (for the flower count) is then last
  // season's final height scaled by that ratio.
  const { sizeVsLast, expectedMatureSize } = sizeAgainstLastSeason(current, currentMs, currentTallest, mature, input.fit ?? null, history, past);

  // Intervals.
  const matureToOpenDays = past.map((p) => p.matureToOpenDays).filter((d): d is number => d !== null);
  const budsToOpenDays = past.map((p) => p.budsToOpenDays).filter((d): d is number => d !== null);
  const m2oDD = past.map((p) => p.matureToOpenDegreeDays).filter((d): d is number => d !== null);
  const b2oDD = past.map((p) => p.budsToOpenDegreeDays).filter((d): d is number => d !== null);
  const genusM2O = chainGenus(genus.matureToBuds, genus.budsToOpen);
  const genusB2O = genusLogNormal(genus.budsToOpen);
  const shrinkOptions = { maxShiftSe: SHRINKAGE_MAX_SHIFT_SE };
  const budsToOpen = shrinkLogInterval(budsToOpenDays, genusB2O, BLOOM_SHRINKAGE_K, shrinkOptions);
  const fromBuds = buds !== null;
  // Buds found in the sheath: the plant's own sheath-buds → flower intervals, shrunk toward the genus.
  const sheathBudsDays = past.map((p) => p.sheathBudsToOpenDays).filter((d): d is number => d !== null);
  const genusSB2O = genusLogNormal(genus.sheathBudsToOpen ?? genus.budsToOpen);
  const sheathBudsToOpen = shrinkLogInterval(sheathBudsDays, genusSB2O, BLOOM_SHRINKAGE_K, shrinkOptions);
  const fromBudsInterval = state.budsInSheath ? sheathBudsToOpen : budsToOpen;
  // Buds missing at a look that would have shown them still have all their way to go: in a
  // sheath, from forming there; without one, from showing on the bulb or cane.
  const budsStillToCome = flowersFromSheath(genus) ? sheathBudsToOpen : budsToOpen;

  let mode: 'days' | 'degree-days' = 'days';
  let seasons = 0;
  let weight = 0;
  const dailyNormal = input.readings && input.readings.length ? recentDailyDegreeDays(input.readings, today, ddOptions) : null;
  // No degree-day record exists for buds found in the sheath: that stage runs in days.
  const useDD = !state.budsInSheath && (fromBuds ? b2oDD.length : m2oDD.length) > 0 && dailyNormal !== null && dailyNormal > 0;

  // The plant's usual timing of the first flower for this lead, before today rules anything out,
  // counted from `usualStart` (buds, maturity, or the predicted maturity).
  let usual: DayDistribution | null = null;
  let usualStart = todayDay;
  // The plant's own held-out errors of this very forecast (the window is never narrower).
  let heldOut: number[] = [];
  if (!open && stage !== 'lost' && !pastSeason) {
    const predicted = fromBuds || mature ? null : predictedMaturity(input.fit ?? null, history, genus);
    let start = fromBuds ? buds : (mature ?? predicted?.date ?? null);
    if (start && !fromBuds && !mature && start < today) {
      // Still not mature on today: the maturity date, conditioned on that, is today at the earliest.
      notes.push(`past its predicted maturity date ${start} and not mature yet: counted from today`);
      start = today;
    }
    if (start) usualStart = toDayNumber(start);
    if (!start) {
      notes.push('no maturity date yet: bloom window needs the lead to be measured');
    } else if (useDD && input.readings) {
      mode = 'degree-days';
      const readings = input.readings;
      const ddPerDay = meanDailyDegreeDays(readings, ddOptions) ?? dailyNormal!;
      const g = fromBuds ? genusB2O : genusM2O;
      const sh = shrinkLogInterval(fromBuds ? b2oDD : m2oDD, { mu: g.mu + Math.log(ddPerDay), sigma: g.sigma }, BLOOM_SHRINKAGE_K, shrinkOptions);
      seasons = sh.n;
      weight = sh.weight;
      const startDay = toDayNumber(start);
      usual = byQuantiles((z) => {
        const target = Math.exp(sh.mu + z * sh.sigma);
        const reached = dateReachingDegreeDays(readings, start, target, today, ddOptions);
        return reached ? toDayNumber(reached) : startDay + target / ddPerDay;
      });
      notes.push(`intervals in degree-days above ${ddOptions.baseTemp}° (${ddOptions.method ?? DEFAULT_DEGREE_DAY_METHOD} averaging)`);
    } else if (fromBuds) {
      seasons = fromBudsInterval.n;
      weight = fromBudsInterval.weight;
      usual = logNormalAfter(toDayNumber(start), fromBudsInterval);
      heldOut = state.budsInSheath ? intervalHeldOutErrors(sheathBudsDays, genusSB2O) : intervalHeldOutErrors(budsToOpenDays, genusB2O);
    } else {
      const sh = shrinkLogInterval(matureToOpenDays, genusM2O, BLOOM_SHRINKAGE_K, shrinkOptions);
      seasons = sh.n;
      weight = sh.weight;
      const fromPrediction = !mature;
      const extraSd = fromPrediction ? (predicted?.sdDays ?? MATURITY_DATE_SD_DAYS) : 0;
      // The plant's usual first-flower day is blended in (unless the caller asks for the
      // intervals alone), weighted by how well each did on its past seasons; a predicted maturity
      // date's spread counts against the interval. A lead behind its time still cannot flower
      // before it matures and its buds open (the floors below).
      const blend = input.seasonalPrior !== false ? blendWithSeason(start, lead.season, sh, genusM2O, past, extraSd) : null;
      const interval = logNormalAfter(toDayNumber(start), sh, extraSd);
      // The blend is normal and can be tight; a share SEASON_OFF_HABIT_WEIGHT of a season off the
      // plant's habit — its own median interval with the genus' whole spread — keeps a late bloom
      // possible, and sets how late is still plausible.
      const offHabit = logNormalAfter(toDayNumber(start), { mu: sh.mu, sigma: Math.max(sh.sigma, genusM2O.sigma) }, extraSd);
      usual = blend ? mixture(normalAfter(toDayNumber(start), blend.centreDays, blend.sdDays), offHabit, 1 - SEASON_OFF_HABIT_WEIGHT) : interval;
      heldOut = blend ? blend.heldOutErrors : intervalHeldOutErrors(matureToOpenDays, genusM2O);
      if (blend) {
        notes.push(
          `blended with the plant's usual first-flower day (${blend.seasons} earlier ${blend.seasons === 1 ? 'bloom' : 'blooms'}, weight ${Math.round(blend.seasonalWeight * 100)}%); window sized from how far its past seasons were off`,
        );
      }
      if (fromPrediction) notes.push(`from the predicted maturity date ${start}`);
    }
  }

  let timing: BloomTiming = open ? 'record' : 'none';
  let firstOpen: DateWindow | null = open ? { p10: open, p50: open, p90: open } : null;
  let late: BloomForecast['late'] = null;
  let latestPlausible: IsoDate | null = null;
  let heldOutHalfWidthDays: number | null = null;
  // Share of the usual timing that what is known has ruled out (`goneAll`, for the quantiles), and
  // the same counted only from the start of the interval (`gone`): a normal blend puts a little
  // weight before the lead matured, which no day can rule out as evidence.
  let gone = 0;
  let goneAll = 0;
  if (usual) {
    if (stage === 'sheath_empty' || stage === 'sheath_dry') {
      usual = widened(usual, EMPTY_SHEATH_WIDEN);
      notes.push(
        `sheath ${stage === 'sheath_empty' ? 'empty' : 'dry'} at the look of ${state.sheath.on}: it may still bud later, or wait for next season (some bloom from a dry sheath months later — common practice)`,
      );
    }
    // Buds not there at a look that would have shown them (or, for a lead still growing, not
    // before it matures): no flower before buds formed after that have opened.
    const noBudsUntil = stage === 'growing' ? fromDayNumber(usualStart) : state.noBudsOn;
    const afterNoBuds = noBudsUntil ? logNormalAfter(toDayNumber(noBudsUntil), budsStillToCome) : null;
    // Ruled out by what was seen: every day before today, and (averaged over how long buds still to
    // come take) every day before buds missing at a look could open. A growing lead's floor is a
    // bound on the window, not evidence, so it rules nothing out for the chance.
    const seenNoBuds = state.noBudsOn ? logNormalAfter(toDayNumber(state.noBudsOn), budsStillToCome) : null;
    goneAll = seenNoBuds ? meanShareBefore(usual, seenNoBuds, todayDay) : shareBy(usual, todayDay - 0.5);
    const beforeStart = shareBy(usual, usualStart - 0.5);
    gone = beforeStart < 1 ? Math.max(0, goneAll - beforeStart) / (1 - beforeStart) : 1;
    const likely = usual.dayAt(0);
    latestPlausible = fromDayNumber(Math.round(usual.dayAt(normalQuantile(LATEST_PLAUSIBLE_LEVEL))));
    // Probably not this season only once the calendar itself is past its latest plausible day:
    // buds still to come move and widen the window, but an empty sheath may yet bud late.
    const goneByToday = beforeStart < 1 ? Math.max(0, shareBy(usual, todayDay - 0.5) - beforeStart) / (1 - beforeStart) : 1;
    if (goneByToday >= LATEST_PLAUSIBLE_LEVEL) {
      timing = 'unlikely';
      notes.push(`not open by ${today} and past ${latestPlausible}, the latest date its record makes plausible`);
    } else {
      // Buds not yet recorded as visible still have to show and open: no flower sooner than buds
      // seen today would give (so a lead further along never gets a later forecast).
      const afterVisibleToday = stage === 'buds_visible' ? null : logNormalAfter(todayDay, budsToOpen);
      const at = (q: number) => {
        const z = normalQuantile(q);
        const day = Math.max(
          conditionedDay(usual!, q, goneAll),
          afterNoBuds ? afterNoBuds.dayAt(z) : -Infinity,
          afterVisibleToday ? afterVisibleToday.dayAt(z) : -Infinity,
          todayDay,
        );
        return fromDayNumber(Math.round(day));
      };
      firstOpen = { p10: at(0.1), p50: at(0.5), p90: at(0.9) };
      timing = likely < todayDay ? 'late' : 'forecast';
      if (timing === 'late') late = { likelyWas: fromDayNumber(Math.round(likely)), daysLate: todayDay - Math.round(likely) };
      if (gone > 1e-4) {
        notes.push(`not open by ${today}: window is what its record leaves after today (${pct(gone)} of such intervals would have been over by now)`);
      }
      if (heldOut.length >= MIN_HELD_OUT_ERRORS) {
        // The half width that held 80% of the plant's own past errors: no narrower than its record.
        const half = quantile(heldOut.map((e) => Math.abs(e)), 0.8);
        const halfNow = (toDayNumber(firstOpen.p90) - toDayNumber(firstOpen.p10)) / 2;
        if (half > halfNow) {
          firstOpen = widenWindow(firstOpen, half, today);
          heldOutHalfWidthDays = half;
          notes.push(`window widened to what this plant's past forecasts at this stage support (±${Math.round(half)} days)`);
        }
      }
    }
  }
  if (pastSeason) notes.push(`a lead of the ${lead.season} season, long past: no forecast`);

  // Fading.
  const o2f = shrinkLogInterval(
    past.map((p) => p.openToFadedDays).filter((d): d is number => d !== null),
    genusLogNormal(genus.openToFaded),
  );
  const lastFadedLikely = faded ?? (firstOpen ? addDays(firstOpen.p50, Math.round(Math.exp(o2f.mu))) : null);

  const { chance, chanceReasons } = bloomChance({ state, lead, genus, past, sizeVsLast, gone, timing, pastSeason, latestPlausible, today });

  // Flowers.
  const withFlowers = past.filter((p) => p.flowerCount !== null && p.flowerCount > 0);
  const spikes = withFlowers.length ? Math.max(1, Math.round(median(withFlowers.map((p) => p.spikeCount ?? 1)))) : 1;
  const perSpikeRows = withFlowers.map((p) => ({ size: p.tallestMm, fps: p.flowerCount! / Math.max(1, p.spikeCount ?? 1) }));
  const currentSize = expectedMatureSize;
  let perSpike = genus.flowersPerSpike;
  let basis: BloomForecast['expectedFlowers']['basis'] = 'genus';
  const sized = perSpikeRows.filter((r): r is { size: number; fps: number } => r.size !== null);
  const line = sized.length >= 3 ? linearFit(sized.map((r) => [r.size, r.fps] as const)) : null;
  if (line && currentSize !== null) {
    perSpike = Math.max(1, line.intercept + line.slope * currentSize);
    basis = 'plant-by-size';
  } else if (perSpikeRows.length) {
    perSpike = mean(perSpikeRows.map((r) => r.fps));
    basis = 'plant-mean';
  }
  const count = bloom?.flowerCount ?? Math.max(1, Math.round(perSpike * spikes));

  return {
    leadId: lead.id,
    stage,
    stageDate: state.stageDate,
    timing,
    firstOpen,
    late,
    latestPlausible: timing === 'forecast' || timing === 'late' || timing === 'unlikely' ? latestPlausible : null,
    lastFadedLikely,
    mode,
    chance,
    chanceReasons,
    expectedFlowers: { count, perSpike, spikes, basis },
    history: { seasons, weight },
    shareGone: gone,
    heldOutHalfWidthDays,
    notes,
  };
}

/** The chance that the lead flowers this season, and why (see `forecastBloom`). */
function bloomChance(input: {
  state: LeadState;
  lead: BloomHistory['lead'];
  genus: GenusDefaults;
  past: readonly PastIntervals[];
  sizeVsLast: { ratio: number; basisText: string } | null;
  gone: number;
  timing: BloomTiming;
  pastSeason: boolean;
  latestPlausible: IsoDate | null;
  today: IsoDate;
}): { chance: number; chanceReasons: string[] } {
  const { state, lead, genus, past, sizeVsLast, gone } = input;
  const reasons: string[] = [];
  if (state.open) return { chance: 1, chanceReasons: [state.faded ? 'bloomed this season' : 'in flower'] };
  if (state.lost) {
    const byFlag = state.abortFlag && lead.status !== 'dried_off' && lead.status !== 'rotted' && lead.status !== 'removed';
    return { chance: 0, chanceReasons: [byFlag ? state.abortFlag!.reason : `lead ${lead.status.replace('_', ' ')}`] };
  }
  if (input.pastSeason) return { chance: 0, chanceReasons: [`no flowering recorded for this ${lead.season} lead`] };

  let chance: number;
  if (state.buds) {
    chance = BUDS_OPEN_CHANCE;
    reasons.push(`buds seen ${state.buds} (buds can still blast)`);
  } else {
    const finished = past.filter((p) => p.tallestMm !== null);
    const bloomedN = finished.filter((p) => p.bloomed).length;
    chance = (bloomedN + BLOOM_SHRINKAGE_K * genus.bloomRate) / (finished.length + BLOOM_SHRINKAGE_K);
    reasons.push(
      finished.length
        ? `bloomed ${bloomedN} of ${finished.length} earlier seasons (genus rate ${Math.round(genus.bloomRate * 100)}%)`
        : `no bloom record: genus rate ${Math.round(genus.bloomRate * 100)}%`,
    );
    const sheath = state.sheath.sheath;
    if (sheath === 'dry') {
      const dryBloomer = genus.bloomHabit === 'from_dry_sheath' || past.some((p) => p.bloomedFromDrySheath);
      if (genus.bloomHabit === 'from_green_sheath') {
        chance *= CHANCE_FACTORS.drySheathGreenBloomer;
        reasons.push('sheath dried without buds (this genus flowers from green sheaths)');
      } else if (!dryBloomer) {
        chance *= CHANCE_FACTORS.drySheathUnknownHabit;
        reasons.push('dry sheath; not by itself a lost bloom for winter and spring bloomers');
      } else {
        reasons.push('dry sheath, as in seasons it bloomed from');
      }
    } else if (sheath === 'empty') {
      chance *= CHANCE_FACTORS.emptySheath;
      reasons.push('sheath looks empty: it may still bud later, or wait for next season');
    } else if (sheath === 'none' && state.mature && flowersFromSheath(genus)) {
      chance *= CHANCE_FACTORS.noSheathOnMatureLead;
      reasons.push('mature without a sheath');
    }
    if (sizeVsLast) {
      const ratio = sizeVsLast.ratio;
      if (ratio < 0.7) {
        chance *= CHANCE_FACTORS.muchSmallerLead;
        reasons.push(`lead at ${Math.round(ratio * 100)}%${sizeVsLast.basisText}`);
      } else if (ratio < 0.9) {
        chance *= CHANCE_FACTORS.smallerLead;
        reasons.push(`lead at ${Math.round(ratio * 100)}%${sizeVsLast.basisText}`);
      }
    }
  }
  // What has not happened yet: the share of its usual timing already ruled out counts against it.
  if (gone > 1e-4) {
    const ahead = 1 - gone;
    chance = (chance * ahead) / (chance * ahead + 1 - chance);
    reasons.push(
      input.timing === 'unlikely'
        ? `not open by ${input.today}, past the latest date its record makes plausible (${input.latestPlausible})`
        : `not open yet: ${pct(gone)} of its usual timing has gone by`,
    );
  }
  return { chance: Math.min(CHANCE_BOUNDS[1], Math.max(CHANCE_BOUNDS[0], chance)), chanceReasons: reasons };
}

/**
 * This lead's size against last season's (the largest lead of the latest earlier season, as in
 * `compareWithPriorYears`), compared like with like, and the mature size expected for it.
 */
function sizeAgainstLastSeason(
  current: BloomHistory,
  currentMs: readonly Measurement[],
  currentTallest: number | null,
  mature: IsoDate | null,
  fit: LeadCurveFit | null,
  history: readonly BloomHistory[],
  past: readonly PastIntervals[],
): { sizeVsLast: { ratio: number; basisText: string } | null; expectedMatureSize: number | null } {
  const finished = past.filter((p) => p.tallestMm !== null && p.tallestMm > 0);
  const latestSeason = finished.length ? Math.max(...finished.map((p) => p.season)) : null;
  const last = latestSeason === null ? null : finished.filter((p) => p.season === latestSeason).reduce((a, b) => (b.tallestMm! > a.tallestMm! ? b : a));
  const growing = !mature && current.lead.status === 'growing';
  const fitted = fit && fit.method !== 'insufficient' && fit.matureHeightMm > 0 ? fit.matureHeightMm : null;
  if (fitted !== null || !growing) {
    const size = fitted ?? currentTallest;
    const basisText = fitted !== null && growing ? " of last season's final size (by its predicted mature height)" : " of last season's final size";
    return {
      sizeVsLast: last && size !== null && size > 0 ? { ratio: size / last.tallestMm!, basisText } : null,
      expectedMatureSize: size,
    };
  }
  // A young lead without a usable fit: its latest height against last season's at the same age.
  const latest = currentMs.length ? currentMs[currentMs.length - 1] : null;
  const lastHistory = last ? history.find((h) => h.lead.id === last.leadId) : undefined;
  if (!last || !lastHistory || !latest || !(latest.heightMm > 0)) return { sizeVsLast: null, expectedMatureSize: null };
  const age = daysBetween(current.lead.firstSeen, latest.date);
  const same = heightAtAge(lastHistory, age);
  let ratio: number | null = same !== null && same > 0 ? latest.heightMm / same : null;
  let basisText = ` of last season's lead at the same age (${age} days)`;
  if (ratio === null && latest.heightMm > last.tallestMm!) {
    ratio = latest.heightMm / last.tallestMm!;
    basisText = " of last season's final size (already taller than it)";
  }
  if (ratio === null) return { sizeVsLast: null, expectedMatureSize: null };
  return { sizeVsLast: { ratio, basisText }, expectedMatureSize: Math.max(latest.heightMm, ratio * last.tallestMm!) };
}

/** Mean daily degree-days over all readings given (one area). */
function meanDailyDegreeDays(readings: readonly TemperatureReading[], options: DegreeDayOptions): number | null {
  if (readings.length === 0) return null;
  let sum = 0;
  for (const r of readings) sum += dailyDegreeDays(r.minC, r.maxC, options);
  return sum / readings.length;
}
