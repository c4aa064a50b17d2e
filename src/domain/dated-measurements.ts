/**
 * A lead's measurements as the engine reads them: only the lead's own (`leadId`), with a valid
 * calendar date, sorted by date (same-day looks in list order), each with its day number.
 *
 * The growth fit, the comparison with earlier seasons, the flags and the bloom forecast all start
 * from this, and every forecast of a plant reads each of its earlier leads again, so it is made
 * once per measurement list and lead and remembered. Lists are treated as immutable, as
 * everywhere in the engine: a list that grows (a measurement pushed) misses the memory; one
 * edited in place would not.
 */
import { dayNumberOrNull } from './dates';
import type { IsoDate, Measurement } from './types';

export interface DatedMeasurements {
  /** The lead's measurements with a valid date, by date (same-day ones in list order). */
  readonly ms: readonly Measurement[];
  /** Day number (`toDayNumber`) of each date, same index; non-decreasing. */
  readonly days: readonly number[];
}

/** Per list: the lead it was made for, the list's length then, and the result. */
const memo = new WeakMap<readonly Measurement[], { leadId: string; length: number; value: DatedMeasurements }>();

const byDate = (a: Measurement, b: Measurement) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0);

/** The lead `leadId`'s validly dated measurements out of `measurements`, sorted (remembered per list). */
export function datedMeasurements(measurements: readonly Measurement[], leadId: string): DatedMeasurements {
  const hit = memo.get(measurements);
  if (hit && hit.leadId === leadId && hit.length === measurements.length) return hit.value;
  let ms: Measurement[] = [];
  let days: number[] = [];
  let sorted = true;
  for (let i = 0; i < measurements.length; i++) {
    const m = measurements[i];
    if (m.leadId !== leadId) continue;
    const day = dayNumberOrNull(m.date);
    if (day === null) continue;
    if (ms.length > 0 && ms[ms.length - 1].date > m.date) sorted = false;
    ms.push(m);
    days.push(day);
  }
  // Usually already in date order (the server reads them so): sorted only when needed. The sort
  // is stable, so either way same-day looks keep their list order.
  if (!sorted) {
    ms = ms.slice().sort(byDate);
    days = ms.map((m) => dayNumberOrNull(m.date)!);
  }
  const value: DatedMeasurements = { ms, days };
  memo.set(measurements, { leadId, length: measurements.length, value });
  return value;
}

/**
 * How many of the sorted measurements are dated on or before `today` (they come first). The
 * comparison is the plain string one every caller used on the dates (`m.date <= today`).
 */
export function countOnOrBefore(d: DatedMeasurements, today: IsoDate | undefined): number {
  const ms = d.ms;
  if (today === undefined) return ms.length;
  let n = ms.length;
  while (n > 0 && ms[n - 1].date > today) n--;
  return n;
}

/** A height the engine can use: finite and not negative. */
export function usableHeight(m: Measurement): boolean {
  return Number.isFinite(m.heightMm) && m.heightMm >= 0;
}
