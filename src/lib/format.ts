let longDate: Intl.DateTimeFormat | undefined;

/** A calendar date written out for people, e.g. "Tuesday, 1 December 2026". */
export function formatLongDate(date: Date): string {
  // One formatter, made on first use: building one costs more than formatting with it.
  longDate ??= new Intl.DateTimeFormat('en-GB', { weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' });
  return longDate.format(date);
}

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

/** Month name for 1–12. */
export function monthName(month: number): string {
  return MONTHS[month - 1] ?? String(month);
}

export const ROLE_LABELS = { owner: 'Owner', grower: 'Grower', viewer: 'Viewer' } as const;
