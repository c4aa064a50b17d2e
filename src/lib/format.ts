const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
const WEEKDAYS = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];
/** Three-letter month names, index 0 = January. */
export const MONTH_ABBREVIATIONS = MONTHS.map((name) => name.slice(0, 3));

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
