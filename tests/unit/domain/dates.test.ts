import { describe, expect, it } from 'vitest';
import { addDays, dayOfSeason, daysBetween, fromDayNumber, isIsoDate, toDayNumber } from '@/domain/dates';

describe('calendar dates', () => {
  it.each([
    ['2026-01-01', '2026-01-02', 1],
    ['2026-03-28', '2026-03-30', 2], // spans the European DST change
    ['2026-10-24', '2026-10-26', 2],
    ['2024-02-28', '2024-03-01', 2], // leap year
    ['2025-02-28', '2025-03-01', 1],
    ['2026-12-31', '2026-01-01', -364],
  ])('daysBetween(%s, %s) = %i', (a, b, d) => {
    expect(daysBetween(a, b)).toBe(d);
  });

  it.each([
    ['2026-01-31', 1, '2026-02-01'],
    ['2024-02-28', 1, '2024-02-29'],
    ['2026-03-01', -1, '2026-02-28'],
    ['2026-06-15', 0, '2026-06-15'],
    ['2026-06-15', 200.4, '2027-01-01'],
  ])('addDays(%s, %d) = %s', (a, n, out) => {
    expect(addDays(a, n)).toBe(out);
  });

  it('round-trips day numbers', () => {
    expect(toDayNumber('1970-01-01')).toBe(0);
    for (const d of ['1999-12-31', '2000-02-29', '2026-07-04']) expect(fromDayNumber(toDayNumber(d))).toBe(d);
  });

  it.each(['2026-02-30', '2026-13-01', '26-01-01', '', '2026-1-1'])('rejects %j', (d) => {
    expect(isIsoDate(d)).toBe(false);
    expect(() => toDayNumber(d)).toThrow(RangeError);
  });

  it('counts the day of the season from the season start month', () => {
    expect(dayOfSeason('2026-01-01')).toBe(0);
    expect(dayOfSeason('2026-03-01', 3)).toBe(0);
    expect(dayOfSeason('2026-02-28', 3)).toBe(364);
    expect(dayOfSeason('2026-07-01', 7)).toBe(0);
  });
});

describe('day numbers agree with UTC midnights', () => {
  it('for every 37th day over four centuries', () => {
    for (let day = -150_000; day < 150_000; day += 37) {
      const iso = new Date(day * 86_400_000).toISOString().slice(0, 10);
      expect(fromDayNumber(day)).toBe(iso);
      expect(toDayNumber(iso)).toBe(day);
    }
  });
});
