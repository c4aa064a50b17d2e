/**
 * Growing degree-days by the averaging method. Temperatures may be °C or °F as long as the day's
 * min, max, base and upper threshold share one scale; the result is in degree-days of that scale.
 *
 * Two variants, after McMaster & Wilhelm (1997, Agric. For. Meteorol. 87:291), whose two
 * readings of "clamp" differ a lot on cold nights:
 * - 'plain' (their method 1): GDD = max(0, (Tmax + Tmin)/2 − Tbase).
 * - 'clamped' (their method 2, the corn rule with a horizontal cutoff): Tmax is capped at the
 *   upper threshold, then Tmax and Tmin are each raised to Tbase when below it, and
 *   GDD = (Tmax′ + Tmin′)/2 − Tbase. With no upper threshold only the floor applies.
 * The engine uses 'clamped' by default (DEFAULT_DEGREE_DAY_METHOD).
 */
import { addDays, daysBetween, isIsoDate } from './dates';
import type { IsoDate, TemperatureReading } from './types';

export type DegreeDayMethod = 'plain' | 'clamped';

/** The variant the engine uses unless told otherwise (see the module comment). */
export const DEFAULT_DEGREE_DAY_METHOD: DegreeDayMethod = 'clamped';
/** Days of recent readings averaged to project forward when no normals are given (chosen, not sourced). */
export const RECENT_NORMAL_DAYS = 28;
/**
 * Base temperature for orchid flower development, °C: 3.5 °C from Lopez & Runkle 2004,
 * HortScience 39(7):1630 (Zygopetalum, visible inflorescence to open flower); used for other
 * sympodial genera for want of a better figure — common practice, not measured for them.
 */
export const ORCHID_BASE_TEMP_C = 3.5;

export interface DegreeDayOptions {
  baseTemp: number;
  /** Upper threshold for the 'clamped' method; ignored by 'plain'. */
  upperTemp?: number;
  method?: DegreeDayMethod;
}

/**
 * Degree-days of one day from its minimum and maximum temperature. If min > max they are
 * swapped; non-finite input gives 0. Never negative.
 */
export function dailyDegreeDays(minTemp: number, maxTemp: number, options: DegreeDayOptions): number {
  if (!Number.isFinite(minTemp) || !Number.isFinite(maxTemp) || !Number.isFinite(options.baseTemp)) return 0;
  let lo = Math.min(minTemp, maxTemp);
  let hi = Math.max(minTemp, maxTemp);
  const base = options.baseTemp;
  const method = options.method ?? DEFAULT_DEGREE_DAY_METHOD;
  if (method === 'plain') return Math.max(0, (hi + lo) / 2 - base);
  if (options.upperTemp !== undefined && Number.isFinite(options.upperTemp)) {
    hi = Math.min(hi, options.upperTemp);
    lo = Math.min(lo, options.upperTemp);
  }
  hi = Math.max(hi, base);
  lo = Math.max(lo, base);
  return Math.max(0, (hi + lo) / 2 - base);
}

export interface DegreeDaySum {
  degreeDays: number;
  /** Days in [from, to) that had a reading. */
  daysWithReadings: number;
  /** Days in [from, to) without a reading (counted as zero). */
  missingDays: number;
}

/**
 * Sum of daily degree-days over the dates from `from` (inclusive) to `to` (exclusive) from one
 * area's readings (if several readings share a date, the first is used). Missing days add zero
 * and are counted in `missingDays`.
 */
export function sumDegreeDays(
  readings: readonly Pick<TemperatureReading, 'date' | 'minC' | 'maxC'>[],
  from: IsoDate,
  to: IsoDate,
  options: DegreeDayOptions,
): DegreeDaySum {
  const byDate = new Map<string, Pick<TemperatureReading, 'minC' | 'maxC'>>();
  for (const r of readings) if (isIsoDate(r.date) && !byDate.has(r.date)) byDate.set(r.date, r);
  const n = Math.max(0, daysBetween(from, to));
  let sum = 0;
  let seen = 0;
  for (let i = 0; i < n; i++) {
    const r = byDate.get(addDays(from, i));
    if (!r) continue;
    seen++;
    sum += dailyDegreeDays(r.minC, r.maxC, options);
  }
  return { degreeDays: sum, daysWithReadings: seen, missingDays: n - seen };
}

/**
 * Mean daily degree-days over the last `days` days of readings before `asOf` (the area's recent
 * normal). Null when no reading falls in that window.
 */
export function recentDailyDegreeDays(
  readings: readonly Pick<TemperatureReading, 'date' | 'minC' | 'maxC'>[],
  asOf: IsoDate,
  options: DegreeDayOptions,
  days = RECENT_NORMAL_DAYS,
): number | null {
  const s = sumDegreeDays(readings, addDays(asOf, -days), asOf, options);
  return s.daysWithReadings > 0 ? s.degreeDays / s.daysWithReadings : null;
}

/**
 * The first date D by which `target` degree-days have accumulated since `start`, counted as
 * `sumDegreeDays` counts an interval: the days from `start` (inclusive) to D (exclusive). So a
 * past interval measured from A to B gives back B when its sum is the target: the same count in
 * both directions. Uses actual readings up to `asOf` (exclusive) and, after that, the recent
 * normal per day (`recentDailyDegreeDays`). Returns null when the target cannot be reached (no
 * readings, or a normal of zero) within `maxDays`.
 */
export function dateReachingDegreeDays(
  readings: readonly Pick<TemperatureReading, 'date' | 'minC' | 'maxC'>[],
  start: IsoDate,
  target: number,
  asOf: IsoDate,
  options: DegreeDayOptions,
  maxDays = 730,
): IsoDate | null {
  if (!(target > 0)) return start;
  const byDate = new Map<string, Pick<TemperatureReading, 'minC' | 'maxC'>>();
  for (const r of readings) if (isIsoDate(r.date) && !byDate.has(r.date)) byDate.set(r.date, r);
  const normal = recentDailyDegreeDays(readings, asOf, options);
  let sum = 0;
  for (let i = 0; i < maxDays; i++) {
    const date = addDays(start, i);
    let dd: number;
    if (date < asOf) {
      const r = byDate.get(date);
      dd = r ? dailyDegreeDays(r.minC, r.maxC, options) : (normal ?? 0);
    } else {
      if (normal === null || !(normal > 0)) return null;
      dd = normal;
    }
    sum += dd;
    // The day that completes the target is the last one counted: D is the day after it.
    if (sum >= target) return addDays(date, 1);
  }
  return null;
}
