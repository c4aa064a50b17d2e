import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { dailyDegreeDays, dateReachingDegreeDays, recentDailyDegreeDays, sumDegreeDays } from '@/domain/degree-days';

describe('daily growing degree-days (averaging method)', () => {
  // Worked examples from REFERENCES.md (verified there):
  // Iowa State University, Agronomy 541: high 70 °F, low 50 °F, base 50 °F → 10 GDD.
  // Oregon State University IPPC weather FAQ: max 100 °F, min 40 °F, base 50 °F → 20 by the plain
  // average, 18 with the 86 °F cap and 50 °F floor.
  it.each([
    ['Iowa State, plain', 50, 70, 50, undefined, 'plain', 10],
    ['Iowa State, clamped', 50, 70, 50, 86, 'clamped', 10],
    ['Oregon State, plain', 40, 100, 50, undefined, 'plain', 20],
    ['Oregon State, 86 °F cap and 50 °F floor', 40, 100, 50, 86, 'clamped', 18],
  ] as const)('%s', (_name, min, max, base, upper, method, expected) => {
    expect(dailyDegreeDays(min, max, { baseTemp: base, upperTemp: upper, method })).toBeCloseTo(expected, 12);
  });

  it.each([
    ['a day wholly below base', 2, 3, 0],
    ['swapped min and max', 20, 10, 11.5],
    ['non-finite input', Number.NaN, 20, 0],
  ])('handles %s', (_name, min, max, expected) => {
    expect(dailyDegreeDays(min, max, { baseTemp: 3.5 })).toBeCloseTo(expected, 12);
  });

  it('the two variants differ on a cold night', () => {
    // Plain: mean 8 − base 10 < 0 → 0; clamped: min raised to 10 → (16 + 10)/2 − 10 = 3.
    expect(dailyDegreeDays(0, 16, { baseTemp: 10, method: 'plain' })).toBe(0);
    expect(dailyDegreeDays(0, 16, { baseTemp: 10, method: 'clamped' })).toBe(3);
  });
});

describe('sums and projection (generated readings)', () => {
  const readings = Array.from({ length: 10 }, (_, i) => ({
    date: `2026-06-${String(i + 1).padStart(2, '0')}`,
    minC: 13.5,
    maxC: 23.5,
  })); // 15 degree-days a day above 3.5 °C

  it('sums over a date range and counts missing days', () => {
    const s = sumDegreeDays(readings, '2026-06-01', '2026-06-15', { baseTemp: 3.5 });
    expect(s.degreeDays).toBeCloseTo(150, 10);
    expect(s.daysWithReadings).toBe(10);
    expect(s.missingDays).toBe(4);
    expect(sumDegreeDays([], '2026-06-01', '2026-06-01', { baseTemp: 3.5 }).degreeDays).toBe(0);
  });

  it('projects past the readings with the recent normal', () => {
    expect(recentDailyDegreeDays(readings, '2026-06-11', { baseTemp: 3.5 })).toBeCloseTo(15, 10);
    // 150 from 10 days of readings, then 15 a day: 300 reached on day 20.
    expect(dateReachingDegreeDays(readings, '2026-06-01', 300, '2026-06-11', { baseTemp: 3.5 })).toBe('2026-06-20');
    expect(dateReachingDegreeDays(readings, '2026-06-01', 45, '2026-06-11', { baseTemp: 3.5 })).toBe('2026-06-03');
    expect(dateReachingDegreeDays([], '2026-06-01', 45, '2026-06-11', { baseTemp: 3.5 })).toBeNull();
  });
});

describe('degree-day properties (fast-check)', () => {
  it('are never negative, and the floor never lowers the uncapped value', () => {
    fc.assert(
      fc.property(fc.double({ min: -20, max: 45, noNaN: true }), fc.double({ min: -20, max: 45, noNaN: true }), fc.double({ min: 0, max: 15, noNaN: true }), (a, b, base) => {
        const plain = dailyDegreeDays(a, b, { baseTemp: base, method: 'plain' });
        const clamped = dailyDegreeDays(a, b, { baseTemp: base, method: 'clamped' });
        expect(plain).toBeGreaterThanOrEqual(0);
        expect(clamped).toBeGreaterThanOrEqual(plain - 1e-12);
        expect(dailyDegreeDays(a, b, { baseTemp: base, upperTemp: 30, method: 'clamped' })).toBeLessThanOrEqual(clamped + 1e-12);
      }),
    );
  });
});
