import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  ageAtHeight,
  compareWithPriorYears,
  expectedSmaller,
  heightAtAge,
  linearFit,
  matureSizeTrend,
  type LeadHistory,
} from '@/domain/prior-years';
import { buildLead, buildMeasurement, buildPlant, measureAlongCurve } from './builders';

/*
 * NIST StRD linear least squares, Norris (calibration of ozone monitors), 36 observations.
 * Data as read from the GNU Scientific Library's NIST-based test, BrianGladman/gsl, fit/test.c
 * (norris_x, norris_y), which copies https://www.itl.nist.gov/div898/strd/lls/data/LINKS/DATA/Norris.dat.
 * Certified values (REFERENCES.md and that NIST file): B0 = -0.262323073774029,
 * B1 = 1.00211681802045, residual SD 0.884796396144373, R² 0.999993745883712.
 */
const NORRIS_X = [
  0.2, 337.4, 118.2, 884.6, 10.1, 226.5, 666.3, 996.3, 448.6, 777.0, 558.2, 0.4, 0.6, 775.5, 666.9, 338.0, 447.5,
  11.6, 556.0, 228.1, 995.8, 887.6, 120.2, 0.3, 0.3, 556.8, 339.1, 887.2, 999.0, 779.0, 11.1, 118.3, 229.2, 669.1,
  448.9, 0.5,
];
const NORRIS_Y = [
  0.1, 338.8, 118.1, 888.0, 9.2, 228.1, 668.5, 998.5, 449.1, 778.9, 559.2, 0.3, 0.1, 778.1, 668.8, 339.3, 448.9,
  10.8, 557.7, 228.3, 998.0, 888.8, 119.6, 0.3, 0.6, 557.6, 339.3, 888.0, 998.5, 778.9, 10.2, 117.6, 228.9, 668.4,
  449.2, 0.2,
];

function expectSignificant(actual: number, expected: number, digits: number) {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(0.5 * 10 ** (1 - digits) * Math.abs(expected));
}

describe('linearFit against NIST StRD Norris', () => {
  it('reproduces the certified intercept, slope, R² and residual SD', () => {
    const fit = linearFit(NORRIS_X.map((x, i) => [x, NORRIS_Y[i]] as const));
    expect(fit).not.toBeNull();
    expect(fit!.n).toBe(36);
    expectSignificant(fit!.intercept, -0.262323073774029, 9);
    expectSignificant(fit!.slope, 1.00211681802045, 12);
    expectSignificant(fit!.residualSd!, 0.884796396144373, 10);
    expectSignificant(fit!.rSquared!, 0.999993745883712, 12);
  });

  it.each([
    ['no points', []],
    ['one point', [[1, 2]]],
    ['equal x', [[3, 1], [3, 5]]],
  ] as Array<[string, Array<[number, number]>]>)('returns null for %s', (_n, pts) => {
    expect(linearFit(pts)).toBeNull();
  });

  it('gives r² null for constant y and no residual SD with two points', () => {
    const fit = linearFit([[1, 5], [2, 5], [3, 5]]);
    expect(fit!.slope).toBe(0);
    expect(fit!.rSquared).toBeNull();
    expect(linearFit([[1, 1], [2, 3]])!.residualSd).toBeNull();
  });
});

// Invented leads below.
const plant = buildPlant();
const lead2025 = buildLead({ season: 2025, status: 'mature' });
const history2025: LeadHistory = { lead: lead2025, measurements: measureAlongCurve(lead2025, { a: 160, m: 70, s: 16 }, 175) };

describe('interpolation on a lead', () => {
  const h: LeadHistory = {
    lead: lead2025,
    measurements: [buildMeasurement(lead2025, 10, 20), buildMeasurement(lead2025, 30, 60), buildMeasurement(lead2025, 50, 60)],
  };
  it.each([
    [0, 0],
    [5, 10],
    [20, 40],
    [40, 60],
    [80, 60],
  ])('height at age %d is %d mm', (age, height) => {
    expect(heightAtAge(h, age)).toBeCloseTo(height, 10);
  });
  it.each([
    [10, 5],
    [20, 10],
    [40, 20],
    [60, 30],
    [61, null],
  ])('reached %d mm at age %s', (height, age) => {
    const got = ageAtHeight(h, height);
    if (age === null) expect(got).toBeNull();
    else expect(got).toBeCloseTo(age, 10);
  });
  it('handles an empty lead', () => {
    expect(heightAtAge({ lead: lead2025, measurements: [] }, 10)).toBeNull();
    expect(ageAtHeight({ lead: lead2025, measurements: [] }, 10)).toBeNull();
  });
});

describe('compareWithPriorYears', () => {
  it('finds a lead growing on last season\'s curve level, with zero days ahead', () => {
    const lead = buildLead({ season: 2026 });
    const current = { lead, measurements: measureAlongCurve(lead, { a: 160, m: 70, s: 16 }, 56) };
    const r = compareWithPriorYears({ current, plant, plantLeads: [history2025, current], today: '2026-04-30' });
    expect(r.verdict).toBe('level');
    expect(r.lastSeason!.sizeRatio).toBeCloseTo(1, 6);
    expect(r.lastSeason!.daysAhead).toBe(0);
  });

  it('finds a lead two weeks behind and smaller', () => {
    const lead = buildLead({ season: 2026 });
    // Same curve shifted 14 days later.
    const current = { lead, measurements: measureAlongCurve(lead, { a: 160, m: 84, s: 16 }, 70) };
    const r = compareWithPriorYears({ current, plant, plantLeads: [history2025, current], today: '2026-06-30' });
    expect(r.verdict).toBe('behind');
    expect(r.lastSeason!.daysAhead).toBeGreaterThanOrEqual(-15);
    expect(r.lastSeason!.daysAhead).toBeLessThanOrEqual(-13);
    expect(r.lastSeason!.sizeRatio!).toBeLessThan(0.9);
  });

  it('says a first lead after a division is expected smaller instead of flagging decline', () => {
    const lead = buildLead({ season: 2026 });
    const current = { lead, measurements: measureAlongCurve(lead, { a: 90, m: 70, s: 16 }, 84) };
    const divided = buildPlant({ dividedOn: '2025-11-20' });
    const r = compareWithPriorYears({ current, plant: divided, plantLeads: [history2025, current], today: '2026-06-30' });
    expect(r.verdict).toBe('expected_smaller');
    expect(r.notes.join(' ')).toMatch(/division/);
  });

  it('says the same for a lead from a back bulb', () => {
    const lead = buildLead({ season: 2026, fromBackBulb: true });
    const current = { lead, measurements: measureAlongCurve(lead, { a: 90, m: 70, s: 16 }, 84) };
    const r = compareWithPriorYears({ current, plant, plantLeads: [history2025, current], today: '2026-06-30' });
    expect(r.verdict).toBe('expected_smaller');
  });

  it.each([
    ['no earlier leads', [] as LeadHistory[], 'no_history'],
    ['an earlier lead with no measurements', [{ lead: lead2025, measurements: [] }], 'no_history'],
  ])('with %s has no verdict', (_n, earlier, verdict) => {
    const lead = buildLead({ season: 2026 });
    const current = { lead, measurements: measureAlongCurve(lead, { a: 160, m: 70, s: 16 }, 56) };
    const r = compareWithPriorYears({ current, plant, plantLeads: [...earlier, current], today: '2026-06-30' });
    expect(r.verdict).toBe(verdict);
  });

  it('handles a lead with no measurements', () => {
    const lead = buildLead({ season: 2026 });
    const r = compareWithPriorYears({ current: { lead, measurements: [] }, plant, plantLeads: [history2025], today: '2026-06-30' });
    expect(r.verdict).toBe('no_history');
    expect(r.heightMm).toBeNull();
  });
});

describe('expectedSmaller', () => {
  const lead = buildLead({ season: 2026 });
  it.each([
    ['no division', null, null],
    ['division in the same season', '2026-01-10', 'division'],
    ['division before, first lead after', '2025-11-20', 'division'],
    ['division after the lead started', '2026-05-01', null],
  ])('%s', (_n, dividedOn, match) => {
    const reason = expectedSmaller(lead, { dividedOn }, [buildLead({ season: 2024 }), lead]);
    if (match === null) expect(reason).toBeNull();
    else expect(reason).toMatch(match);
  });
  it('not for a later lead after the division', () => {
    const earlierAfter = buildLead({ season: 2025, id: 'x', firstSeen: '2025-03-01' });
    expect(expectedSmaller(lead, { dividedOn: '2024-12-01' }, [earlierAfter, lead])).toBeNull();
  });
});

describe('matureSizeTrend', () => {
  const sizes: Array<[number, number]> = [
    [2021, 120],
    [2022, 130],
    [2023, 135],
    [2024, 150],
    [2025, 155],
  ];
  const histories = sizes.map(([season, a]) => {
    const lead = buildLead({ season, status: 'mature' });
    return { lead, measurements: [buildMeasurement(lead, 60, a * 0.6), buildMeasurement(lead, 150, a)] };
  });

  it('fits the slope in mm per season with simple-statistics', () => {
    const t = matureSizeTrend({ plant, plantLeads: histories, today: '2026-05-01' });
    expect(t.seasons.map((s) => s.matureHeightMm)).toEqual([120, 130, 135, 150, 155]);
    // Hand computation: x̄ = 2023, ȳ = 138; Σ(x−x̄)(y−ȳ) = 90, Σ(x−x̄)² = 10 → slope 9.
    expect(t.slopeMmPerSeason).toBeCloseTo(9, 10);
    expect(t.rSquared!).toBeGreaterThan(0.95);
  });

  it('keeps the season after a division out of the line', () => {
    const lead = buildLead({ season: 2026, status: 'mature', firstSeen: '2026-03-01' });
    const small = { lead, measurements: [buildMeasurement(lead, 150, 80)] };
    const t = matureSizeTrend({ plant: buildPlant({ dividedOn: '2026-01-15' }), plantLeads: [...histories, small], today: '2026-11-01' });
    expect(t.excludedSeasons).toEqual([2026]);
    expect(t.slopeMmPerSeason).toBeCloseTo(9, 10);
  });

  it.each([
    ['no leads', []],
    ['one season', histories.slice(0, 1)],
  ])('has no slope with %s', (_n, hs) => {
    const t = matureSizeTrend({ plant, plantLeads: hs, today: '2026-05-01' });
    expect(t.slopeMmPerSeason).toBeNull();
  });

  it('ignores leads that dried off or rotted', () => {
    const lead = buildLead({ season: 2020, status: 'dried_off' });
    const t = matureSizeTrend({ plant, plantLeads: [{ lead, measurements: [buildMeasurement(lead, 40, 30)] }, ...histories], today: '2026-05-01' });
    expect(t.seasons[0].season).toBe(2021);
  });
});

describe('days ahead (fast-check)', () => {
  it('a lead on last season\'s curve shifted by d days is about d days behind', () => {
    fc.assert(
      fc.property(fc.integer({ min: -20, max: 20 }), fc.integer({ min: 40, max: 100 }), (shift, age) => {
        const lead = buildLead({ season: 2026 });
        const current = { lead, measurements: [0, 7, 14, 21, 28, 35, 42, 49, 56, 63, 70, 77, 84, 91, 98].filter((a) => a <= age).concat([age]).map((a) => buildMeasurement(lead, a, 160 / (1 + Math.exp((70 + shift - a) / 16)))) };
        const r = compareWithPriorYears({ current, plant, plantLeads: [history2025, current], today: '2026-12-31' });
        // Linear interpolation between weekly points of the earlier lead: within two days.
        expect(Math.abs(r.lastSeason!.daysAhead! + shift)).toBeLessThanOrEqual(2);
      }),
      { numRuns: 200 },
    );
  });
});
