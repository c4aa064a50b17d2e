
/** Today's local calendar date as `YYYY-MM-DD` (the grower's own day, not UTC's). */
export function localToday(now: Date = new Date()): string {
  const y = now.getFullYear();
  const m = String(now.getMonth() + 1).padStart(2, '0');
  const d = String(now.getDate()).padStart(2, '0');
  return `${y}-${m}-${d}`;
}

/** A calendar date written for people, e.g. "14 Mar 2026" (see format.ts on why not Intl). */
export { formatDate } from '@/domain/words';

/** The growth year a date falls in (the engine's own rule). */
export { seasonOf } from '@/domain/dates';
