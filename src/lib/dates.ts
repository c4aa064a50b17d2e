import { MONTH_ABBREVIATIONS } from './format';

/** Today's local calendar date as `YYYY-MM-DD` (the grower's own day, not UTC's). */
export function localToday(now: Date = new Date()): string {
  const y = now.getFullYear();
  const m = String(now.getMonth() + 1).padStart(2, '0');
  const d = String(now.getDate()).padStart(2, '0');
  return `${y}-${m}-${d}`;
}

/** A calendar date written for people, e.g. "14 Mar 2026" (see format.ts on why not Intl). */
export function formatDate(date: string | null | undefined): string {
  if (!date) return '—';
  const [y, m, d] = date.split('-').map(Number);
  return `${d} ${MONTH_ABBREVIATIONS[m - 1]} ${y}`;
}

/** The growth year a date falls in, for a collection whose season starts in `startMonth`. */
export function seasonOf(date: string, startMonth: number): number {
  const [y, m] = date.split('-').map(Number);
  return m >= startMonth ? y : y - 1;
}
