/**
 * Bloom window of a lead. Stages: growing → mature (sheath formed, or for genera without a sheath
 * the bulb at full height) → buds visible → first flower open → faded.
 *
 * Intervals between stages are modelled as log-normal. The plant's own past intervals (one per
 * season) are shrunk toward the genus default with weight w = n/(n + k) on the log scale,
 * k = BLOOM_SHRINKAGE_K: with three seasons of history the plant and the genus count equally.
 * Once a lead has matured, the plant's own usual first-flower day (its past first-open dates
 * moved to this season) is blended in by precision, and the window is sized from the errors both
 * made on the plant's past seasons (`blendWithSeason`).
 */
import { mean, median, sampleVariance } from 'simple-statistics';
import { addDays, daysBetween, isIsoDate, shiftedDayNumber, toDayNumber } from './dates';
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
import { normalCdf, normalQuantile } from './distributions';
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
/** Spread (1 SD) of a predicted maturity date, days, when the growth fit gives none (chosen). */
export const MATURITY_DATE_SD_DAYS = 14;

export type BloomStage = 'growing' | 'mature' | 'buds' | 'in_flower' | 'faded' | 'lost';

/** A past or current lead with its measurements and bloom record. */
export interface BloomHistory extends LeadHistory {
  bloom: BloomRecord | null;
}

export interface DateWindow {
  p10: IsoDate;
  p50: IsoDate;
  p90: IsoDate;
}

export interface BloomForecast {
  leadId: string;
  stage: BloomStage;
  /** Date of the stage the forecast starts from (mature, buds), or null while growing. */
  stageDate: IsoDate | null;
  /** First flower open: earliest (10th), likely (50th) and latest (90th percentile). Actual date when known. */
  firstOpen: DateWindow | null;
  /** Likely date the last flower fades. */
  lastFadedLikely: IsoDate | null;
  mode: 'days' | 'degree-days';
  /** Probability (0–1) that this lead flowers this season. */
  chance: number;
  chanceReasons: string[];
  expectedFlowers: { count: number; perSpike: number; spikes: number; basis: 'plant-by-size' | 'plant-mean' | 'genus' };
  /** Seasons of the plant's own history behind the interval, and the weight they got. */
  history: { seasons: number; weight: number };
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

interface LogNormal {
  mu: number;
  sigma: number;
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
 * Shrinks the plant's own log-intervals toward a genus log-normal: μ = w·mean + (1 − w)·μ_g with
 * w = n/(n + k); σ² = w·s² + (1 − w)·σ_g² (plant variance only with n ≥ 2), inflated by
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
  const varPlant = n >= 2 ? sampleVariance(logs) : genus.sigma ** 2;
  const v = w * varPlant + (1 - w) * genus.sigma ** 2;
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

const Z10 = normalQuantile(0.1);
const Z90 = normalQuantile(0.9);

/** Past stage intervals of the plant, in days (and degree-days when readings are given). */
export interface PastIntervals {
  season: number;
  leadId: string;
  matureToOpenDays: number | null;
  budsToOpenDays: number | null;
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
  const buds = b?.budsSeen && isIsoDate(b.budsSeen) ? b.budsSeen : null;
  const open = b?.firstOpen && isIsoDate(b.firstOpen) ? b.firstOpen : null;
  const faded = b?.lastFaded && isIsoDate(b.lastFaded) ? b.lastFaded : null;
  const drySeen = ms.find((m) => m.sheath === 'dry');
  return {
    season: h.lead.season,
    leadId: h.lead.id,
    matureToOpenDays: mature && open ? daysBetween(mature, open) : null,
    budsToOpenDays: buds && open ? daysBetween(buds, open) : null,
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
}

/**
 * Offset (days from the start) at standard-normal level z of the log-normal interval, widened on
 * either side of the median by an independent normal spread `extraSdDays` (root sum of squares,
 * as for the 10th/90th percentiles). Increasing in z.
 */
function offsetAtZ(ln: LogNormal, extraSdDays: number, z: number): number {
  const med = Math.exp(ln.mu);
  const d = Math.abs(Math.exp(ln.mu + z * ln.sigma) - med);
  const w = Math.sqrt(d * d + (z * extraSdDays) ** 2);
  return z < 0 ? med - w : med + w;
}

/** Below this probability of having opened already, the forecast is left unconditioned (numerical floor). */
const CONDITION_MIN_PROBABILITY = 1e-4;
/** Quantile levels are kept this far inside (0, 1) when conditioning (numerical floor). */
const QUANTILE_EPS = 1e-9;
/** Percentile levels of the window. */
const WINDOW_LEVELS = { p10: 0.1, p50: 0.5, p90: 0.9 } as const;

/**
 * z of the conditional quantile: given that the interval has not ended by a point where its
 * cumulative probability is `pBefore`, the q-quantile of the rest is F⁻¹(pBefore + q·(1 − pBefore))
 * (a left-truncated distribution). With pBefore under CONDITION_MIN_PROBABILITY, z of q itself.
 */
function conditionedZ(q: number, pBefore: number, zOfQ: number): number {
  if (pBefore < CONDITION_MIN_PROBABILITY) return zOfQ;
  const u = Math.min(1 - QUANTILE_EPS, Math.max(QUANTILE_EPS, pBefore + q * (1 - pBefore)));
  return normalQuantile(u);
}

/** z levels of the window's 10th, 50th and 90th percentiles, as they are without conditioning. */
const Z_OF = { p10: Z10, p50: 0, p90: Z90 } as const;

/**
 * The window as offsets from `start`. With `elapsedDays` (days from the start to today, the
 * first flower not open yet), the distribution is conditioned on the interval being longer than
 * that; `pBefore` is the probability it would have been over already.
 */
function windowFrom(start: IsoDate, ln: LogNormal, extraSdDays = 0, elapsedDays?: number): { window: DateWindow; pBefore: number } {
  let pBefore = 0;
  if (elapsedDays !== undefined && elapsedDays > 0 && elapsedDays > offsetAtZ(ln, extraSdDays, -8)) {
    // Level z at which the offset equals the elapsed days (bisection; offsetAtZ increases in z).
    let lo = -8;
    let hi = 8;
    if (elapsedDays >= offsetAtZ(ln, extraSdDays, hi)) lo = hi;
    else {
      for (let i = 0; i < 60; i++) {
        const mid = (lo + hi) / 2;
        if (offsetAtZ(ln, extraSdDays, mid) < elapsedDays) lo = mid;
        else hi = mid;
      }
    }
    pBefore = normalCdf(lo);
  }
  const at = (k: keyof typeof Z_OF) => addDays(start, Math.round(offsetAtZ(ln, extraSdDays, conditionedZ(WINDOW_LEVELS[k], pBefore, Z_OF[k]))));
  return { window: { p10: at('p10'), p50: at('p50'), p90: at('p90') }, pBefore };
}

/**
 * Spread (1 SD, days) of a plant's first-flower day from one season to the next, before its own
 * seasons say otherwise: about three weeks (from memory; growers' records commonly show a plant
 * opening within a few weeks of "its" date). Shrunk toward with the same n/(n + k) weight.
 */
export const SEASONAL_BLOOM_SD_DAYS = 21;

/** The plant's usual first-flower day carried to this season, and the blend with the interval forecast. */
export interface SeasonalBlend {
  window: DateWindow;
  pBefore: number;
  /** Past first flowers behind the seasonal day, and the weight the seasonal day got (0–1). */
  seasons: number;
  seasonalWeight: number;
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
 * - Null without a past first flower. With `elapsedDays`, conditioned on not having opened yet.
 */
export function blendWithSeason(
  start: IsoDate,
  season: number,
  interval: LogNormal,
  genusInterval: LogNormal,
  past: readonly PastIntervals[],
  extraSdDays = 0,
  elapsedDays = 0,
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

  let pBefore = 0;
  if (elapsedDays > 0) pBefore = normalCdf((elapsedDays - centre) / sd);
  const at = (key: keyof typeof Z_OF) => addDays(start, Math.round(centre + sd * conditionedZ(WINDOW_LEVELS[key], pBefore, Z_OF[key])));
  return { window: { p10: at('p10'), p50: at('p50'), p90: at('p90') }, pBefore, seasons: n, seasonalWeight: wS };
}

/** No percentile date of a lead not open yet lies before today. */
function notBefore(w: DateWindow, today: IsoDate): DateWindow {
  const f = (d: IsoDate) => (d < today ? today : d);
  return { p10: f(w.p10), p50: f(w.p50), p90: f(w.p90) };
}

/**
 * Forecasts when (10th/50th/90th percentile dates of the first open flower) and whether the lead
 * blooms, and how many flowers it is likely to carry.
 *
 * Starting point: the actual first-open date if recorded; else buds seen + (buds → open); else the
 * date the lead matured + (mature → open); else, while growing, the growth fit's maturity date
 * (spread MATURITY_DATE_SD_DAYS) + (mature → open). Intervals: the plant's own, shrunk toward the
 * genus sum of stage medians (see `shrinkLogInterval`); from maturity (days mode) blended with
 * the plant's usual first-flower day (see `blendWithSeason`). Degree-day mode is used when `readings`
 * give at least one past interval in degree-days; the genus default is then converted with the
 * history's mean daily degree-days, and the dates are projected with the area's recent normal.
 *
 * Chance: the plant's bloom record shrunk toward the genus bloom rate, times the sheath factor
 * (a dry sheath counts against only for summer, green-sheath bloomers, or mildly when the plant's
 * habit is unknown) and the size factor against last season's lead (CHANCE_FACTORS). 1 once in
 * bud or flower; 0 for a lead dried off, rotted or removed.
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
  const open = bloom?.firstOpen && isIsoDate(bloom.firstOpen) && bloom.firstOpen <= today ? bloom.firstOpen : null;
  const buds = bloom?.budsSeen && isIsoDate(bloom.budsSeen) && bloom.budsSeen <= today ? bloom.budsSeen : null;
  const faded = bloom?.lastFaded && isIsoDate(bloom.lastFaded) && bloom.lastFaded <= today ? bloom.lastFaded : null;
  const currentMs = sortedMeasurements(current, today);
  const currentTallest = tallestOf(currentMs);
  const mature = maturedOnSorted(currentMs, lead, genus);
  const abortFlag = !open && !buds ? input.flags?.find((f) => f.kind === 'aborted' && f.leadId === lead.id) : undefined;
  const lost = lead.status === 'dried_off' || lead.status === 'rotted' || lead.status === 'removed' || abortFlag !== undefined;
  const stage: BloomStage = lost && !open ? 'lost' : faded ? 'faded' : open ? 'in_flower' : buds ? 'buds' : mature ? 'mature' : 'growing';

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
  const fromBuds = stage === 'buds';

  let mode: 'days' | 'degree-days' = 'days';
  let firstOpen: DateWindow | null = null;
  const elapsedNote = (pBefore: number, start: IsoDate) => {
    if (pBefore >= CONDITION_MIN_PROBABILITY) {
      notes.push(
        `not open by ${today} (${daysBetween(start, today)} days after ${fromBuds ? 'buds were seen' : 'maturity'}): window conditioned on opening after today ` +
          `(${Math.round(pBefore * 100)}% of such intervals would have been over by now)`,
      );
    }
  };
  let seasons = 0;
  let weight = 0;
  const dailyNormal = input.readings && input.readings.length ? recentDailyDegreeDays(input.readings, today, ddOptions) : null;
  const useDD = (fromBuds ? b2oDD.length : m2oDD.length) > 0 && dailyNormal !== null && dailyNormal > 0;

  if (open) {
    firstOpen = { p10: open, p50: open, p90: open };
  } else if (stage !== 'lost') {
    let start = fromBuds ? buds : (mature ?? input.fit?.maturityDate ?? null);
    if (start && !fromBuds && !mature && start < today) {
      // Still not mature on today: the maturity date, conditioned on that, is today at the earliest.
      notes.push(`past its predicted maturity date ${start} and not mature yet: counted from today`);
      start = today;
    }
    if (!start) {
      notes.push('no maturity date yet: bloom window needs the lead to be measured');
    } else if (useDD && input.readings) {
      mode = 'degree-days';
      const ddPerDay = meanDailyDegreeDays(input.readings, ddOptions) ?? dailyNormal!;
      const g = fromBuds ? genusB2O : genusM2O;
      const genusDD = { mu: g.mu + Math.log(ddPerDay), sigma: g.sigma };
      const sh = shrinkLogInterval(fromBuds ? b2oDD : m2oDD, genusDD, BLOOM_SHRINKAGE_K, { maxShiftSe: SHRINKAGE_MAX_SHIFT_SE });
      seasons = sh.n;
      weight = sh.weight;
      const target = (z: number) => Math.exp(sh.mu + z * sh.sigma);
      // Not open yet: condition on the degree-days still to come (left truncation at those so far).
      let pBefore = 0;
      if (start < today) {
        const so = sumDegreeDays(input.readings, start, today, ddOptions);
        if (so.degreeDays > 0) pBefore = normalCdf((Math.log(so.degreeDays) - sh.mu) / sh.sigma);
      }
      const at = (k: keyof typeof Z_OF) => {
        const z = conditionedZ(WINDOW_LEVELS[k], pBefore, Z_OF[k]);
        return dateReachingDegreeDays(input.readings!, start, target(z), today, ddOptions) ?? addDays(start, Math.round(target(z) / ddPerDay));
      };
      firstOpen = { p10: at('p10'), p50: at('p50'), p90: at('p90') };
      elapsedNote(pBefore, start);
      notes.push(`intervals in degree-days above ${ddOptions.baseTemp}° (${ddOptions.method ?? DEFAULT_DEGREE_DAY_METHOD} averaging)`);
    } else {
      const sh = shrinkLogInterval(fromBuds ? budsToOpenDays : matureToOpenDays, fromBuds ? genusB2O : genusM2O, BLOOM_SHRINKAGE_K, {
        maxShiftSe: SHRINKAGE_MAX_SHIFT_SE,
      });
      seasons = sh.n;
      weight = sh.weight;
      const predictedMaturity = !fromBuds && !mature;
      const extraSd = predictedMaturity ? MATURITY_DATE_SD_DAYS : 0;
      // Once the lead has matured, the plant's usual first-flower day is blended in (unless the
      // caller asks for the intervals alone). Not before: a lead still growing cannot flower on
      // the plant's usual day however the calendar runs. Buds → open is short and tight on its own.
      const blend =
        stage === 'mature' && input.seasonalPrior !== false
          ? blendWithSeason(start, lead.season, sh, genusM2O, past, extraSd, daysBetween(start, today))
          : null;
      const w = blend ?? windowFrom(start, sh, extraSd, daysBetween(start, today));
      firstOpen = w.window;
      elapsedNote(w.pBefore, start);
      if (blend) {
        notes.push(
          `blended with the plant's usual first-flower day (${blend.seasons} earlier ${blend.seasons === 1 ? 'bloom' : 'blooms'}, weight ${Math.round(blend.seasonalWeight * 100)}%); window sized from how far its past seasons were off`,
        );
      }
      if (predictedMaturity) notes.push(`from the predicted maturity date ${start}`);
    }
    if (firstOpen) firstOpen = notBefore(firstOpen, today);
  }

  // Fading.
  const o2f = shrinkLogInterval(
    past.map((p) => p.openToFadedDays).filter((d): d is number => d !== null),
    genusLogNormal(genus.openToFaded),
  );
  const lastFadedLikely = faded ?? (firstOpen ? addDays(firstOpen.p50, Math.round(Math.exp(o2f.mu))) : null);

  // Chance.
  const chanceReasons: string[] = [];
  let chance: number;
  if (open || buds) {
    chance = open ? 1 : BUDS_OPEN_CHANCE;
    chanceReasons.push(faded ? 'bloomed this season' : open ? 'in flower' : 'buds visible (buds can still blast)');
  } else if (lost) {
    chance = 0;
    chanceReasons.push(abortFlag && lead.status !== 'dried_off' && lead.status !== 'rotted' && lead.status !== 'removed' ? abortFlag.reason : `lead ${lead.status.replace('_', ' ')}`);
  } else {
    const finished = past.filter((p) => p.tallestMm !== null);
    const bloomedN = finished.filter((p) => p.bloomed).length;
    chance = (bloomedN + BLOOM_SHRINKAGE_K * genus.bloomRate) / (finished.length + BLOOM_SHRINKAGE_K);
    chanceReasons.push(
      finished.length
        ? `bloomed ${bloomedN} of ${finished.length} earlier seasons (genus rate ${Math.round(genus.bloomRate * 100)}%)`
        : `no bloom record: genus rate ${Math.round(genus.bloomRate * 100)}%`,
    );
    const sheath = currentMs.length ? currentMs[currentMs.length - 1].sheath : 'none';
    if (sheath === 'dry') {
      const dryBloomer = genus.bloomHabit === 'from_dry_sheath' || past.some((p) => p.bloomedFromDrySheath);
      if (genus.bloomHabit === 'from_green_sheath') {
        chance *= CHANCE_FACTORS.drySheathGreenBloomer;
        chanceReasons.push('sheath dried without buds (this genus flowers from green sheaths)');
      } else if (!dryBloomer) {
        chance *= CHANCE_FACTORS.drySheathUnknownHabit;
        chanceReasons.push('dry sheath; not by itself a lost bloom for winter and spring bloomers');
      } else {
        chanceReasons.push('dry sheath, as in seasons it bloomed from');
      }
    } else if (sheath === 'empty') {
      chance *= CHANCE_FACTORS.emptySheath;
      chanceReasons.push('sheath looks empty');
    } else if (sheath === 'none' && mature && genus.bloomHabit !== 'no_sheath') {
      chance *= CHANCE_FACTORS.noSheathOnMatureLead;
      chanceReasons.push('mature without a sheath');
    }
    if (sizeVsLast) {
      const ratio = sizeVsLast.ratio;
      if (ratio < 0.7) {
        chance *= CHANCE_FACTORS.muchSmallerLead;
        chanceReasons.push(`lead at ${Math.round(ratio * 100)}% of last season's size${sizeVsLast.basisText}`);
      } else if (ratio < 0.9) {
        chance *= CHANCE_FACTORS.smallerLead;
        chanceReasons.push(`lead at ${Math.round(ratio * 100)}% of last season's size${sizeVsLast.basisText}`);
      }
    }
    chance = Math.min(CHANCE_BOUNDS[1], Math.max(CHANCE_BOUNDS[0], chance));
  }

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
    stageDate: open ?? buds ?? mature,
    firstOpen,
    lastFadedLikely,
    mode,
    chance,
    chanceReasons,
    expectedFlowers: { count, perSpike, spikes, basis },
    history: { seasons, weight },
    notes,
  };
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
    const basisText = fitted !== null && growing ? ' (predicted mature height)' : '';
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
  let basisText = ` at the same age (${age} days)`;
  if (ratio === null && latest.heightMm > last.tallestMm!) {
    ratio = latest.heightMm / last.tallestMm!;
    basisText = ' (already taller than its final height)';
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
