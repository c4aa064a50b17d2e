import { MONTH_ABBREVIATIONS, MONTH_NAMES as MONTHS } from '@/domain/words';

export { MONTH_ABBREVIATIONS };
const WEEKDAYS = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];

// Dates are written with our own English names rather than through Intl: the first
// Intl.DateTimeFormat a page builds loads the locale's data, about 20 ms of main thread on a
// desktop and several times that on a phone, for formats this fixed.

/** A calendar date written out for people in local time, e.g. "Tuesday 1 December 2026". */
export function formatLongDate(date: Date): string {
  return `${WEEKDAYS[date.getDay()]} ${date.getDate()} ${MONTHS[date.getMonth()]} ${date.getFullYear()}`;
}

/** Month name for 1–12. */
export function monthName(month: number): string {
  return MONTHS[month - 1] ?? String(month);
}

export const ROLE_LABELS = { owner: 'Owner', grower: 'Grower', viewer: 'Viewer' } as const;
