import { describe, expect, it } from 'vitest';
import { monthLabel, shortDate } from '@/features/calendar/timeline';
import { formatDate } from '@/lib/dates';
import { formatLongDate } from '@/lib/format';

// The kept formatters must write exactly what toLocaleDateString writes with the same options
// (the platform's ICU data is the reference), for every day of a leap year and across years.
const days: string[] = [];
for (let t = Date.UTC(2024, 0, 1); t < Date.UTC(2025, 0, 1); t += 86_400_000) days.push(new Date(t).toISOString().slice(0, 10));
const utc = (iso: string) => {
  const [y, m, d] = iso.split('-').map(Number);
  return new Date(Date.UTC(y, m - 1, d));
};

describe('date formatting', () => {
  it('formatDate writes "14 Mar 2026" style dates', () => {
    expect(formatDate('2026-03-14')).toBe('14 Mar 2026');
    expect(formatDate(null)).toBe('—');
    for (const day of days) {
      expect(formatDate(day)).toBe(utc(day).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }));
    }
  });

  it('formatLongDate writes the weekday and the month in full, in local time', () => {
    // Recent CLDR data puts a comma after the weekday; older data did not.
    expect(formatLongDate(new Date(2026, 11, 1))).toMatch(/^Tuesday,? 1 December 2026$/);
    for (const day of days.filter((_, i) => i % 7 === 0)) {
      const [y, m, d] = day.split('-').map(Number);
      const local = new Date(y, m - 1, d, 12);
      expect(formatLongDate(local)).toBe(local.toLocaleDateString('en-GB', { weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' }));
    }
  });

  it('the calendar writes the year only when it differs, whichever format was used before', () => {
    expect(shortDate('2026-12-06', 2026)).toBe('6 Dec');
    expect(shortDate('2027-12-06', 2026)).toBe('6 Dec 2027');
    expect(shortDate('2026-12-06', 2026)).toBe('6 Dec');
    expect(monthLabel('2027-01-15', true)).toBe('Jan 2027');
    expect(monthLabel('2027-01-15', false)).toBe('Jan');
    expect(monthLabel('2027-02-15', true)).toBe('Feb 2027');
  });
});
