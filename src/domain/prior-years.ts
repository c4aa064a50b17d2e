/**
 * This lead against the same plant's leads of earlier seasons, and the plant's trend of mature
 * lead size across seasons.
 */
import { linearRegression, linearRegressionLine, rSquared } from 'simple-statistics';
import { isIsoDate, toDayNumber } from './dates';
import { countOnOrBefore, datedMeasurements, usableHeight, type DatedMeasurements } from './dated-measurements';
import type { IsoDate, Lead, Measurement, Plant } from './types';

/** Within ±10% of last season's size counts as level — common practice (a grower's eye). */
export const LEVEL_BAND = 0.1;

export interface LinearFit {
  n: number;
  intercept: number;
  slope: number;
  /** Coefficient of determination; null when y does not vary. */
  rSquared: number | null;
  /** √(SSE / (n − 2)); null with n ≤ 2. */
  residualSd: number | null;
}

/**
 * Ordinary least-squares line y = intercept + slope·x through [x, y] pairs (simple-statistics
 * `linearRegression` and `rSquared`). Non-finite pairs are dropped. Returns null with fewer
 * than two points or when all x are equal.
 */
export function linearFit(points: ReadonlyArray<readonly [number, number]>): LinearFit | null {
  const data = points.filter(([x, y]) => Number.isFinite(x) && Number.isFinite(y)).map(([x, y]) => [x, y]);
  if (data.length < 2) return null;
  if (data.every(([x]) => x === data[0][0])) return null;
  const { m, b } = linearRegression(data);
  const line = linearRegressionLine({ m, b });
  let sse = 0;
  let meanY = 0;
  for (const [, y] of data) meanY += y / data.length;
  let sst = 0;
  for (const [x, y] of data) {
    sse += (y - line(x)) ** 2;
    sst += (y - meanY) ** 2;
  }
  return {
    n: data.length,
    intercept: b,
    slope: m,
    rSquared: sst > 0 ? rSquared(data, line) : null,
    residualSd: data.length > 2 ? Math.sqrt(sse / (data.length - 2)) : null,
  };
}

/** A lead with its own measurements. */
export interface LeadHistory {
  lead: Lead;
  measurements: readonly Measurement[];
}

interface AgedHeight {
  age: number;
  heightMm: number;
}

/**
 * Aged heights are asked for many times per lead (every later lead of the plant compares with
 * it), so they are remembered per measurements array, for the lead and first-seen date they were
 * worked out for, by how many of the lead's sorted measurements fall on or before `today` (all
 * of them, for an earlier season's lead, whatever the day). Inputs are treated as immutable: an
 * array that grows (a new measurement pushed) misses the memory; one edited in place would not.
 */
interface AgedEntry {
  leadId: string;
  firstSeen: IsoDate;
  length: number;
  /** byCount[n]: the aged heights among the first n sorted measurements. */
  byCount: Array<readonly AgedHeight[] | undefined>;
}
const agedMemo = new WeakMap<readonly Measurement[], AgedEntry>();

function agedHeights(h: LeadHistory, today?: IsoDate): readonly AgedHeight[] {
  let entry = agedMemo.get(h.measurements);
  if (!entry || entry.leadId !== h.lead.id || entry.firstSeen !== h.lead.firstSeen || entry.length !== h.measurements.length) {
    entry = { leadId: h.lead.id, firstSeen: h.lead.firstSeen, length: h.measurements.length, byCount: [] };
    agedMemo.set(h.measurements, entry);
  }
  const dated = datedMeasurements(h.measurements, h.lead.id);
  const end = countOnOrBefore(dated, today);
  let found = entry.byCount[end];
  if (!found) {
    found = computeAgedHeights(h, dated, end);
    entry.byCount[end] = found;
  }
  return found;
}

/** The lead's usable heights among its first `end` sorted measurements, with their ages; in date order, so by age. */
function computeAgedHeights(h: LeadHistory, dated: DatedMeasurements, end: number): AgedHeight[] {
  const out: AgedHeight[] = [];
  let firstSeenDay: number | null = null;
  for (let i = 0; i < end; i++) {
    const m = dated.ms[i];
    if (!usableHeight(m)) continue;
    firstSeenDay ??= toDayNumber(h.lead.firstSeen);
    out.push({ age: dated.days[i] - firstSeenDay, heightMm: m.heightMm });
  }
  return out;
}

/**
 * Height (mm) of a lead at `age` days by linear interpolation between its measurements.
 * Before the first measurement: interpolates from 0 mm at age 0 when the first measurement is
 * later; after the last: the last height if the lead is no longer growing, else null.
 */
export function heightAtAge(history: LeadHistory, age: number): number | null {
  const pts = agedHeights(history);
  if (pts.length === 0) return null;
  const first = pts[0];
  if (age <= first.age) {
    if (age < 0) return null;
    return first.age > 0 ? (first.heightMm * age) / first.age : first.heightMm;
  }
  for (let i = 1; i < pts.length; i++) {
    const a = pts[i - 1];
    const b = pts[i];
    if (age <= b.age) {
      if (b.age === a.age) return b.heightMm;
      return a.heightMm + ((b.heightMm - a.heightMm) * (age - a.age)) / (b.age - a.age);
    }
  }
  return history.lead.status === 'growing' ? null : pts[pts.length - 1].heightMm;
}

/**
 * First age (days since first seen, fractional) at which the lead reached `heightMm`, by linear
 * interpolation of its running maximum height; null if it never did.
 */
export function ageAtHeight(history: LeadHistory, heightMm: number): number | null {
  const pts = agedHeights(history);
  if (pts.length === 0 || !(heightMm > 0)) return null;
  // Running-maximum envelope, starting from 0 mm on the day the lead was first seen.
  let prevAge = 0;
  let prevH = 0;
  for (const p of pts) {
    if (p.heightMm <= prevH) continue;
    if (p.heightMm >= heightMm) {
      if (p.age <= prevAge) return p.age;
      return prevAge + ((heightMm - prevH) * (p.age - prevAge)) / (p.heightMm - prevH);
    }
    prevAge = Math.max(prevAge, p.age);
    prevH = p.heightMm;
  }
  return null;
}

/** Tallest measured height of a lead, mm; null without measurements. */
export function tallestHeight(history: LeadHistory, today?: IsoDate): number | null {
  const pts = agedHeights(history, today);
  if (pts.length === 0) return null;
  let best = -Infinity;
  for (let i = 0; i < pts.length; i++) best = Math.max(best, pts[i].heightMm);
  return best;
}

/**
 * True when the lead is expected to be smaller than last season's for a known reason (common
 * practice): it broke from a back bulb, or it is the plant's first lead after a division — the
 * plant's `dividedOn` falls in the lead's season (same calendar year) or no other lead of the
 * plant was first seen between the division and this lead.
 */
export function expectedSmaller(lead: Lead, plant: Pick<Plant, 'dividedOn'>, plantLeads: readonly Lead[]): string | null {
  if (lead.fromBackBulb) return 'this lead broke from a back bulb; such leads are normally smaller (common practice)';
  const d = plant.dividedOn;
  if (!d || !isIsoDate(d) || d > lead.firstSeen) return null;
  const inSeason = Number(d.slice(0, 4)) === lead.season;
  const firstAfter = !plantLeads.some((l) => l.id !== lead.id && l.firstSeen >= d && l.firstSeen < lead.firstSeen);
  if (inSeason || firstAfter) {
    return `first lead after the division on ${d}; it is normally smaller than before (common practice)`;
  }
  return null;
}

export type PriorYearVerdict = 'ahead' | 'level' | 'behind' | 'expected_smaller' | 'no_history';

export interface PriorLeadComparison {
  leadId: string;
  season: number;
  /** Height of that lead at the same age, mm (null when it was not measured that far). */
  heightAtSameAgeMm: number | null;
  /** This lead's height ÷ that lead's at the same age. */
  sizeRatio: number | null;
  /** Positive: this lead reached today's height that many days earlier than that lead did. */
  daysAhead: number | null;
  /** That lead's tallest height, mm. */
  finalHeightMm: number | null;
}

export interface PriorYearsComparison {
  /** Age of this lead at its latest measurement, days. */
  ageDays: number | null;
  heightMm: number | null;
  /** Against the largest lead of the latest earlier season. */
  lastSeason: PriorLeadComparison | null;
  /** Against every earlier lead of the plant, latest season first. */
  earlier: PriorLeadComparison[];
  verdict: PriorYearVerdict;
  /** This lead's height ÷ last season's lead's final height. */
  shareOfLastSeasonFinal: number | null;
  notes: string[];
}

/**
 * Compares a lead with the same plant's leads of earlier seasons at the same age (days since
 * each was first seen), using this lead's latest measurement on or before `today`.
 *
 * - size ratio: this height ÷ the earlier lead's interpolated height at the same age;
 * - days ahead: the earlier lead's (interpolated) age on reaching this height minus this lead's
 *   age; positive means ahead. Null when the earlier lead never got this tall (then this lead is
 *   already larger than it ended) or when this lead has no measurement.
 * - verdict against last season: ratio above 1 + LEVEL_BAND 'ahead', below 1 − LEVEL_BAND
 *   'behind' — unless the lead is expected to be smaller (back bulb, first after a division),
 *   then 'expected_smaller' with the reason in `notes`, never a decline.
 */
export function compareWithPriorYears(input: {
  current: LeadHistory;
  plant: Pick<Plant, 'dividedOn'>;
  /** All leads of the plant (any season), with measurements; the current one may be included. */
  plantLeads: readonly LeadHistory[];
  today: IsoDate;
}): PriorYearsComparison {
  const { current, plant, today } = input;
  const pts = agedHeights(current, today);
  const latest = pts.length ? pts[pts.length - 1] : null;
  const earlierLeads = input.plantLeads
    .filter((h) => h.lead.season < current.lead.season && h.lead.id !== current.lead.id)
    .sort((a, b) => b.lead.season - a.lead.season);
  const notes: string[] = [];
  const smallerReason = expectedSmaller(current.lead, plant, input.plantLeads.map((h) => h.lead));
  if (smallerReason) notes.push(smallerReason);

  const compare = (h: LeadHistory): PriorLeadComparison => {
    const finalHeightMm = tallestHeight(h);
    if (!latest) {
      return { leadId: h.lead.id, season: h.lead.season, heightAtSameAgeMm: null, sizeRatio: null, daysAhead: null, finalHeightMm };
    }
    const same = heightAtAge(h, latest.age);
    const reached = latest.heightMm > 0 ? ageAtHeight(h, latest.heightMm) : null;
    return {
      leadId: h.lead.id,
      season: h.lead.season,
      heightAtSameAgeMm: same,
      sizeRatio: same !== null && same > 0 ? latest.heightMm / same : null,
      daysAhead: reached !== null ? Math.round(reached - latest.age) : null,
      finalHeightMm,
    };
  };

  const earlier = earlierLeads.map(compare);
  let lastSeason: PriorLeadComparison | null = null;
  if (earlierLeads.length > 0) {
    const season = earlierLeads[0].lead.season;
    const candidates = earlier.filter((c) => c.season === season);
    lastSeason = candidates.reduce((best, c) => ((c.finalHeightMm ?? -1) > (best.finalHeightMm ?? -1) ? c : best));
  }

  let verdict: PriorYearVerdict = 'no_history';
  if (lastSeason && latest) {
    let ratio = lastSeason.sizeRatio;
    if (ratio === null && lastSeason.finalHeightMm !== null && lastSeason.finalHeightMm > 0 && latest.heightMm > lastSeason.finalHeightMm) {
      ratio = latest.heightMm / lastSeason.finalHeightMm;
      notes.push(`already taller than last season's lead at its tallest (${lastSeason.finalHeightMm} mm)`);
    }
    if (ratio === null) verdict = 'no_history';
    else if (ratio > 1 + LEVEL_BAND) verdict = 'ahead';
    else if (ratio < 1 - LEVEL_BAND) verdict = smallerReason ? 'expected_smaller' : 'behind';
    else verdict = 'level';
  }
  const lastFinal = lastSeason?.finalHeightMm ?? null;
  return {
    ageDays: latest?.age ?? null,
    heightMm: latest?.heightMm ?? null,
    lastSeason,
    earlier,
    verdict,
    shareOfLastSeasonFinal: latest && lastFinal && lastFinal > 0 ? latest.heightMm / lastFinal : null,
    notes,
  };
}

export interface SeasonSize {
  season: number;
  /** Largest finished lead of the season, mm. */
  matureHeightMm: number;
  leadId: string;
}

export interface MatureSizeTrend {
  seasons: SeasonSize[];
  /** Change of mature lead size per season, mm (null with fewer than two seasons). */
  slopeMmPerSeason: number | null;
  rSquared: number | null;
  residualSdMm: number | null;
  /** Seasons whose lead was expected to be smaller (division, back bulb); kept out of the fit. */
  excludedSeasons: number[];
}

/**
 * The plant's trend of mature lead size across seasons: for each season the tallest measured
 * height of its largest finished lead (status 'mature', or any status but 'growing' in a season
 * before `today`'s year, leads that dried off or rotted excluded), then a least-squares line of
 * size against season (slope in mm per season, r²). Seasons whose largest lead was expected to
 * be smaller (back bulb, first after a division) are listed but kept out of the line.
 */
export function matureSizeTrend(input: {
  plant: Pick<Plant, 'dividedOn'>;
  plantLeads: readonly LeadHistory[];
  today: IsoDate;
}): MatureSizeTrend {
  const year = Number(input.today.slice(0, 4));
  const leads = input.plantLeads.map((h) => h.lead);
  const bySeason = new Map<number, SeasonSize & { smaller: boolean }>();
  for (const h of input.plantLeads) {
    const s = h.lead.status;
    const finished = s === 'mature' || (h.lead.season < year && s !== 'growing' && s !== 'dried_off' && s !== 'rotted');
    if (!finished) continue;
    const height = tallestHeight(h, input.today);
    if (height === null) continue;
    const prev = bySeason.get(h.lead.season);
    if (!prev || height > prev.matureHeightMm) {
      bySeason.set(h.lead.season, {
        season: h.lead.season,
        matureHeightMm: height,
        leadId: h.lead.id,
        smaller: expectedSmaller(h.lead, input.plant, leads) !== null,
      });
    }
  }
  const all = [...bySeason.values()].sort((a, b) => a.season - b.season);
  const used = all.filter((s) => !s.smaller);
  const fit = linearFit(used.map((s) => [s.season, s.matureHeightMm] as const));
  return {
    seasons: all.map(({ season, matureHeightMm, leadId }) => ({ season, matureHeightMm, leadId })),
    slopeMmPerSeason: fit ? fit.slope : null,
    rSquared: fit ? fit.rSquared : null,
    residualSdMm: fit ? fit.residualSd : null,
    excludedSeasons: all.filter((s) => s.smaller).map((s) => s.season),
  };
}
