/**
 * Growth curve of one lead: pseudobulb height h (mm) against t = days since the lead was
 * first seen, as the three-parameter logistic
 *
 *     h(t) = A / (1 + exp((m − t) / s))
 *
 * with A the mature height (mm), m the midpoint (day of half height) and s the scale (days).
 * Same curve as R's SSlogis (Asym, xmid, scal).
 */
import { median, sampleStandardDeviation } from 'simple-statistics';
import { addDays, daysBetween, toDayNumber } from './dates';
import { countOnOrBefore, datedMeasurements, usableHeight } from './dated-measurements';
import { studentTQuantile } from './distributions';
import type { GenusDefaults } from './genus-defaults';
import { levenbergMarquardt, type LeastSquaresModel } from './least-squares';
import type { IsoDate, Lead, Measurement } from './types';

/** Shape (and size) of an earlier lead's fitted curve. */
export interface LeadShape {
  midpointDays: number;
  scaleDays: number;
  matureHeightMm?: number;
}

export type FitMethod = 'free' | 'scale-only-plant-shape' | 'scale-only-genus-shape' | 'insufficient';
export type FitQuality = 'good' | 'fair' | 'poor' | 'none';

export interface LeadCurveFit {
  method: FitMethod;
  /** Predicted mature height A, mm (≥ 0). */
  matureHeightMm: number;
  /** 80% interval for A, mm; low ≥ 0 and low ≤ estimate ≤ high. */
  interval80: { lowMm: number; highMm: number };
  /** Standard error of A from the fit alone (no shape term), mm; null when not estimable. */
  standardErrorMm: number | null;
  midpointDays: number;
  scaleDays: number;
  /** Days after first seen when the curve reaches 95% of A: m + s·ln 19. */
  maturityDays: number;
  maturityDate: IsoDate;
  /** Residual standard deviation, mm; null with fewer residual degrees of freedom than one. */
  residualSdMm: number | null;
  /** Measurements used. */
  n: number;
  /** Degrees of freedom of the t quantile behind the interval (0 when a normal is used). */
  degreesOfFreedom: number;
  rSquared: number | null;
  quality: FitQuality;
  /** Age of the lead on `today`, days. */
  ageDaysToday: number;
  /** Curve height on `today`, mm. */
  expectedHeightTodayMm: number;
  /** Plain-language notes on what the fit did. */
  notes: string[];
}

export interface FitLeadCurveOptions {
  /** Fitted shapes of the same plant's earlier leads (any order). */
  priorShapes?: readonly LeadShape[];
  genusDefaults: GenusDefaults;
  /** Measurements after this date are ignored. */
  today: IsoDate;
}

/** 95% of mature height is reached ln 19 scales after the midpoint. */
export const MATURITY_FRACTION = 0.95;
const LN19 = Math.log(MATURITY_FRACTION / (1 - MATURITY_FRACTION));
/** Central coverage of the reported interval. */
export const INTERVAL_COVERAGE = 0.8;
/** Fewest measurements for a free three-parameter fit (one residual degree of freedom). */
export const MIN_POINTS_FREE_FIT = 4;
/** Prior measurement noise for scale-only fits, mm — ruler reading of a bulb, common practice (from memory). */
export const MEASUREMENT_SD_PRIOR_MM = 3;
/** Weight of that prior, in pseudo degrees of freedom (chosen, not sourced). */
export const MEASUREMENT_SD_PRIOR_DF = 2;
/** A free fit whose mature height exceeds this multiple of the tallest measurement is implausible. */
export const MAX_FREE_EXTRAPOLATION = 2.5;
/** A free fit whose correlation-scaled JᵀJ has a larger condition number is ill-conditioned. */
export const MAX_CONDITION_NUMBER = 1e12;
/** Earlier-lead shape spread is floored at this share of the genus spread (chosen, not sourced). */
export const PLANT_SHAPE_SD_FLOOR = 0.25;
/** With fewer than three earlier leads, their shape spread is this share of the genus spread (chosen: a plant varies less than its genus). */
export const PLANT_SHAPE_SD_FEW = 0.4;
/**
 * Robust refit: Huber's weight function with the usual tuning constant 1.345 (95% efficiency at
 * the normal; Huber 1981, Robust Statistics, §7.8), by iteratively reweighted least squares. It
 * runs only once some point lies more than ROBUST_TRIGGER robust standard deviations off the
 * least-squares curve (and ROBUST_MIN_SHARE of its height), so an ordinary fit is the plain
 * least-squares one.
 */
export const HUBER_C = 1.345;
/** Standardised residual (against 1.4826 × the median absolute deviation) that starts the robust refit (chosen). */
export const ROBUST_TRIGGER = 3;
/**
 * …and only when that point is also off by more than this share of the curve's height there: a
 * ruler reads a bulb to a few per cent, so an ordinary scatter never starts it (chosen).
 */
export const ROBUST_MIN_SHARE = 0.15;
/** Fewest measurements for a robust refit: a median absolute deviation needs a few residuals (chosen). */
export const MIN_POINTS_ROBUST = 6;

/** Logistic fraction 1/(1 + exp((m − t)/s)), computed without overflow. */
export function logisticFraction(t: number, midpointDays: number, scaleDays: number): number {
  const z = (midpointDays - t) / scaleDays;
  if (z >= 0) {
    const e = Math.exp(-z);
    return e / (1 + e);
  }
  return 1 / (1 + Math.exp(z));
}

/** Curve height in mm at t days after first seen. */
export function logisticHeight(t: number, matureHeightMm: number, midpointDays: number, scaleDays: number): number {
  return matureHeightMm * logisticFraction(t, midpointDays, scaleDays);
}

/**
 * Day (after first seen) on which the curve reaches `heightMm`; null if it never does
 * (height ≥ A or ≤ 0).
 */
export function dayAtHeight(heightMm: number, matureHeightMm: number, midpointDays: number, scaleDays: number): number | null {
  if (!(heightMm > 0) || !(heightMm < matureHeightMm)) return null;
  return midpointDays - scaleDays * Math.log(matureHeightMm / heightMm - 1);
}

/** The logistic in (A, m, s) as a least-squares model, for `levenbergMarquardt`. */
export const LOGISTIC_MODEL: LeastSquaresModel = {
  value: (t, p) => p[0] * logisticFraction(t, p[1], p[2]),
  evaluate: (t, p, out) => {
    const g = logisticFraction(t, p[1], p[2]);
    const gg = g * (1 - g);
    out[0] = g;
    out[1] = (-p[0] * gg) / p[2];
    out[2] = (p[0] * gg * (p[1] - t)) / (p[2] * p[2]);
    return p[0] * g;
  },
  gradient: (t, p, out) => {
    const g = logisticFraction(t, p[1], p[2]);
    const gg = g * (1 - g);
    out[0] = g;
    out[1] = (-p[0] * gg) / p[2];
    out[2] = (p[0] * gg * (p[1] - t)) / (p[2] * p[2]);
  },
};

function positiveFinite(v: number | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v) && v > 0;
}

interface BorrowedShape {
  source: 'plant' | 'genus';
  m: number;
  s: number;
  sdM: number;
  sdS: number;
  priorHeightMm: number;
  priorHeightRelSd: number;
}

/** The borrowed shape with no earlier leads to borrow from: the genus's, made once per genus. */
const genusShapes = new WeakMap<GenusDefaults, BorrowedShape>();

function borrowedShape(priorShapes: readonly LeadShape[] | undefined, genus: GenusDefaults): BorrowedShape {
  if (!priorShapes || priorShapes.length === 0) {
    let shape = genusShapes.get(genus);
    if (!shape) {
      shape = computeBorrowedShape(undefined, genus);
      genusShapes.set(genus, shape);
    }
    return shape;
  }
  return computeBorrowedShape(priorShapes, genus);
}

function computeBorrowedShape(priorShapes: readonly LeadShape[] | undefined, genus: GenusDefaults): BorrowedShape {
  const usable = (priorShapes ?? []).filter(
    (p) => Number.isFinite(p.midpointDays) && positiveFinite(p.scaleDays),
  );
  const heights = (priorShapes ?? []).map((p) => p.matureHeightMm).filter(positiveFinite);
  const priorHeightMm = heights.length > 0 ? median(heights) : genus.matureHeightMm;
  const priorHeightRelSd =
    heights.length >= 3
      ? Math.max(sampleStandardDeviation(heights) / priorHeightMm, PLANT_SHAPE_SD_FEW * genus.matureHeightRelSd)
      : genus.matureHeightRelSd;
  if (usable.length === 0) {
    return {
      source: 'genus',
      m: genus.midpointDays,
      s: genus.scaleDays,
      sdM: genus.midpointSdDays,
      sdS: genus.scaleSdDays,
      priorHeightMm,
      priorHeightRelSd,
    };
  }
  const ms = usable.map((p) => p.midpointDays);
  const ss = usable.map((p) => p.scaleDays);
  const few = usable.length < 3;
  const sdM = few
    ? PLANT_SHAPE_SD_FEW * genus.midpointSdDays
    : Math.max(sampleStandardDeviation(ms), PLANT_SHAPE_SD_FLOOR * genus.midpointSdDays);
  const sdS = few
    ? PLANT_SHAPE_SD_FEW * genus.scaleSdDays
    : Math.max(sampleStandardDeviation(ss), PLANT_SHAPE_SD_FLOOR * genus.scaleSdDays);
  return {
    source: 'plant',
    m: median(ms),
    s: median(ss),
    sdM,
    sdS,
    priorHeightMm,
    priorHeightRelSd,
  };
}

/*
 * Sensitivity of ln Â to the borrowed scale, |u|/(1 + e^u) with u = (t − m)/s, replaced by its
 * running maximum over later ages so that a later measurement never increases it.
 */
const SCALE_SENSITIVITY_PEAK = (() => {
  // Root of 1 + e^u = u·e^u (maximum of u/(1 + e^u) for u > 0), by Newton.
  let u = 1.3;
  for (let i = 0; i < 50; i++) {
    const f = 1 + Math.exp(u) - u * Math.exp(u);
    const df = -u * Math.exp(u);
    u -= f / df;
  }
  return { u, value: u / (1 + Math.exp(u)) };
})();

function scaleSensitivity(u: number): number {
  const f = Math.abs(u) / (1 + Math.exp(u));
  return u < SCALE_SENSITIVITY_PEAK.u ? Math.max(f, SCALE_SENSITIVITY_PEAK.value) : f;
}

interface Candidate {
  method: FitMethod;
  a: number;
  m: number;
  s: number;
  halfWidth: number;
  se: number | null;
  residualSd: number | null;
  df: number;
  sse: number;
  notes: string[];
  /** Indexes (into the fitted points) the robust refit down-weighted, when it ran. */
  downWeighted?: number[];
}

/**
 * The mature height and 80% interval a candidate reports on points `h`: A ± half width, low at
 * least 0; and since the lead is at least as tall as it has been measured (within the fit's own
 * scatter), a curve levelling off below the tallest height kept at full weight is raised to it,
 * the interval moving up with it.
 */
function reported(c: Candidate, h: readonly number[]): { a: number; low: number; high: number; raisedTo: number | null } {
  const a0 = Number.isFinite(c.a) && c.a > 0 ? c.a : 0;
  const half = Number.isFinite(c.halfWidth) && c.halfWidth >= 0 ? c.halfWidth : a0;
  let a = a0;
  let low = Math.max(0, a0 - half);
  let high = a0 + half;
  const spread = c.residualSd !== null && Number.isFinite(c.residualSd) ? c.residualSd : MEASUREMENT_SD_PRIOR_MM;
  const tallest = tallestNotDownWeighted(h, c.downWeighted);
  let raisedTo: number | null = null;
  if (tallest !== null && a < tallest - spread) {
    // The interval moves up with the estimate; its width (the fit's certainty) stays.
    const shift = tallest - a;
    a = tallest;
    raisedTo = tallest;
    low += shift;
    high += shift;
  }
  return { a, low: Math.min(low, a), high, raisedTo };
}

function clampedWidth(c: Candidate, h: readonly number[]): number {
  const r = reported(c, h);
  return r.high - r.low;
}

function scaleOnly(t: number[], h: number[], shape: BorrowedShape): Candidate | null {
  const g: number[] = [];
  let sgg = 0;
  let sgy = 0;
  for (let i = 0; i < t.length; i++) {
    g.push(logisticFraction(t[i], shape.m, shape.s));
    sgg += g[i] * g[i];
    sgy += g[i] * h[i];
  }
  if (!(sgg > 1e-12)) return null;
  const a = Math.max(0, sgy / sgg);
  let sse = 0;
  for (let i = 0; i < t.length; i++) sse += (h[i] - a * g[i]) ** 2;
  const df = MEASUREMENT_SD_PRIOR_DF + t.length - 1;
  const s2 = (MEASUREMENT_SD_PRIOR_DF * MEASUREMENT_SD_PRIOR_MM ** 2 + sse) / df;
  const se = Math.sqrt(s2 / sgg);
  const q = studentTQuantile(0.5 + INTERVAL_COVERAGE / 2, df);
  const tLast = maxOf(t);
  const gLast = logisticFraction(tLast, shape.m, shape.s);
  const u = (tLast - shape.m) / shape.s;
  const relShapeSd = Math.hypot(((1 - gLast) * shape.sdM) / shape.s, (scaleSensitivity(u) * shape.sdS) / shape.s);
  const z = studentTQuantile(0.5 + INTERVAL_COVERAGE / 2, Infinity);
  const halfWidth = Math.hypot(q * se, z * relShapeSd * a);
  return {
    method: shape.source === 'plant' ? 'scale-only-plant-shape' : 'scale-only-genus-shape',
    a,
    m: shape.m,
    s: shape.s,
    halfWidth,
    se,
    residualSd: t.length > 1 ? Math.sqrt(sse / (t.length - 1)) : null,
    df,
    sse,
    // Written out only if this candidate is the one reported (see `candidateNotes`).
    notes: [],
  };
}

/** The notes a chosen candidate reports about itself. */
function candidateNotes(c: Candidate): string[] {
  if (c.method !== 'scale-only-plant-shape' && c.method !== 'scale-only-genus-shape') return c.notes;
  const source = c.method === 'scale-only-plant-shape' ? "this plant's earlier leads" : 'genus defaults';
  return [`shape borrowed from ${source} (midpoint ${c.m.toFixed(0)} d, scale ${c.s.toFixed(1)} d)`];
}

/** Largest of a non-empty list (as Math.max of its items). */
function maxOf(xs: readonly number[]): number {
  let best = -Infinity;
  for (let i = 0; i < xs.length; i++) best = Math.max(best, xs[i]);
  return best;
}

/** Smallest of a non-empty list (as Math.min of its items). */
function minOf(xs: readonly number[]): number {
  let best = Infinity;
  for (let i = 0; i < xs.length; i++) best = Math.min(best, xs[i]);
  return best;
}

function implausibility(r: ReturnType<typeof levenbergMarquardt>, maxH: number, tMax: number): string | null {
  const [a, m, s] = r.params;
  if (!(r.conditionNumber < MAX_CONDITION_NUMBER)) return 'free fit ill-conditioned';
  if (!(a > 0) || !(s > 0.5) || !(s < 365)) return 'free fit implausible (height or scale)';
  if (a > MAX_FREE_EXTRAPOLATION * maxH) return 'free fit extrapolates too far beyond the tallest measurement';
  if (!(m > -180 && m < tMax + 365)) return 'free fit implausible (midpoint)';
  return null;
}

function freeFit(t: number[], h: number[], shape: BorrowedShape, scaleOnlyA: number | null): Candidate | { rejected: string } {
  const maxH = maxOf(h);
  const tMin = minOf(t);
  const tMax = maxOf(t);
  const starts: number[][] = [
    [Math.max(maxH * 1.05, scaleOnlyA ?? 0, 1), shape.m, shape.s],
    [Math.max(maxH * 1.2, 1), (tMin + tMax) / 2, Math.max((tMax - tMin) / 6, 1)],
  ];
  if (scaleOnlyA !== null && scaleOnlyA > 0) starts.push([scaleOnlyA, shape.m, shape.s]);
  // Fallbacks when those all end in a step (a large borrowed height can pull the solver there):
  // just above the tallest with the borrowed shape, and a shape read off the data themselves.
  if (scaleOnlyA !== null && scaleOnlyA > maxH * 1.05) starts.push([Math.max(maxH * 1.05, 1), shape.m, shape.s]);
  const fromData = shapeFromData(t, h, maxH);
  if (fromData) starts.push([Math.max(maxH * 1.05, 1), fromData.m, fromData.s]);
  // Starts in order of how often they succeed; the first converged, plausible fit is kept.
  let best: ReturnType<typeof levenbergMarquardt> | null = null;
  let rejected = 'free fit did not converge';
  for (const p0 of starts) {
    const r = levenbergMarquardt(LOGISTIC_MODEL, t, h, p0, { maxIterations: 300, stepTolerance: 1e-9, sseTolerance: 1e-10 });
    if (!r.converged || !r.standardErrors) continue;
    const problem = implausibility(r, maxH, tMax);
    if (problem) {
      rejected = problem;
      continue;
    }
    best = r;
    break;
  }
  if (!best || !best.standardErrors) return { rejected };
  const robust = robustRefit(t, h, best);
  if (robust) best = robust.result;
  const [a, m, s] = best.params;
  const se = best.standardErrors![0];
  const q = studentTQuantile(0.5 + INTERVAL_COVERAGE / 2, best.degreesOfFreedom);
  const halfWidth = q * se;
  if (!Number.isFinite(halfWidth)) return { rejected: 'free fit has no finite interval' };
  return {
    method: 'free',
    a,
    m,
    s,
    halfWidth,
    se,
    residualSd: best.residualSd,
    df: best.degreesOfFreedom,
    sse: best.sse,
    notes: [],
    downWeighted: robust?.downWeighted,
  };
}

/**
 * Iteratively reweighted least squares with Huber weights (HUBER_C), started from the plain fit
 * `ls` when a point lies more than ROBUST_TRIGGER robust SDs off it: a mistyped height (a mature
 * 184 mm bulb saved as 100 mm) then pulls the curve far less. Scale: 1.4826 × the median absolute
 * residual of the plain fit, at least 1 mm (a ruler's reading). Null when no point is that far
 * off, with too few points, or when the weighted fit fails (the plain fit stands).
 */
function robustRefit(t: readonly number[], h: readonly number[], ls: ReturnType<typeof levenbergMarquardt>): { result: ReturnType<typeof levenbergMarquardt>; downWeighted: number[] } | null {
  if (t.length < MIN_POINTS_ROBUST) return null;
  const fitted = t.map((ti) => LOGISTIC_MODEL.value(ti, ls.params));
  const residuals = fitted.map((f, i) => h[i] - f);
  const scale = Math.max(1, 1.4826 * median(residuals.map((r) => Math.abs(r))));
  const farOff = (r: number, i: number) => Math.abs(r) > ROBUST_TRIGGER * scale && Math.abs(r) > ROBUST_MIN_SHARE * Math.max(fitted[i], 10);
  if (!residuals.some(farOff)) return null;
  const index = t.map((_, i) => i);
  let weights = residuals.map(() => 1);
  let result = ls;
  for (let iteration = 0; iteration < 10; iteration++) {
    const r = t.map((ti, i) => h[i] - LOGISTIC_MODEL.value(ti, result.params));
    const next = r.map((ri) => (Math.abs(ri) <= HUBER_C * scale ? 1 : (HUBER_C * scale) / Math.abs(ri)));
    const settled = next.every((w, i) => Math.abs(w - weights[i]) < 1e-6);
    weights = next;
    if (settled && iteration > 0) break;
    const root = weights.map(Math.sqrt);
    const model: LeastSquaresModel = {
      value: (i, p) => root[i] * LOGISTIC_MODEL.value(t[i], p),
      gradient: (i, p, out) => {
        LOGISTIC_MODEL.gradient(t[i], p, out);
        for (let j = 0; j < out.length; j++) out[j] *= root[i];
      },
    };
    const refit = levenbergMarquardt(model, index, h.map((hi, i) => root[i] * hi), result.params, { maxIterations: 300, stepTolerance: 1e-9, sseTolerance: 1e-10 });
    if (!refit.converged || !refit.standardErrors || implausibility(refit, maxOf(h), maxOf(t))) return null;
    result = refit;
  }
  const downWeighted = weights.map((w, i) => (w < 1 ? i : -1)).filter((i) => i >= 0);
  return downWeighted.length ? { result, downWeighted } : null;
}

/**
 * A logistic shape read off the points: the midpoint where the heights first pass half the
 * tallest, the scale from where they pass a quarter and three quarters (a logistic takes 2·ln 3
 * scales between the two). Null when the points do not span both.
 */
function shapeFromData(t: readonly number[], h: readonly number[], maxH: number): { m: number; s: number } | null {
  const ageAt = (share: number) => {
    for (let i = 1; i < t.length; i++) {
      const target = share * maxH;
      if (h[i - 1] < target && h[i] >= target) return t[i - 1] + ((target - h[i - 1]) * (t[i] - t[i - 1])) / (h[i] - h[i - 1]);
    }
    return null;
  };
  const q1 = ageAt(0.25);
  const mid = ageAt(0.5);
  const q3 = ageAt(0.75);
  if (mid === null || q1 === null || q3 === null || !(q3 > q1)) return null;
  return { m: mid, s: Math.max(1, (q3 - q1) / (2 * Math.log(3))) };
}

function priorOnly(shape: BorrowedShape, noMeasurements: boolean): Candidate {
  const z = studentTQuantile(0.5 + INTERVAL_COVERAGE / 2, Infinity);
  const a = shape.priorHeightMm;
  return {
    method: 'insufficient',
    a,
    m: shape.m,
    s: shape.s,
    halfWidth: z * shape.priorHeightRelSd * a,
    se: null,
    residualSd: null,
    df: 0,
    sse: 0,
    notes: noMeasurements
      ? [`no measurements yet: typical mature size of ${shape.source === 'plant' ? "this plant's leads" : 'the genus'} shown`]
      : [],
  };
}

function qualityOf(method: FitMethod, a: number, halfWidth: number): FitQuality {
  if (method === 'insufficient') return 'none';
  const rel = a > 0 ? halfWidth / a : Infinity;
  if (rel <= 0.1) return 'good';
  if (rel <= 0.25) return 'fair';
  return 'poor';
}

/**
 * Fits the lead's growth curve and predicts its mature height.
 *
 * Inputs: the lead's measurements (heights in mm; others, measurements of other leads, those
 * dated after `today`, with invalid dates, or with negative / non-finite heights are ignored),
 * the lead (for `firstSeen`), and options. Age t is whole days since `firstSeen`.
 *
 * Method:
 * - With ≥ 4 measurements (at ≥ 4 different ages), a free Levenberg–Marquardt fit of (A, m, s);
 *   80% interval A ± t(0.9, n − 3)·se(A), se from s²(JᵀJ)⁻¹.
 * - Always (with ≥ 1 measurement), a scale-only fit of A by linear least squares with the shape
 *   (m, s) borrowed from the median of `priorShapes`, else genus defaults. Its interval pools the
 *   residual variance with a prior measurement noise (`MEASUREMENT_SD_PRIOR_MM`) and adds the
 *   first-order effect of the shape's spread on A (large while the lead is young, vanishing as it
 *   nears maturity), so it is wider than a free fit of the same precision.
 * - The free fit is used when it converged, is well-conditioned and plausible, and its interval
 *   is no wider than the scale-only one (otherwise the data do not yet pin down the shape).
 * - The prior alone — A = the median mature height of earlier leads, else the genus typical
 *   height, with their spread — is method 'insufficient'. It is used with no usable measurement,
 *   and also whenever its interval is narrower than the fitted ones while still reaching the
 *   tallest measurement (early in the season one or two heights say less than the record).
 *
 * - A curve levelling off below the tallest measurement kept at full weight (by more than its own
 *   residual spread) is raised to it, its interval moving up with it; a measurement far off a free
 *   fit's curve counts less (`robustRefit`). Both are said in the notes.
 *
 * Guarantees: no NaN, A ≥ 0, 0 ≤ low ≤ A ≤ high, A ≥ the tallest measurement less the residual
 * spread. Adding a measurement that lies on the returned curve never widens the interval (for a
 * lead that already has a measurement, and a curve that was not raised).
 */
export function fitLeadCurve(
  measurements: readonly Measurement[],
  lead: Pick<Lead, 'id' | 'firstSeen'>,
  options: FitLeadCurveOptions,
): LeadCurveFit {
  const { today, genusDefaults } = options;
  // The lead's own measurements on or before today with a usable height, by date: t in days
  // since first seen, h in mm.
  const dated = datedMeasurements(measurements, lead.id);
  const end = countOnOrBefore(dated, today);
  const t: number[] = [];
  const h: number[] = [];
  const dates: IsoDate[] = [];
  let firstSeenDay: number | null = null;
  for (let i = 0; i < end; i++) {
    const x = dated.ms[i];
    if (!usableHeight(x)) continue;
    firstSeenDay ??= toDayNumber(lead.firstSeen);
    t.push(dated.days[i] - firstSeenDay);
    h.push(x.heightMm);
    dates.push(x.date);
  }
  const n = t.length;
  const shape = borrowedShape(options.priorShapes, genusDefaults);
  const ageDaysToday = daysBetween(lead.firstSeen, today);
  const notes: string[] = [];

  let chosen: Candidate | null = null;
  const scaled = n > 0 ? scaleOnly(t, h, shape) : null;
  if (scaled) chosen = scaled;
  // Ages come in date order, so equal ones are adjacent.
  let distinctAges = 0;
  for (let i = 0; i < n; i++) if (i === 0 || t[i] !== t[i - 1]) distinctAges++;
  if (n >= MIN_POINTS_FREE_FIT && distinctAges >= MIN_POINTS_FREE_FIT) {
    const free = freeFit(t, h, shape, scaled ? scaled.a : null);
    if ('rejected' in free) notes.push(free.rejected);
    else if (!chosen || clampedWidth(free, h) <= clampedWidth(chosen, h)) chosen = free;
    else notes.push('free fit less certain than the borrowed shape');
  } else if (n > 0) {
    notes.push(`only ${n} measurement${n === 1 ? '' : 's'} at ${distinctAges} age${distinctAges === 1 ? '' : 's'}: shape not fitted`);
  }

  // The prior alone (typical mature size of earlier leads or the genus) competes too: early in
  // the season one measurement says less about the mature size than the plant's record does.
  // It is admissible only while its interval still reaches the tallest measurement.
  const prior = priorOnly(shape, n === 0);
  const maxH = h.length > 0 ? maxOf(h) : 0;
  if (!chosen || (prior.a + prior.halfWidth >= maxH && clampedWidth(prior, h) < clampedWidth(chosen, h))) {
    if (chosen) notes.push('measurements still too early to scale the curve: typical mature size shown');
    chosen = prior;
  }

  if (chosen.downWeighted?.length) {
    const which = chosen.downWeighted.map((i) => `${dates[i]} (${h[i]} mm)`).join(', ');
    notes.push(`${chosen.downWeighted.length === 1 ? 'one measurement lies' : `${chosen.downWeighted.length} measurements lie`} far off the curve and counted less: ${which}`);
  }
  const { a, low, high, raisedTo } = reported(chosen, h);
  const halfWidth = raisedTo === null && Number.isFinite(chosen.halfWidth) && chosen.halfWidth >= 0 ? chosen.halfWidth : (high - low) / 2;
  if (raisedTo !== null) notes.push(`mature height raised to the tallest measurement (${Math.round(raisedTo)} mm): the curve levelled off below it`);
  const maturityDays = chosen.m + chosen.s * LN19;
  let rSquared: number | null = null;
  if (chosen.method !== 'insufficient' && h.length >= 2) {
    const meanH = h.reduce((x, y) => x + y, 0) / h.length;
    const sst = h.reduce((x, y) => x + (y - meanH) ** 2, 0);
    if (sst > 0) rSquared = 1 - chosen.sse / sst;
  }
  return {
    method: chosen.method,
    matureHeightMm: a,
    interval80: { lowMm: Math.min(low, a), highMm: high },
    standardErrorMm: chosen.se !== null && Number.isFinite(chosen.se) ? chosen.se : null,
    midpointDays: chosen.m,
    scaleDays: chosen.s,
    maturityDays,
    maturityDate: addDays(lead.firstSeen, Math.round(maturityDays)),
    residualSdMm: chosen.residualSd !== null && Number.isFinite(chosen.residualSd) ? chosen.residualSd : null,
    n,
    degreesOfFreedom: chosen.df,
    rSquared,
    quality: qualityOf(chosen.method, a, halfWidth),
    ageDaysToday,
    expectedHeightTodayMm: logisticHeight(ageDaysToday, a, chosen.m, chosen.s),
    notes: [...candidateNotes(chosen), ...notes],
  };
}

/** Tallest height among the fitted points the robust refit kept at full weight; null without points. */
function tallestNotDownWeighted(h: readonly number[], downWeighted: readonly number[] | undefined): number | null {
  let best: number | null = null;
  for (let i = 0; i < h.length; i++) {
    if (downWeighted?.includes(i)) continue;
    if (best === null || h[i] > best) best = h[i];
  }
  return best;
}

/**
 * Fits of finished leads as of their last measurement, remembered per measurement list: the
 * same earlier lead is fitted for the plant's maturity dates and for its borrowed shapes.
 * Keyed on the list's identity and everything else the fit reads, so the value is a pure
 * function of the key.
 */
const asOfLastMemo = new WeakMap<
  readonly Measurement[],
  Array<{ genusDefaults: GenusDefaults; leadId: string; firstSeen: IsoDate; length: number; byLast: Array<LeadCurveFit | undefined> }>
>();

/**
 * `fitLeadCurve` of a lead with no borrowed shapes, on the date of its last valid measurement on
 * or before `today` (all of them without `today`); null when it has none. The fitted curve
 * (method, mature height, midpoint, scale, interval) is the one `fitLeadCurve` gives on any
 * later date, since it reads the same measurements; only the "today" fields differ.
 */
export function fitAsOfLastMeasurement(
  measurements: readonly Measurement[],
  lead: Pick<Lead, 'id' | 'firstSeen'>,
  genusDefaults: GenusDefaults,
  today?: IsoDate,
): LeadCurveFit | null {
  // The latest usable look on or before today (the sorted list's last one).
  const dated = datedMeasurements(measurements, lead.id);
  let lastIndex = countOnOrBefore(dated, today) - 1;
  while (lastIndex >= 0 && !usableHeight(dated.ms[lastIndex])) lastIndex--;
  if (lastIndex < 0) return null;
  let entries = asOfLastMemo.get(measurements);
  if (!entries) {
    entries = [];
    asOfLastMemo.set(measurements, entries);
  }
  let entry = null;
  for (const e of entries) {
    if (e.genusDefaults === genusDefaults && e.leadId === lead.id && e.firstSeen === lead.firstSeen && e.length === measurements.length) {
      entry = e;
      break;
    }
  }
  if (!entry) {
    entry = { genusDefaults, leadId: lead.id, firstSeen: lead.firstSeen, length: measurements.length, byLast: [] };
    entries.push(entry);
  }
  // Keyed by the position of that look: the fit reads the looks up to its date.
  let fit = entry.byLast[lastIndex];
  if (!fit) {
    fit = fitLeadCurve(measurements, lead, { genusDefaults, today: dated.ms[lastIndex].date });
    entry.byLast[lastIndex] = fit;
  }
  return fit;
}
