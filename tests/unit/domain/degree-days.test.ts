import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { addDays } from '@/domain/dates';
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
    // 150 from 10 days of readings, then 15 a day: 300 is complete after 20 days, 1–20 June, so
    // the interval [1 June, 21 June) holds it, as sumDegreeDays counts.
    expect(dateReachingDegreeDays(readings, '2026-06-01', 300, '2026-06-11', { baseTemp: 3.5 })).toBe('2026-06-21');
    expect(dateReachingDegreeDays(readings, '2026-06-01', 45, '2026-06-11', { baseTemp: 3.5 })).toBe('2026-06-04');
    expect(dateReachingDegreeDays([], '2026-06-01', 45, '2026-06-11', { baseTemp: 3.5 })).toBeNull();
  });
});

describe('an interval counted the same way in both directions', () => {
  // Iowa State University, Agronomy 541 (REFERENCES.md): a day of high 70 °F and low 50 °F above a
  // 50 °F base is 10 GDD. Seven such days from 1 to 7 May hold 70 GDD; counting 70 GDD forward from
  // 1 May must end the interval on 8 May, the day after the last one counted.
  const may = Array.from({ length: 20 }, (_, i) => ({ date: `2026-05-${String(i + 1).padStart(2, '0')}`, minC: 50, maxC: 70 }));
  const options = { baseTemp: 50, method: 'plain' as const };

  it('the worked example, forward and back', () => {
    expect(sumDegreeDays(may, '2026-05-01', '2026-05-08', options).degreeDays).toBeCloseTo(70, 12);
    expect(dateReachingDegreeDays(may, '2026-05-01', 70, '2026-05-21', options)).toBe('2026-05-08');
  });

  it('any past interval gives back its own end date (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ lo: fc.integer({ min: 0, max: 25 }), span: fc.integer({ min: 1, max: 15 }) }), { minLength: 40, maxLength: 40 }),
        fc.integer({ min: 0, max: 20 }),
        fc.integer({ min: 1, max: 19 }),
        (days, from, length) => {
          const readings = days.map((d, i) => ({ date: addDays('2026-03-01', i), minC: d.lo, maxC: d.lo + d.span }));
          const start = addDays('2026-03-01', from);
          const end = addDays(start, length);
          const total = sumDegreeDays(readings, start, end, { baseTemp: 3.5 }).degreeDays;
          fc.pre(total > 0 && dailyDegreeDays(days[from + length - 1].lo, days[from + length - 1].lo + days[from + length - 1].span, { baseTemp: 3.5 }) > 0);
          expect(dateReachingDegreeDays(readings, start, total, '2026-04-10', { baseTemp: 3.5 })).toBe(end);
        },
      ),
    );
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
