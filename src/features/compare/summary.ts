import type { ComparisonResponse } from '@/shared/schemas/engine';

type Grouping = ComparisonResponse['by'];
type Group = ComparisonResponse['groups'][number];

/** p written for people: two decimals, and "< 0.001" rather than a string of zeros. */
export function formatP(p: number): string {
  return p < 0.001 ? 'p < 0.001' : `p = ${p.toFixed(2)}`;
}

/** The plain reading of a p-value; 0.05 is the conventional line, never a proof either way. */
function readingOf(p: number): string {
  return p < 0.05 ? 'a difference this size would seldom come from chance alone' : 'a difference this size could easily be chance';
}

function who(by: Grouping, name: string): string {
  if (by === 'family') return name;
  return by === 'medium' ? `plants in ${name}` : `plants at ${name}`;
}

function capitalize(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** Mean over a group's plants of their mean relative size after the first season. */
function groupMean(group: Group | undefined): number | null {
  const means = (group?.plants ?? []).map((p) => p.meanAfterFirst).filter((m): m is number => m !== null);
  return means.length ? means.reduce((a, b) => a + b, 0) / means.length : null;
}

/**
 * The group difference in one sentence: which group made larger leads relative to its own
 * first season, by how many percentage points of that first season, and the test with its p.
 */
export function differenceSentence(result: ComparisonResponse): string {
  const d = result.difference;
  if (!d) return 'There are not two groups with plants of two or more seasons, so no difference can be tested yet.';
  const [nameA, nameB] = d.between;
  const meanA = d.welch?.meanA ?? groupMean(result.groups.find((g) => g.name === nameA));
  const meanB = d.welch?.meanB ?? groupMean(result.groups.find((g) => g.name === nameB));
  const test = d.welch ? `Welch's t-test ${formatP(d.welch.pValue)}` : d.rank ? `Mann–Whitney rank test ${formatP(d.rank.pValue)}` : null;
  const p = d.welch?.pValue ?? d.rank?.pValue ?? null;
  const own = result.by === 'family' ? 'its' : 'their';
  let size: string;
  if (meanA === null || meanB === null) {
    size = `${capitalize(who(result.by, nameA))} and ${who(result.by, nameB)} cannot be set side by side yet`;
  } else {
    const points = Math.round(Math.abs(meanA - meanB) * 100);
    const [larger, smaller] = meanA >= meanB ? [nameA, nameB] : [nameB, nameA];
    size =
      points === 0
        ? `${capitalize(who(result.by, nameA))} and ${who(result.by, nameB)} made leads of about the same size, relative to ${own} first season`
        : `${capitalize(who(result.by, larger))} made leads ${points}% larger than ${result.by === 'family' ? smaller : result.by === 'medium' ? `in ${smaller}` : `at ${smaller}`}, relative to ${own} first season`;
  }
  if (!test || p === null) return `${size}; there are too few plants to run a test.`;
  const sizes = [nameA, nameB].map((n) => result.groups.find((g) => g.name === n)?.plantsCompared ?? 0);
  if (sizes.every((n) => n < 2)) return `${size}; with one plant a side no test can tell that from chance (${test}).`;
  return `${size}; ${test} — ${readingOf(p)}.`;
}

/** Which two groups the test compares, when there are more than two. */
export function testScope(result: ComparisonResponse): string | null {
  if (!result.difference || result.groups.length <= 2) return null;
  const [a, b] = result.difference.between;
  return result.by === 'family'
    ? `The test compares the first two plants of the family, ${a} and ${b}; the chart shows all ${result.groups.length}.`
    : `The test compares the two largest groups, ${a} and ${b}; the chart shows all ${result.groups.length}.`;
}

/** Half-width of the chart's scale around 1.0: the largest departure, at least ±10%, in steps of 5%. */
export function scaleHalfWidth(groups: Group[]): number {
  let largest = 0.1;
  for (const g of groups) for (const s of g.bySeason) largest = Math.max(largest, Math.abs(s.meanRelative - 1));
  return Math.ceil(largest * 20 - 1e-9) / 20;
}

/** "1.05× (5% larger)" — the normalized size with its plain reading. */
export function relativeText(value: number): string {
  const points = Math.round((value - 1) * 100);
  const reading = points === 0 ? 'same as first season' : points > 0 ? `${points}% larger` : `${-points}% smaller`;
  return `${value.toFixed(2)}× (${reading})`;
}
