import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { addDays } from '@/domain/dates';
import { CATTLEYA_DEFAULTS, DENDROBIUM_DEFAULTS } from '@/domain/genus-defaults';
import {
  dayAtHeight,
  fitLeadCurve,
  logisticHeight,
  MEASUREMENT_SD_PRIOR_MM,
  type LeadCurveFit,
  type LeadShape,
} from '@/domain/growth-curve';
import type { Measurement } from '@/domain/types';

// All leads and curves below are invented scenarios.
const FIRST_SEEN = '2026-03-01';
const LEAD = { id: 'lead-1', firstSeen: FIRST_SEEN };

function measure(ages: number[], heights: number[]): Measurement[] {
  return ages.map((age, i) => ({
    id: `m${i}`,
    leadId: LEAD.id,
    date: addDays(FIRST_SEEN, age),
    heightMm: heights[i],
    leafCount: null,
    sheath: 'none',
    rootTips: null,
    bulbWidthMm: null,
  }));
}

function curve(ages: number[], a: number, m: number, s: number, noise: number[] = []): number[] {
  return ages.map((t, i) => Math.max(0, logisticHeight(t, a, m, s) + (noise[i] ?? 0)));
}

function expectSane(fit: LeadCurveFit) {
  for (const [key, value] of Object.entries(fit)) {
    if (typeof value === 'number') expect(Number.isNaN(value), key).toBe(false);
  }
  expect(fit.matureHeightMm).toBeGreaterThanOrEqual(0);
  expect(fit.expectedHeightTodayMm).toBeGreaterThanOrEqual(0);
  expect(fit.interval80.lowMm).toBeGreaterThanOrEqual(0);
  expect(fit.interval80.lowMm).toBeLessThanOrEqual(fit.matureHeightMm);
  expect(fit.interval80.highMm).toBeGreaterThanOrEqual(fit.matureHeightMm);
  expect(Number.isFinite(fit.interval80.highMm)).toBe(true);
  expect(fit.maturityDate).toMatch(/^\d{4}-\d{2}-\d{2}$/);
}

const width = (f: LeadCurveFit) => f.interval80.highMm - f.interval80.lowMm;
const ages12 = [0, 14, 28, 42, 56, 70, 84, 98, 112, 126, 140, 154];

describe('fitLeadCurve edge cases', () => {
  it.each([
    ['empty', [], [], 'insufficient'],
    ['single early point', [30], [40], 'insufficient'],
    ['single late point', [110], [160], 'scale-only-genus-shape'],
    ['two points', [95, 110], [140, 160], 'scale-only-genus-shape'],
    ['three early points', [30, 45, 60], [40, 70, 95], 'insufficient'],
    ['constant', ages12, ages12.map(() => 120), 'scale-only-genus-shape'],
    ['all zero', [10, 20, 30, 40], [0, 0, 0, 0], 'scale-only-genus-shape'],
    ['outlier', ages12, curve(ages12, 150, 70, 16).map((h, i) => (i === 6 ? h + 90 : h)), 'free'],
    ['clean logistic', ages12, curve(ages12, 150, 70, 16, [1, -1, 1, -1, 1, -1, 1, -1, 1, -1, 1, -1]), 'free'],
  ])('%s series gives a sane fit', (_name, ages, heights, method) => {
    const fit = fitLeadCurve(measure(ages, heights), LEAD, {
      genusDefaults: CATTLEYA_DEFAULTS,
      today: addDays(FIRST_SEEN, 200),
    });
    expectSane(fit);
    expect(fit.method).toBe(method);
    expect(fit.n).toBe(ages.length);
  });

  it('early in growth shows the typical mature size rather than extrapolating one measurement', () => {
    const fit = fitLeadCurve(measure([30], [40]), LEAD, { genusDefaults: CATTLEYA_DEFAULTS, today: addDays(FIRST_SEEN, 30) });
    expect(fit.method).toBe('insufficient');
    expect(fit.matureHeightMm).toBe(CATTLEYA_DEFAULTS.matureHeightMm);
    // ...but not when the lead is already taller than that interval allows.
    const tall = fitLeadCurve(measure([30, 40], [230, 260]), LEAD, {
      genusDefaults: CATTLEYA_DEFAULTS,
      today: addDays(FIRST_SEEN, 40),
    });
    expect(tall.method).toBe('scale-only-genus-shape');
    expect(tall.interval80.highMm).toBeGreaterThan(260);
  });

  it('with no measurements shows the typical size of earlier leads, else of the genus', () => {
    const genus = fitLeadCurve([], LEAD, { genusDefaults: CATTLEYA_DEFAULTS, today: FIRST_SEEN });
    expect(genus.matureHeightMm).toBe(CATTLEYA_DEFAULTS.matureHeightMm);
    expect(genus.quality).toBe('none');
    const plant = fitLeadCurve([], LEAD, {
      genusDefaults: CATTLEYA_DEFAULTS,
      today: FIRST_SEEN,
      priorShapes: [
        { midpointDays: 60, scaleDays: 15, matureHeightMm: 100 },
        { midpointDays: 64, scaleDays: 15, matureHeightMm: 120 },
      ],
    });
    expect(plant.matureHeightMm).toBe(110);
  });

  it('ignores measurements after today, of other leads, and with invalid heights', () => {
    const ms = measure([10, 20, 300], [20, 40, 150]);
    ms.push({ ...ms[0], id: 'x', leadId: 'other', heightMm: 999 });
    ms.push({ ...ms[0], id: 'y', heightMm: Number.NaN });
    ms.push({ ...ms[0], id: 'z', heightMm: -5 });
    const fit = fitLeadCurve(ms, LEAD, { genusDefaults: CATTLEYA_DEFAULTS, today: addDays(FIRST_SEEN, 30) });
    expect(fit.n).toBe(2);
    expectSane(fit);
  });

  it('an outlier widens the interval of an otherwise clean series', () => {
    const clean = curve(ages12, 150, 70, 16, [1, -1, 1, -1, 1, -1, 1, -1, 1, -1, 1, -1]);
    const withOutlier = clean.map((h, i) => (i === 6 ? h + 90 : h));
    const today = addDays(FIRST_SEEN, 200);
    const a = fitLeadCurve(measure(ages12, clean), LEAD, { genusDefaults: CATTLEYA_DEFAULTS, today });
    const b = fitLeadCurve(measure(ages12, withOutlier), LEAD, { genusDefaults: CATTLEYA_DEFAULTS, today });
    expect(width(b)).toBeGreaterThan(width(a));
  });
});

describe('fitLeadCurve on generated leads', () => {
  it('recovers a known curve from a full season of measurements', () => {
    const noise = [0.8, -1.1, 0.4, -0.3, 1.2, -0.9, 0.2, -0.6, 1, -0.4, 0.5, -0.7];
    const fit = fitLeadCurve(measure(ages12, curve(ages12, 180, 75, 18, noise)), LEAD, {
      genusDefaults: CATTLEYA_DEFAULTS,
      today: addDays(FIRST_SEEN, 160),
    });
    expect(fit.method).toBe('free');
    expect(fit.matureHeightMm).toBeGreaterThan(175);
    expect(fit.matureHeightMm).toBeLessThan(185);
    expect(fit.interval80.lowMm).toBeLessThan(180);
    expect(fit.interval80.highMm).toBeGreaterThan(180);
    expect(fit.midpointDays).toBeCloseTo(75, 0);
    expect(fit.scaleDays).toBeCloseTo(18, 0);
    // 95% of A at m + s·ln 19.
    expect(fit.maturityDays).toBeCloseTo(fit.midpointDays + fit.scaleDays * Math.log(19), 10);
    expect(logisticHeight(fit.maturityDays, fit.matureHeightMm, fit.midpointDays, fit.scaleDays)).toBeCloseTo(
      0.95 * fit.matureHeightMm,
      8,
    );
    expect(fit.quality).toBe('good');
    expect(fit.rSquared).toBeGreaterThan(0.99);
  });

  it('borrows the shape of earlier leads when there are few measurements, and the interval is wider than with the whole season', () => {
    const prior: LeadShape[] = [
      { midpointDays: 74, scaleDays: 17 },
      { midpointDays: 76, scaleDays: 19 },
      { midpointDays: 75, scaleDays: 18 },
    ];
    const few = [60, 80, 100];
    const early = fitLeadCurve(measure(few, curve(few, 180, 75, 18)), LEAD, {
      genusDefaults: CATTLEYA_DEFAULTS,
      priorShapes: prior,
      today: addDays(FIRST_SEEN, 100),
    });
    expect(early.method).toBe('scale-only-plant-shape');
    expect(early.midpointDays).toBe(75);
    expect(early.matureHeightMm).toBeCloseTo(180, 0);
    const late = fitLeadCurve(measure(ages12, curve(ages12, 180, 75, 18, [1, -1, 1, -1, 1, -1, 1, -1, 1, -1, 1, -1])), LEAD, {
      genusDefaults: CATTLEYA_DEFAULTS,
      priorShapes: prior,
      today: addDays(FIRST_SEEN, 160),
    });
    expect(width(early)).toBeGreaterThan(width(late));
    // Genus shape is less certain than the plant's own shape for the same measurements.
    const genusShape = fitLeadCurve(measure(few, curve(few, 180, 75, 18)), LEAD, {
      genusDefaults: CATTLEYA_DEFAULTS,
      today: addDays(FIRST_SEEN, 100),
    });
    expect(genusShape.method).toBe('scale-only-genus-shape');
    expect(width(genusShape)).toBeGreaterThan(width(early));
  });

  it('dayAtHeight inverts the curve', () => {
    const d = dayAtHeight(logisticHeight(61, 200, 80, 20), 200, 80, 20);
    expect(d).toBeCloseTo(61, 9);
    expect(dayAtHeight(200, 200, 80, 20)).toBeNull();
    expect(dayAtHeight(0, 200, 80, 20)).toBeNull();
  });
});

const plausibleLead = fc.record({
  a: fc.double({ min: 40, max: 400, noNaN: true }),
  m: fc.double({ min: 40, max: 120, noNaN: true }),
  s: fc.double({ min: 8, max: 30, noNaN: true }),
  start: fc.integer({ min: 0, max: 20 }),
  gaps: fc.array(fc.integer({ min: 5, max: 25 }), { minLength: 1, maxLength: 14 }),
  noise: fc.array(fc.double({ min: -0.06, max: 0.06, noNaN: true }), { minLength: 15, maxLength: 15 }),
  genus: fc.constantFrom(CATTLEYA_DEFAULTS, DENDROBIUM_DEFAULTS),
  withPrior: fc.boolean(),
});

interface GeneratedLead {
  a: number;
  m: number;
  s: number;
  start: number;
  gaps: number[];
  noise: number[];
}

function generated(p: GeneratedLead) {
  const ages: number[] = [p.start];
  for (const g of p.gaps.slice(1)) ages.push(ages[ages.length - 1] + g);
  const heights = ages.map((t, i) => Math.max(0, logisticHeight(t, p.a, p.m, p.s) * (1 + p.noise[i]) + 0.5));
  return { ages, heights };
}

describe('fitLeadCurve properties (fast-check)', () => {
  it('random plausible leads never give NaN, negative heights or an interval excluding the estimate', () => {
    fc.assert(
      fc.property(plausibleLead, (p) => {
        const { ages, heights } = generated(p);
        const fit = fitLeadCurve(measure(ages, heights), LEAD, {
          genusDefaults: p.genus,
          priorShapes: p.withPrior ? [{ midpointDays: p.m * 1.1, scaleDays: p.s * 0.9 }] : undefined,
          today: addDays(FIRST_SEEN, ages[ages.length - 1] + 3),
        });
        expectSane(fit);
      }),
      { numRuns: Number(process.env.DOMAIN_PROPERTY_RUNS ?? 300) },
    );
  }, 120_000);

  it('the mature height is never below the tallest measurement less the fit\'s own scatter', () => {
    fc.assert(
      fc.property(plausibleLead, (p) => {
        const { ages, heights } = generated(p);
        const fit = fitLeadCurve(measure(ages, heights), LEAD, {
          genusDefaults: p.genus,
          priorShapes: p.withPrior ? [{ midpointDays: p.m * 1.1, scaleDays: p.s * 0.9, matureHeightMm: p.a * 0.5 }] : undefined,
          today: addDays(FIRST_SEEN, ages[ages.length - 1] + 3),
        });
        const spread = fit.residualSdMm ?? MEASUREMENT_SD_PRIOR_MM;
        expect(fit.matureHeightMm).toBeGreaterThanOrEqual(Math.max(...heights) - spread - 1e-9);
        expectSane(fit);
      }),
      { numRuns: Number(process.env.DOMAIN_PROPERTY_RUNS ?? 300) },
    );
  }, 120_000);

  it('adding a measurement that lies on the fitted curve never widens the interval', () => {
    fc.assert(
      fc.property(plausibleLead, fc.double({ min: 0, max: 1, noNaN: true }), (p, where) => {
        const { ages, heights } = generated(p);
        const options = {
          genusDefaults: p.genus,
          priorShapes: p.withPrior ? [{ midpointDays: p.m * 1.1, scaleDays: p.s * 0.9 }] : undefined,
        };
        const tMax = ages[ages.length - 1];
        const newAge = Math.round(where * (tMax + 60));
        const today = addDays(FIRST_SEEN, Math.max(tMax, newAge) + 1);
        const before = fitLeadCurve(measure(ages, heights), LEAD, { ...options, today });
        // A curve raised to the tallest measurement is no longer the least-squares one; the
        // guarantee is about fitted curves.
        fc.pre(!before.notes.some((n) => n.startsWith('mature height raised')));
        const onCurve = logisticHeight(newAge, before.matureHeightMm, before.midpointDays, before.scaleDays);
        const after = fitLeadCurve(measure([...ages, newAge], [...heights, onCurve]), LEAD, { ...options, today });
        expect(width(after)).toBeLessThanOrEqual(width(before) * (1 + 1e-6) + 1e-6);
      }),
      { numRuns: Number(process.env.DOMAIN_PROPERTY_RUNS ?? 300) },
    );
  }, 120_000);
});
