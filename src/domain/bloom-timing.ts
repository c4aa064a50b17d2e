/**
 * When a first flower may open, as a distribution over calendar days, and what today does to it.
 *
 * A distribution is written as its quantile function on the standard-normal scale: `dayAt(z)` is
 * the day number (`toDayNumber`) at level Φ(z), increasing in z. That covers the log-normal stage
 * intervals, the normal blend with the plant's usual day, and the later of two (a flower cannot
 * open before buds that are not there yet have formed and opened).
 *
 * Time passes honestly: a lead not open on `today` is conditioned on "not open yet" (a left-
 * truncated distribution), so no quantile of an open date still to come lies before today; past
 * its likely day the lead is *late* and its chance falls each day; past its latest plausible day
 * (`LATEST_PLAUSIBLE_LEVEL`) it is probably not flowering this season.
 */
import { fromDayNumber, toDayNumber } from './dates';
import { normalCdf, normalQuantile } from './distributions';
import type { IsoDate } from './types';

/**
 * A distribution of the day: `dayAt(z)` is the day number at standard-normal level z (increasing
 * in z), `shareBy(day)` the share on or before `day` (its inverse). Closed forms where there are
 * any; bisection otherwise.
 */
export interface DayDistribution {
  dayAt(z: number): number;
  shareBy(day: number): number;
}

/** The share on or before `day` of a distribution known only by its quantiles (bisection on z). */
function shareByBisection(dayAt: (z: number) => number, day: number): number {
  if (day < dayAt(-Z_RANGE)) return 0;
  if (day >= dayAt(Z_RANGE)) return 1;
  let lo = -Z_RANGE;
  let hi = Z_RANGE;
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (dayAt(mid) < day) lo = mid;
    else hi = mid;
  }
  return normalCdf(lo);
}

/** A distribution given by its quantile function alone. */
export function byQuantiles(dayAt: (z: number) => number): DayDistribution {
  return { dayAt, shareBy: (day) => shareByBisection(dayAt, day) };
}

export interface DateWindow {
  p10: IsoDate;
  p50: IsoDate;
  p90: IsoDate;
}

/**
 * Beyond this share of the distribution gone by, a lead is "probably not this season" (chosen:
 * the 99th percentile; with a tenth of the weight on a season off the plant's habit, that is
 * about the 90th percentile of such a season).
 */
export const LATEST_PLAUSIBLE_LEVEL = 0.99;
/** Quantile levels are kept this far inside (0, 1) (numerical floor). */
const QUANTILE_EPS = 1e-9;
/** The z range searched for a day (Φ(±8) is 1e-15 from 0 and 1). */
const Z_RANGE = 8;
const Z10 = normalQuantile(0.1);
const Z90 = normalQuantile(0.9);
/** z of a normal 80% window's half width: 1.2816. */
export const Z80_HALF = Z90;

export interface LogNormal {
  mu: number;
  sigma: number;
}

/**
 * A log-normal interval after `startDay`, widened either side of its median by an independent
 * normal spread `extraSdDays` (root sum of squares, as for the 10th/90th percentiles).
 */
export function logNormalAfter(startDay: number, ln: LogNormal, extraSdDays = 0): DayDistribution {
  const med = Math.exp(ln.mu);
  const dayAt = (z: number) => {
    const d = Math.abs(Math.exp(ln.mu + z * ln.sigma) - med);
    const w = Math.sqrt(d * d + (z * extraSdDays) ** 2);
    return startDay + (z < 0 ? med - w : med + w);
  };
  if (extraSdDays > 0) return byQuantiles(dayAt);
  return { dayAt, shareBy: (day) => (day <= startDay ? 0 : normalCdf((Math.log(day - startDay) - ln.mu) / ln.sigma)) };
}

/** A normal distribution of the day, centred `centreDays` after `startDay`. */
export function normalAfter(startDay: number, centreDays: number, sdDays: number): DayDistribution {
  return { dayAt: (z) => startDay + centreDays + sdDays * z, shareBy: (day) => normalCdf((day - startDay - centreDays) / sdDays) };
}

/**
 * A mixture: `a` with weight `weightA`, `b` with the rest. Its share by a day is the weighted sum
 * of theirs; its quantiles are found by bisection on the day.
 */
export function mixture(a: DayDistribution, b: DayDistribution, weightA: number): DayDistribution {
  const shareBy = (day: number) => weightA * a.shareBy(day) + (1 - weightA) * b.shareBy(day);
  const dayAt = (z: number) => {
    const u = normalCdf(z);
    let lo = Math.min(a.dayAt(-Z_RANGE), b.dayAt(-Z_RANGE));
    let hi = Math.max(a.dayAt(Z_RANGE), b.dayAt(Z_RANGE));
    for (let i = 0; i < 50 && hi - lo > 1e-3; i++) {
      const mid = (lo + hi) / 2;
      if (shareBy(mid) < u) lo = mid;
      else hi = mid;
    }
    return (lo + hi) / 2;
  };
  return { dayAt, shareBy };
}

/**
 * The later of two events, taken level by level (as if they moved together): e.g. the plant's
 * usual timing, and "buds not seen yet, so no sooner than buds take from today".
 */
export function laterOf(a: DayDistribution, b: DayDistribution): DayDistribution {
  return { dayAt: (z) => Math.max(a.dayAt(z), b.dayAt(z)), shareBy: (day) => Math.min(a.shareBy(day), b.shareBy(day)) };
}

/** The distribution with its spread either side of the median multiplied by `factor` (≥ 1 widens). */
export function widened(dist: DayDistribution, factor: number): DayDistribution {
  const med = dist.dayAt(0);
  return {
    dayAt: (z) => med + (dist.dayAt(z) - med) * factor,
    shareBy: (day) => dist.shareBy(med + (day - med) / factor),
  };
}

/** The share of the distribution on or before `day` (0 when it all lies after, 1 when all before). */
export function shareBy(dist: DayDistribution, day: number): number {
  return dist.shareBy(day);
}

/** The q-quantile (0–1) of the distribution left-truncated at the share `gone` already past. */
export function conditionedDay(dist: DayDistribution, q: number, gone: number): number {
  const u = Math.min(1 - QUANTILE_EPS, Math.max(QUANTILE_EPS, gone + q * (1 - gone)));
  return dist.dayAt(normalQuantile(u));
}

/** 10th, 50th and 90th percentile dates of the distribution, conditioned on a share `gone`. */
export function windowOf(dist: DayDistribution, gone = 0): DateWindow {
  const at = (q: number) => fromDayNumber(Math.round(conditionedDay(dist, q, gone)));
  return { p10: at(0.1), p50: at(0.5), p90: at(0.9) };
}

/**
 * Widens a window so that its half widths are at least `minHalfDays` either side of the median,
 * without moving the median, and with no date before `notBefore`.
 */
export function widenWindow(w: DateWindow, minHalfDays: number, notBefore: IsoDate): DateWindow {
  const mid = toDayNumber(w.p50);
  const lo = Math.min(toDayNumber(w.p10), mid - Math.ceil(minHalfDays));
  const hi = Math.max(toDayNumber(w.p90), mid + Math.ceil(minHalfDays));
  const floor = (d: IsoDate) => (d < notBefore ? notBefore : d);
  return { p10: floor(fromDayNumber(lo)), p50: floor(w.p50), p90: floor(fromDayNumber(hi)) };
}

/** Width of a window in days, from its 10th to its 90th percentile. */
export function windowDays(w: DateWindow): number {
  return toDayNumber(w.p90) - toDayNumber(w.p10);
}

/** The z levels of the 80% window, for callers building their own. */
export const WINDOW_Z = { p10: Z10, p50: 0, p90: Z90 } as const;

