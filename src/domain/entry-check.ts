/**
 * A second look at an entry that looks wrong before it is saved: a bulb's height does not fall
 * much from one look to the next (a pseudobulb shrivels a few per cent in a dry spell, no more —
 * common practice), and a height many times the last one in a few weeks is more often a slip of
 * the finger (18 typed as 180) than growth. The grower confirms and it is saved as typed; the
 * growth fit then counts such a point less if it lies far off the curve (`growth-curve.ts`).
 */
import { daysBetween } from './dates';
import { formatDate, formatLength, type LengthUnit } from './words';

/** A fall below the tallest earlier height larger than this share of it asks (chosen: a tenth). */
export const SHRINK_SHARE = 0.1;
/** …and at least this many mm, or three times the lead's own scatter about its curve, whichever is larger. */
export const SHRINK_MIN_MM = 5;
/** A rise to more than this multiple of the last height (plus SHRINK_MIN_MM) within JUMP_DAYS asks (chosen). */
export const JUMP_FACTOR = 2.5;
export const JUMP_DAYS = 21;

export interface EntryToCheck {
  date: string;
  heightMm: number;
}

/**
 * Why an entry deserves a second look, or null. `earlier` are the lead's looks (any order; those
 * on or after `entry.date` are ignored), `spreadMm` the lead's residual scatter about its fitted
 * curve when known.
 */
export function entryLooksWrong(earlier: readonly EntryToCheck[], entry: EntryToCheck, units: LengthUnit, spreadMm: number | null = null): string | null {
  const before = earlier.filter((m) => m.date < entry.date && Number.isFinite(m.heightMm));
  if (before.length === 0 || !Number.isFinite(entry.heightMm)) return null;
  const tallest = before.reduce((a, b) => (b.heightMm > a.heightMm ? b : a));
  const last = before.reduce((a, b) => (b.date > a.date ? b : a));
  const allowance = Math.max(SHRINK_MIN_MM, SHRINK_SHARE * tallest.heightMm, 3 * (spreadMm ?? 0));
  if (entry.heightMm < tallest.heightMm - allowance) {
    return `${formatLength(entry.heightMm, units)} is ${formatLength(tallest.heightMm - entry.heightMm, units)} below this lead's tallest, ${formatLength(tallest.heightMm, units)} on ${formatDate(tallest.date)}; a bulb does not shrink that much.`;
  }
  const days = daysBetween(last.date, entry.date);
  if (days <= JUMP_DAYS && last.heightMm > 0 && entry.heightMm > JUMP_FACTOR * last.heightMm + SHRINK_MIN_MM) {
    return `${formatLength(entry.heightMm, units)} is more than ${JUMP_FACTOR} times the ${formatLength(last.heightMm, units)} of ${formatDate(last.date)}, ${days} days before.`;
  }
  return null;
}
