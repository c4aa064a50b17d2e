/**
 * Bloom window of a lead. Stages: growing → mature (sheath formed, or for genera without a sheath
 * the bulb at full height) → buds visible → first flower open → faded.
 *
 * Intervals between stages are modelled as log-normal. The plant's own past intervals (one per
 * season) are shrunk toward the genus default with weight w = n/(n + k) on the log scale,
 * k = BLOOM_SHRINKAGE_K: with three seasons of history the plant and the genus count equally.
 */
import { mean, median, sampleVariance } from 'simple-statistics';
import { addDays, daysBetween, isIsoDate } from './dates';
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
import type { GenusDefaults, StageInterval } from './genus-defaults';
import type { LeadCurveFit } from './growth-curve';
import { linearFit, type LeadHistory } from './prior-years';
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

function sortedMeasurements(h: LeadHistory, today?: IsoDate): Measurement[] {
  return h.measurements
    .filter((m) => m.leadId === h.lead.id && isIsoDate(m.date) && (today === undefined || m.date <= today))
    .sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0));
}

function tallestOf(ms: readonly Measurement[]): number | null {
  let best: number | null = null;
  for (const m of ms) if (Number.isFinite(m.heightMm) && m.heightMm >= 0 && (best === null || m.heightMm > best)) best = m.heightMm;
  return best;
}

function maturedOnSorted(ms: readonly Measurement[], status: LeadHistory['lead']['status'], genus: GenusDefaults): IsoDate | null {
  if (genus.bloomHabit !== 'no_sheath') {
    const sheathed = ms.find((m) => m.sheath !== 'none');
    if (sheathed) return sheathed.date;
  }
  if (status === 'growing') return null;
  const tallest = tallestOf(ms);
  if (tallest === null || tallest <= 0) return null;
  return ms.find((m) => m.heightMm >= MATURE_HEIGHT_SHARE * tallest)?.date ?? null;
}

/**
 * Date the lead matured: the first measurement showing a sheath (forming, empty, budded, dry);
 * for a genus without a sheath, or a finished lead that never showed one, the first measurement
 * at ≥ 95% of its tallest height — only once the lead is no longer 'growing'. Null otherwise.
 * Measurements after `today` are ignored.
 */
export function maturedOn(h: LeadHistory, genus: GenusDefaults, today?: IsoDate): IsoDate | null {
  return maturedOnSorted(sortedMeasurements(h, today), h.lead.status, genus);
}

interface LogNormal {
  mu: number;
  sigma: number;
}

/**
 * Shrinks the plant's own log-intervals toward a genus log-normal: μ = w·mean + (1 − w)·μ_g with
 * w = n/(n + k); σ² = w·s² + (1 − w)·σ_g² (plant variance only with n ≥ 2), inflated by
 * (1 + 1/(n + k)) for the uncertainty of μ. Non-positive intervals are dropped.
 */
export function shrinkLogInterval(plantDays: readonly number[], genus: LogNormal, k = BLOOM_SHRINKAGE_K): LogNormal & { n: number; weight: number } {
  const logs = plantDays.filter((d) => Number.isFinite(d) && d > 0).map((d) => Math.log(d));
  const n = logs.length;
  const w = n / (n + k);
  const mu = n > 0 ? w * mean(logs) + (1 - w) * genus.mu : genus.mu;
  const varPlant = n >= 2 ? sampleVariance(logs) : genus.sigma ** 2;
  const v = w * varPlant + (1 - w) * genus.sigma ** 2;
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
  return history.map((h) => {
    const ms = sortedMeasurements(h);
    const mature = maturedOnSorted(ms, h.lead.status, genus);
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
    };
  });
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
}

function windowFrom(start: IsoDate, ln: LogNormal, extraSdDays = 0): DateWindow {
  const med = Math.exp(ln.mu);
  const lo = Math.exp(ln.mu + Z10 * ln.sigma);
  const hi = Math.exp(ln.mu + Z90 * ln.sigma);
  const widen = (d: number) => Math.sqrt(d * d + (Z90 * extraSdDays) ** 2);
  return {
    p10: addDays(start, Math.round(med - widen(med - lo))),
    p50: addDays(start, Math.round(med)),
    p90: addDays(start, Math.round(med + widen(hi - med))),
  };
}

/**
 * Forecasts when (10th/50th/90th percentile dates of the first open flower) and whether the lead
 * blooms, and how many flowers it is likely to carry.
 *
 * Starting point: the actual first-open date if recorded; else buds seen + (buds → open); else the
 * date the lead matured + (mature → open); else, while growing, the growth fit's maturity date
 * (spread MATURITY_DATE_SD_DAYS) + (mature → open). Intervals: the plant's own, shrunk toward the
 * genus sum of stage medians (see `shrinkLogInterval`). Degree-day mode is used when `readings`
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
  const mature = maturedOnSorted(currentMs, lead.status, genus);
  const lost = lead.status === 'dried_off' || lead.status === 'rotted' || lead.status === 'removed';
  const stage: BloomStage = lost && !open ? 'lost' : faded ? 'faded' : open ? 'in_flower' : buds ? 'buds' : mature ? 'mature' : 'growing';

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
  let seasons = 0;
  let weight = 0;
  const dailyNormal = input.readings && input.readings.length ? recentDailyDegreeDays(input.readings, today, ddOptions) : null;
  const useDD = (fromBuds ? b2oDD.length : m2oDD.length) > 0 && dailyNormal !== null && dailyNormal > 0;

  if (open) {
    firstOpen = { p10: open, p50: open, p90: open };
  } else if (stage !== 'lost') {
    const start = fromBuds ? buds : (mature ?? input.fit?.maturityDate ?? null);
    if (!start) {
      notes.push('no maturity date yet: bloom window needs the lead to be measured');
    } else if (useDD && input.readings) {
      mode = 'degree-days';
      const ddPerDay = meanDailyDegreeDays(input.readings, ddOptions) ?? dailyNormal!;
      const g = fromBuds ? genusB2O : genusM2O;
      const genusDD = { mu: g.mu + Math.log(ddPerDay), sigma: g.sigma };
      const sh = shrinkLogInterval(fromBuds ? b2oDD : m2oDD, genusDD);
      seasons = sh.n;
      weight = sh.weight;
      const target = (z: number) => Math.exp(sh.mu + z * sh.sigma);
      const at = (z: number) => dateReachingDegreeDays(input.readings!, start, target(z), today, ddOptions) ?? addDays(start, Math.round(target(z) / ddPerDay));
      firstOpen = { p10: at(Z10), p50: at(0), p90: at(Z90) };
      notes.push(`intervals in degree-days above ${ddOptions.baseTemp}° (${ddOptions.method ?? DEFAULT_DEGREE_DAY_METHOD} averaging)`);
    } else {
      const sh = shrinkLogInterval(fromBuds ? budsToOpenDays : matureToOpenDays, fromBuds ? genusB2O : genusM2O);
      seasons = sh.n;
      weight = sh.weight;
      const predictedMaturity = !fromBuds && !mature;
      firstOpen = windowFrom(start, sh, predictedMaturity ? MATURITY_DATE_SD_DAYS : 0);
      if (predictedMaturity) notes.push(`from the predicted maturity date ${start}`);
    }
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
    chance = 1;
    chanceReasons.push(open ? 'in flower' : 'buds visible');
  } else if (lost) {
    chance = 0;
    chanceReasons.push(`lead ${lead.status.replace('_', ' ')}`);
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
    const lastSeason = past.filter((p) => p.tallestMm !== null).sort((a, b) => b.season - a.season)[0];
    const size = input.fit && input.fit.method !== 'insufficient' ? input.fit.matureHeightMm : currentTallest;
    if (lastSeason && lastSeason.tallestMm && size !== null && size > 0) {
      const ratio = size / lastSeason.tallestMm;
      if (ratio < 0.7) {
        chance *= CHANCE_FACTORS.muchSmallerLead;
        chanceReasons.push(`lead at ${Math.round(ratio * 100)}% of last season's size`);
      } else if (ratio < 0.9) {
        chance *= CHANCE_FACTORS.smallerLead;
        chanceReasons.push(`lead at ${Math.round(ratio * 100)}% of last season's size`);
      }
    }
    chance = Math.min(CHANCE_BOUNDS[1], Math.max(CHANCE_BOUNDS[0], chance));
  }

  // Flowers.
  const withFlowers = past.filter((p) => p.flowerCount !== null && p.flowerCount > 0);
  const spikes = withFlowers.length ? Math.max(1, Math.round(median(withFlowers.map((p) => p.spikeCount ?? 1)))) : 1;
  const perSpikeRows = withFlowers.map((p) => ({ size: p.tallestMm, fps: p.flowerCount! / Math.max(1, p.spikeCount ?? 1) }));
  const currentSize = input.fit && input.fit.method !== 'insufficient' ? input.fit.matureHeightMm : currentTallest;
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

/** Mean daily degree-days over all readings given (one area). */
function meanDailyDegreeDays(readings: readonly TemperatureReading[], options: DegreeDayOptions): number | null {
  if (readings.length === 0) return null;
  let sum = 0;
  for (const r of readings) sum += dailyDegreeDays(r.minC, r.maxC, options);
  return sum / readings.length;
}
