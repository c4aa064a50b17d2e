import { describe, expect, it } from 'vitest';
import { monthLabel, shortDate } from '@/features/calendar/timeline';
import { formatDate } from '@/lib/dates';
import { formatLongDate } from '@/lib/format';

// Our own English names must write what the platform's ICU data writes for en-GB, every day of a
// leap year, with two known differences of style: recent CLDR data abbreviates September as
// "Sept" and puts a comma after the weekday; we write "Sep" and no comma.
const days: string[] = [];
for (let t = Date.UTC(2024, 0, 1); t < Date.UTC(2025, 0, 1); t += 86_400_000) days.push(new Date(t).toISOString().slice(0, 10));
const utc = (iso: string) => {
  const [y, m, d] = iso.split('-').map(Number);
  return new Date(Date.UTC(y, m - 1, d));
};
const icu = (date: Date, options: Intl.DateTimeFormatOptions) => date.toLocaleDateString('en-GB', options).replace(/\bSept\b/, 'Sep').replace(',', '');

describe('date formatting', () => {
  it('formatDate writes "14 Mar 2026" style dates', () => {
    expect(formatDate('2026-03-14')).toBe('14 Mar 2026');
    expect(formatDate('2026-09-01')).toBe('1 Sep 2026');
    expect(formatDate(null)).toBe('—');
    for (const day of days) expect(formatDate(day)).toBe(icu(utc(day), { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }));
  });

  it('formatLongDate writes the weekday and the month in full, in local time', () => {
    expect(formatLongDate(new Date(2026, 11, 1))).toBe('Tuesday 1 December 2026');
    for (const day of days) {
      const [y, m, d] = day.split('-').map(Number);
      const local = new Date(y, m - 1, d, 12);
      expect(formatLongDate(local)).toBe(icu(local, { weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' }));
    }
  });

  it('the calendar writes the year only when it differs from the reference year', () => {
    expect(shortDate('2026-12-06', 2026)).toBe('6 Dec');
    expect(shortDate('2027-12-06', 2026)).toBe('6 Dec 2027');
    expect(monthLabel('2027-01-15', true)).toBe('Jan 2027');
    expect(monthLabel('2027-01-15', false)).toBe('Jan');
    for (const day of days) {
      expect(shortDate(day, 2024)).toBe(icu(utc(day), { day: 'numeric', month: 'short', timeZone: 'UTC' }));
      expect(shortDate(day, 2023)).toBe(icu(utc(day), { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }));
      expect(monthLabel(day, true)).toBe(icu(utc(day), { month: 'short', year: 'numeric', timeZone: 'UTC' }));
    }
  });
});
