/**
 * How the engine's stories write dates and lengths: the app's own formats, shared with the
 * client (`src/lib/dates.ts`, `src/lib/units.ts` re-export these). English names of our own
 * rather than Intl (see `src/lib/format.ts` on why).
 */

/** Month names, index 0 = January. */
export const MONTH_NAMES = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'] as const;
/** Three-letter month names, index 0 = January. */
export const MONTH_ABBREVIATIONS = MONTH_NAMES.map((name) => name.slice(0, 3));

/** A calendar date written for people, e.g. "14 Mar 2026"; a dash for none. */
export function formatDate(date: string | null | undefined): string {
  if (!date) return '—';
  const [y, m, d] = date.split('-').map(Number);
  return `${d} ${MONTH_ABBREVIATIONS[m - 1]} ${y}`;
}

/** Sizes are stored in millimetres; a collection may show and accept inches instead. */
export type LengthUnit = 'mm' | 'in';

export const MM_PER_INCH = 25.4;

/** A stored millimetre value in the display unit, rounded for reading (mm: whole; in: 0.1). */
export function fromMm(mm: number, unit: LengthUnit): number {
  return unit === 'mm' ? Math.round(mm) : Math.round((mm / MM_PER_INCH) * 10) / 10;
}

/** A stored length in the display unit with its unit, e.g. "184 mm" or "7.2 in"; a dash for none. */
export function formatLength(mm: number | null | undefined, unit: LengthUnit): string {
  if (mm === null || mm === undefined) return '—';
  return unit === 'mm' ? `${fromMm(mm, unit)} mm` : `${fromMm(mm, unit)} in`;
}
