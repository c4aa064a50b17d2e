/**
 * Compare: plants of a division family, or grouped by medium or area, on mature lead size per
 * season normalized to each plant's own first season, with Welch's t-test and a rank test
 * (Mann–Whitney U, normal approximation) on the per-plant values.
 */
import { mean, sampleVariance } from 'simple-statistics';
import { normalCdf, studentTTwoSidedP } from './distributions';
import { matureSizeTrend, type LeadHistory } from './prior-years';
import type { IsoDate, Plant } from './types';

/** Fewer plants than this in a group draws a plain warning — common practice for small trials. */
export const MIN_GROUP_PLANTS = 5;

export interface WelchTTest {
  meanA: number;
  meanB: number;
  /** meanA − meanB. */
  difference: number;
  t: number;
  /** Welch–Satterthwaite degrees of freedom. */
  df: number;
  /** Two-sided p-value. */
  pValue: number;
}

/**
 * Welch's unequal-variance t-test of a against b (two-sided), df by Welch–Satterthwaite,
 * p-value from the Student-t CDF in `distributions.ts`. Null when a group has fewer than two
 * finite values or both groups have zero variance.
 */
export function welchTTest(a: readonly number[], b: readonly number[]): WelchTTest | null {
  const xa = a.filter(Number.isFinite);
  const xb = b.filter(Number.isFinite);
  if (xa.length < 2 || xb.length < 2) return null;
  const ma = mean(xa);
  const mb = mean(xb);
  const va = sampleVariance(xa) / xa.length;
  const vb = sampleVariance(xb) / xb.length;
  const se2 = va + vb;
  if (!(se2 > 0)) return null;
  const t = (ma - mb) / Math.sqrt(se2);
  const df = (se2 * se2) / ((va * va) / (xa.length - 1) + (vb * vb) / (xb.length - 1));
  return { meanA: ma, meanB: mb, difference: ma - mb, t, df, pValue: studentTTwoSidedP(t, df) };
}

export interface RankTest {
  /** Mann–Whitney U of a (the number of pairs with a above b, ties counting one half); R's W. */
  u: number;
  z: number;
  /** Two-sided p-value, normal approximation with tie correction and continuity correction. */
  pValue: number;
}

/**
 * Mann–Whitney U (Wilcoxon rank-sum) test of a against b, two-sided, by the normal approximation
 * with average ranks for ties, the tie-corrected variance and a continuity correction of ½ (as R's
 * wilcox.test with exact = FALSE, correct = TRUE). Null when a group is empty or all values tie.
 */
export function mannWhitneyU(a: readonly number[], b: readonly number[], continuity = true): RankTest | null {
  const xa = a.filter(Number.isFinite);
  const xb = b.filter(Number.isFinite);
  const n1 = xa.length;
  const n2 = xb.length;
  if (n1 === 0 || n2 === 0) return null;
  const all = [...xa.map((v) => ({ v, g: 0 })), ...xb.map((v) => ({ v, g: 1 }))].sort((p, q) => p.v - q.v);
  const n = all.length;
  let rankSumA = 0;
  let tieTerm = 0;
  for (let i = 0; i < n; ) {
    let j = i;
    while (j + 1 < n && all[j + 1].v === all[i].v) j++;
    const avg = (i + j + 2) / 2;
    const t = j - i + 1;
    tieTerm += t * t * t - t;
    for (let k = i; k <= j; k++) if (all[k].g === 0) rankSumA += avg;
    i = j + 1;
  }
  const u = rankSumA - (n1 * (n1 + 1)) / 2;
  const mu = (n1 * n2) / 2;
  const variance = ((n1 * n2) / 12) * (n + 1 - tieTerm / (n * (n - 1)));
  if (!(variance > 0)) return null;
  const diff = u - mu;
  const correction = continuity ? 0.5 * Math.sign(diff) : 0;
  const z = (diff - correction) / Math.sqrt(variance);
  const pValue = Math.min(1, 2 * Math.min(normalCdf(z), 1 - normalCdf(z)));
  return { u, z, pValue };
}

/** The plant at the root of a plant's division lineage (follows parentPlantId; cycles stop). */
export function lineageRoot(plantId: string, plants: readonly Pick<Plant, 'id' | 'parentPlantId'>[]): string {
  const byId = new Map(plants.map((p) => [p.id, p]));
  const seen = new Set<string>();
  let id = plantId;
  while (!seen.has(id)) {
    seen.add(id);
    const parent = byId.get(id)?.parentPlantId;
    if (!parent || !byId.has(parent)) break;
    id = parent;
  }
  return id;
}

/** Division families: lineage root id → ids of every plant descending from it (root included). */
export function divisionFamilies(plants: readonly Pick<Plant, 'id' | 'parentPlantId'>[]): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const p of plants) {
    const root = lineageRoot(p.id, plants);
    out.set(root, [...(out.get(root) ?? []), p.id]);
  }
  return out;
}

export interface ComparePlant {
  plant: Pick<Plant, 'id' | 'dividedOn'>;
  leads: readonly LeadHistory[];
}

export interface PlantNormalizedSizes {
  plantId: string;
  firstSeason: number | null;
  /** Mature size each season ÷ the plant's first-season size. */
  seasons: Array<{ season: number; matureHeightMm: number; relative: number }>;
  /** Mean relative size over the seasons after the first; null with one season or none. */
  meanAfterFirst: number | null;
}

export interface GroupSummary {
  name: string;
  plants: PlantNormalizedSizes[];
  /** Plants with at least two seasons (the ones that enter the tests). */
  plantsCompared: number;
  bySeason: Array<{ season: number; meanRelative: number; plants: number }>;
}

export interface GroupComparison {
  groups: GroupSummary[];
  /** Between the first two groups, on each plant's mean relative size after its first season. */
  difference: { welch: WelchTTest | null; rank: RankTest | null } | null;
  warnings: string[];
}

/**
 * Normalized mature lead size per plant (see `matureSizeTrend`: largest finished lead per season;
 * seasons expected smaller — back bulb, first after a division — are left out), relative to the
 * plant's own first season; group means per season; and, for the first two groups, Welch's t-test
 * and the Mann–Whitney test on the per-plant mean relative size after the first season. Each
 * group with fewer than MIN_GROUP_PLANTS compared plants gets a plain warning.
 */
export function compareGroups(input: {
  groups: ReadonlyArray<{ name: string; plants: readonly ComparePlant[] }>;
  today: IsoDate;
}): GroupComparison {
  const warnings: string[] = [];
  const groups: GroupSummary[] = input.groups.map((g) => {
    const plants = g.plants.map((p): PlantNormalizedSizes => {
      const trend = matureSizeTrend({ plant: p.plant, plantLeads: p.leads, today: input.today });
      const used = trend.seasons.filter((s) => !trend.excludedSeasons.includes(s.season));
      const first = used[0];
      const seasons = first
        ? used.map((s) => ({ season: s.season, matureHeightMm: s.matureHeightMm, relative: s.matureHeightMm / first.matureHeightMm }))
        : [];
      const after = seasons.slice(1).map((s) => s.relative);
      return {
        plantId: p.plant.id,
        firstSeason: first?.season ?? null,
        seasons,
        meanAfterFirst: after.length ? mean(after) : null,
      };
    });
    const seasonMap = new Map<number, number[]>();
    for (const p of plants) for (const s of p.seasons) seasonMap.set(s.season, [...(seasonMap.get(s.season) ?? []), s.relative]);
    const bySeason = [...seasonMap.entries()]
      .sort((a, b) => a[0] - b[0])
      .map(([season, rel]) => ({ season, meanRelative: mean(rel), plants: rel.length }));
    const plantsCompared = plants.filter((p) => p.meanAfterFirst !== null).length;
    if (plantsCompared < MIN_GROUP_PLANTS) {
      warnings.push(
        `${g.name} has ${plantsCompared} plant${plantsCompared === 1 ? '' : 's'} with two or more seasons; with fewer than ${MIN_GROUP_PLANTS} a difference between groups can easily be chance.`,
      );
    }
    return { name: g.name, plants, plantsCompared, bySeason };
  });
  let difference: GroupComparison['difference'] = null;
  if (groups.length >= 2) {
    const values = (g: GroupSummary) => g.plants.map((p) => p.meanAfterFirst).filter((v): v is number => v !== null);
    difference = { welch: welchTTest(values(groups[0]), values(groups[1])), rank: mannWhitneyU(values(groups[0]), values(groups[1])) };
  }
  return { groups, difference, warnings };
}
