import { describe, expect, it } from 'vitest';
import { compareGroups, divisionFamilies, lineageRoot, mannWhitneyU, welchTTest, type ComparePlant } from '@/domain/compare';
import { buildLead, buildMeasurement, buildPlant } from './builders';

/*
 * R's sleep data (Student 1908), read from the Rdatasets copy vincentarelbundock/Rdatasets,
 * csv/datasets/sleep.csv. R's `t.test(extra ~ group, data = sleep)` prints
 * "t = -1.8608, df = 17.776, p-value = 0.07939" (Welch Two Sample t-test). The call is the example
 * of R's stats::t.test help page (https://stat.ethz.ch/R-manual/R-devel/library/stats/html/t.test.html);
 * the printed output was read from several stored R tutorials that run it, which agree.
 */
const SLEEP_1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0, 2];
const SLEEP_2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];

describe('welchTTest against R t.test on the sleep data', () => {
  it('gives t, df and p to the printed digits', () => {
    const r = welchTTest(SLEEP_1, SLEEP_2)!;
    expect(r.t).toBeCloseTo(-1.8608, 4);
    expect(r.df).toBeCloseTo(17.776, 3);
    expect(r.pValue).toBeCloseTo(0.07939, 5);
    expect(r.meanA).toBeCloseTo(0.75, 12);
    expect(r.meanB).toBeCloseTo(2.33, 12);
  });

  it.each([
    ['one value in a group', [1], [1, 2, 3]],
    ['no variance at all', [2, 2], [2, 2]],
    ['empty', [], []],
  ])('returns null with %s', (_n, a, b) => {
    expect(welchTTest(a, b)).toBeNull();
  });
});

/*
 * R's wilcox.test worked examples on https://endmemo.com/r/wilcoxon.php (read for this test):
 * x = c(1,5,9,24,56,21,3,7,21,4), y = c(12,15,5,9,9,14,56,22,3,7,32,5):
 *   "Wilcoxon rank sum test with continuity correction ... W = 51.5, p-value = 0.5966";
 * the same x against y = c(1233,4356,987,39999,1111,200000): "W = 0, p-value = 0.001364".
 */
describe('mannWhitneyU against R wilcox.test (normal approximation, ties)', () => {
  const x = [1, 5, 9, 24, 56, 21, 3, 7, 21, 4];
  it.each([
    [[12, 15, 5, 9, 9, 14, 56, 22, 3, 7, 32, 5], 51.5, 0.5966],
    [[1233, 4356, 987, 39999, 1111, 200000], 0, 0.001364],
  ])('y = %j gives W = %d, p = %d', (y, w, p) => {
    const r = mannWhitneyU(x, y)!;
    expect(r.u).toBe(w);
    expect(r.pValue).toBeCloseTo(p, p < 0.01 ? 6 : 4);
  });

  it.each([
    ['an empty group', [], [1, 2]],
    ['all values tied', [3, 3], [3, 3, 3]],
  ])('returns null with %s', (_n, a, b) => {
    expect(mannWhitneyU(a, b)).toBeNull();
  });
});

describe('division lineage', () => {
  const plants = [
    { id: 'root', parentPlantId: null },
    { id: 'a', parentPlantId: 'root' },
    { id: 'b', parentPlantId: 'a' },
    { id: 'other', parentPlantId: null },
    { id: 'loop1', parentPlantId: 'loop2' },
    { id: 'loop2', parentPlantId: 'loop1' },
  ];
  it('finds the root and the families, and survives a cycle', () => {
    expect(lineageRoot('b', plants)).toBe('root');
    expect(divisionFamilies(plants).get('root')).toEqual(['root', 'a', 'b']);
    expect(['loop1', 'loop2']).toContain(lineageRoot('loop1', plants));
  });
});

// Generated trial: plants in bark keep their size, plants in sphagnum grow 10% a season.
function trialPlant(id: string, growth: number, start = 100): ComparePlant {
  const leads = [2023, 2024, 2025].map((season, i) => {
    const lead = buildLead({ season, status: 'mature', id: `${id}-${season}`, plantId: id });
    return { lead, measurements: [buildMeasurement(lead, 150, start * (1 + growth) ** i)] };
  });
  return { plant: buildPlant({ id }), leads };
}

describe('compareGroups', () => {
  it('normalizes to each plant\'s first season and tests the groups', () => {
    const bark = [0, 1, 2, 3, 4, 5].map((i) => trialPlant(`bark${i}`, 0.0 + i * 0.005, 90 + i * 10));
    const moss = [0, 1, 2, 3, 4, 5].map((i) => trialPlant(`moss${i}`, 0.1 + i * 0.005, 120 - i * 5));
    const r = compareGroups({ groups: [{ name: 'bark', plants: bark }, { name: 'sphagnum', plants: moss }], today: '2026-03-01' });
    expect(r.groups[0].plants[0].seasons.map((s) => s.relative)).toEqual([1, 1, 1]);
    expect(r.groups[1].plants[0].seasons[2].relative).toBeCloseTo(1.21, 10);
    expect(r.groups[1].bySeason[0]).toMatchObject({ season: 2023, meanRelative: 1, plants: 6 });
    expect(r.difference!.welch!.difference).toBeLessThan(0);
    expect(r.difference!.welch!.pValue).toBeLessThan(0.001);
    expect(r.difference!.rank!.u).toBe(0);
    expect(r.warnings).toEqual([]);
  });

  it('warns in plain words when a group has fewer than five plants', () => {
    const r = compareGroups({
      groups: [
        { name: 'mount', plants: [trialPlant('m1', 0), trialPlant('m2', 0.02)] },
        { name: 'LECA', plants: [trialPlant('l1', 0.1), { plant: buildPlant({ id: 'l2' }), leads: [] }] },
      ],
      today: '2026-03-01',
    });
    expect(r.warnings).toHaveLength(2);
    expect(r.warnings[1]).toMatch(/^LECA has 1 plant with two or more seasons; with fewer than 5/);
    expect(r.difference!.welch).toBeNull();
  });
});
