/** Today's local calendar date as `YYYY-MM-DD` (the grower's own day, not UTC's). */
export function localToday(now: Date = new Date()): string {
  const y = now.getFullYear();
  const m = String(now.getMonth() + 1).padStart(2, '0');
  const d = String(now.getDate()).padStart(2, '0');
  return `${y}-${m}-${d}`;
}

let dayMonthYear: Intl.DateTimeFormat | undefined;

/** A calendar date written for people, e.g. "14 Mar 2026". */
export function formatDate(date: string | null | undefined): string {
  if (!date) return '—';
  const [y, m, d] = date.split('-').map(Number);
  // One formatter, made on first use: building one costs more than formatting with it.
  dayMonthYear ??= new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
  return dayMonthYear.format(new Date(Date.UTC(y, m - 1, d)));
}

/** The growth year a date falls in, for a collection whose season starts in `startMonth`. */
export function seasonOf(date: string, startMonth: number): number {
  const [y, m] = date.split('-').map(Number);
  return m >= startMonth ? y : y - 1;
}
